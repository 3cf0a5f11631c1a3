// `lobecast plot RESULT.h5 --kind ... -o FILE.png|.svg|.pdf`: pictures of a
// stored result, drawn by io/plot/plot.h.
#include <cmath>
#include <cstdio>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "cli/analysis_setup.h"
#include "cli/commands.h"
#include "cli/enum_names.h"
#include "cli/option_checks.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/text_case.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/sweep_reader.h"
#include "io/input_error.h"
#include "io/output_file.h"
#include "io/plot/plot.h"
#include "io/plot/sweep_plot.h"

namespace lobecast::cli {
namespace {

struct PlotArgs {
  std::string input;
  std::string output;
  std::string kind = "polar";
  std::string cut = "phi=0";
  std::string quantity;
  std::string reference = "auto";
  std::string projection = "theta-phi";
  std::string size = "800x600";
  double floor_db = 40.0;
  double contour_step_db = 10.0;
  double axial_ratio_max_db = 30.0;
  bool normalized = false;
  bool quiet = false;
  // Options given on the command line, for those that apply to some kinds only.
  std::vector<std::string> given;
  std::size_t max_nulls = AnalysisOptions{}.max_nulls;
};

bool Given(const PlotArgs& a, const std::string& option) {
  for (const std::string& g : a.given) {
    if (g == option) return true;
  }
  return false;
}

// Options that do not apply to the kind of plot asked for are refused (exit 2).
void RefuseInapplicable(const PlotArgs& a, plot::PlotKind kind) {
  const bool cut = kind == plot::PlotKind::kPolar || kind == plot::PlotKind::kCartesian;
  const std::string with = "it with --kind " + a.kind;
  if (!cut && Given(a, "--cut")) {
    BadOption("--cut", with + " (a map shows the whole grid)",
              "--cut only with --kind polar or cartesian");
  }
  if (cut && Given(a, "--projection")) {
    BadOption("--projection", with + " (a cut has no projection)",
              "--projection only with --kind map or polarization");
  }
  if (kind != plot::PlotKind::kMap && Given(a, "--contour-db")) {
    BadOption("--contour-db", with, "--contour-db only with --kind map");
  }
  if (kind != plot::PlotKind::kPolarization && Given(a, "--ar-max-db")) {
    BadOption("--ar-max-db", with, "--ar-max-db only with --kind polarization");
  }
  if (Given(a, "--reference")) {
    const auto q = plot::QuantityFromString(a.quantity);
    const bool co_cross = q && (*q == plot::Quantity::kCo || *q == plot::Quantity::kCross);
    if (kind == plot::PlotKind::kPolarization) {
      BadOption("--reference", with + " (axial ratio and sense need no reference)",
                "--reference only with co/cross levels");
    }
    if (Given(a, "--quantity") ? (q && !co_cross) : kind == plot::PlotKind::kMap) {
      BadOption("--reference",
                "it with --quantity " +
                    (a.quantity.empty() ? "directivity (the map's default)" : a.quantity),
                "--reference only with --quantity co or cross (or a cut, where it selects "
                "them)");
    }
  }
  if (kind == plot::PlotKind::kPolarization) {
    for (const char* o : {"--quantity", "--normalize"}) {
      if (Given(a, o)) {
        BadOption(o, with + " (it maps axial ratio and sense, not a level)",
                  std::string(o) + " only with --kind polar, cartesian or map");
      }
    }
  }
}

[[noreturn]] void Bad(const char* option, const std::string& found, const std::string& expected) {
  BadOption(option, "'" + found + "'", expected);
}

plot::PlotOptions ToOptions(const PlotArgs& a) {
  plot::PlotOptions o;
  const auto kind = plot::PlotKindFromString(a.kind);
  if (!kind) {
    // The pattern kinds, then the sweep's (RunSweepPlot), which reads another part of the file.
    Bad("--kind", a.kind,
        JoinAlternatives(NamesOf({plot::PlotKind::kPolar, plot::PlotKind::kCartesian,
                                  plot::PlotKind::kMap, plot::PlotKind::kPolarization})) +
            " (or sweep, for a frequency sweep's figures)");
  }
  o.kind = *kind;
  RefuseInapplicable(a, *kind);
  const auto cut = plot::CutSpecFromString(a.cut);
  if (!cut)
    Bad("--cut", a.cut,
        "phi=DEG (a plane through z), theta=DEG (a cone, 0..180), elevation or orthogonal");
  o.cut = *cut;
  if (!a.quantity.empty()) {
    const auto q = plot::QuantityFromString(a.quantity);
    if (!q) {
      Bad("--quantity", a.quantity,
          JoinAlternatives(NamesOf({plot::Quantity::kDirectivity, plot::Quantity::kCo,
                                    plot::Quantity::kCross, plot::Quantity::kTheta,
                                    plot::Quantity::kPhi, plot::Quantity::kRealizedGain})));
    }
    o.quantity = *q;
  }
  const auto ref = plot::ReferenceChoiceFromString(a.reference);
  if (!ref) {
    std::vector<std::string> names = {"auto"};
    for (const std::string& n : PolarizationReferenceNames()) names.push_back(n);
    Bad("--reference", a.reference, JoinAlternatives(names));
  }
  o.reference = *ref;
  const auto proj = plot::MapProjectionFromString(a.projection);
  if (!proj) {
    Bad("--projection", a.projection,
        JoinAlternatives(NamesOf({plot::MapProjection::kThetaPhi, plot::MapProjection::kAzEl,
                                  plot::MapProjection::kUv})));
  }
  o.projection = *proj;
  const auto size = plot::ImageSizeFromString(a.size);
  if (!size) Bad("--size", a.size, "WIDTHxHEIGHT in px, e.g. 800x600");
  o.size = *size;
  std::string why;
  if (!o.size.IsValid(&why)) Bad("--size", a.size, why.substr(why.find("expected ") + 9));
  o.floor_db = a.floor_db;
  o.contour_step_db = a.contour_step_db;
  o.axial_ratio_max_db = a.axial_ratio_max_db;
  o.normalized = a.normalized;
  auto range = [](const char* option, double v, double lo, double hi) {
    if (!(std::isfinite(v) && v >= lo && v <= hi)) {
      char buf[64];
      std::snprintf(buf, sizeof buf, "%g .. %g dB", lo, hi);
      char found[32];
      std::snprintf(found, sizeof found, "%g", v);
      Bad(option, found, buf);
    }
  };
  range("--floor-db", a.floor_db, 1, 200);
  range("--contour-db", a.contour_step_db, 0.5, 50);
  range("--ar-max-db", a.axial_ratio_max_db, 1, 100);
  if (!plot::ImageFormatFromPath(a.output))
    Bad("--output", a.output, "a file name ending in .png, .svg or .pdf");
  return o;
}

// `--kind sweep`: a frequency sweep's figures against frequency (io/plot/sweep_plot.h).
// Only the output, --size and -q apply.
bool IsSweepKind(const std::string& kind) { return EqualsIgnoreCase(kind, "sweep"); }

void RunSweepPlot(const PlotArgs& args) {
  for (const char* o : {"--cut", "--quantity", "--reference", "--projection", "--floor-db",
                        "--normalize", "--contour-db", "--ar-max-db", "--max-nulls"}) {
    if (Given(args, o)) {
      BadOption(o, "it with --kind sweep (figures against frequency)",
                std::string(o) + " only with --kind polar, cartesian, map or polarization");
    }
  }
  plot::ImageSize size = plot::kSweepPlotSize;
  if (Given(args, "--size")) {
    const auto s = plot::ImageSizeFromString(args.size);
    if (!s) Bad("--size", args.size, "WIDTHxHEIGHT in px, e.g. 800x1100");
    std::string why;
    if (!s->IsValid(&why)) Bad("--size", args.size, why.substr(why.find("expected ") + 9));
    size = *s;
  }
  if (!plot::ImageFormatFromPath(args.output))
    Bad("--output", args.output, "a file name ending in .png, .svg or .pdf");
  RefuseInputAsOutput("--output", args.output, args.input);
  const StoredResult result = ReadResult(args.input);
  const std::optional<StoredSweep> sweep = ReadSweep(args.input);
  if (!sweep) {
    BadOption("--kind", "sweep for a result of one frequency (no /sweep group)",
              "a sweep result: compute a file that gives 'frequencies'");
  }
  plot::WriteSweepPlot(result, *sweep, args.output, size);
}

void RunPlot(const PlotArgs& args) {
  if (IsSweepKind(args.kind)) return RunSweepPlot(args);
  plot::PlotOptions options = ToOptions(args);  // reject bad options before reading
  RefuseInputAsOutput("--output", args.output, args.input);
  CheckOutputWritable(args.output);  // an unwritable folder is found before the work
  const StoredResult result = ReadResult(args.input);
  if (options.quantity == plot::Quantity::kRealizedGain) {
    // 4 pi U / P_available = D P_rad / P_available, as /pattern/realized_gain holds it.
    const std::optional<StoredCoupling> c = ReadCoupling(args.input, result.array, result.currents);
    if (!c || !(c->result.available_w > 0)) {
      BadOption("--quantity",
                "realized-gain for " + args.input +
                    (c ? ", whose sources have no available power (current-forced "
                         "ports: the file holds /pattern/gain)"
                       : ", which has no circuit (no drive, load or wire keys)"),
                "realized-gain for a result with voltage sources (drive keys); directivity "
                "otherwise");
    }
    options.realized_gain_factor = c->result.radiated_w / c->result.available_w;
  }
  // The figures drawn are the stored analysis' (what `report` prints); a result without
  // one (older, or computed with --no-analysis) gets one with the default options.
  std::optional<StoredAnalysis> stored = ReadAnalysis(args.input);
  if (!stored) {
    AnalysisOptions o;
    o.reference = AutoReference(result.result);
    o.max_nulls = args.max_nulls;
    stored = StoredAnalysis{AnalyzePattern(result.array, result.currents, result.result, o), o};
  } else if (stored->options.max_nulls != args.max_nulls) {
    AnalysisOptions o = stored->options;
    o.max_nulls = args.max_nulls;
    stored->analysis = AnalyzePattern(result.array, result.currents, result.result, o);
  }
  plot::WritePlot(result, &stored->analysis, options, args.output);
}

}  // namespace

void AddPlotCommand(CLI::App& app) {
  auto args = std::make_shared<PlotArgs>();
  CLI::App* cmd = app.add_subcommand(
      "plot",
      "Draw a stored result as a PNG, SVG or PDF (from the output's extension): a polar or "
      "cartesian pattern cut, a map of the whole grid, or a polarization map. Levels are in "
      "dBi (partial directivity for co/cross/theta/phi) unless --normalize; angles in degrees.");
  cmd->add_option("RESULT", args->input, "Result file (HDF5) written by 'lobecast compute'")
      ->required()
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_option("-o,--output", args->output,
                  "Image file: .png, .svg or .pdf, in an existing folder (not '-': images are "
                  "binary)")
      ->required()
      ->check(BinaryOutput("an image"));
  cmd->add_option("-k,--kind", args->kind,
                  "polar | cartesian (a cut), map (the grid as an image) | polarization "
                  "(axial ratio and sense maps) | sweep (a frequency sweep's peak directivity, "
                  "beam direction, beamwidths and side-lobe level against frequency); default "
                  "polar");
  cmd->add_option(
      "--cut", args->cut,
      "Cut for polar/cartesian: phi=DEG, the plane through z containing phi = DEG "
      "(signed theta -180..180 deg, negative on the phi + 180 side), or theta=DEG, "
      "the cone at that theta (against phi); must lie on the grid; or elevation / orthogonal, "
      "the principal planes of the pattern analysis through the beam (exact off the "
      "grid, against the offset from the peak). Default phi=0");
  cmd->add_option("--max-nulls", args->max_nulls,
                  "Mark at most N null loci of the analysis (recomputed when the stored one "
                  "used another N)")
      ->capture_default_str()
      ->check(WholeNumberAtLeast(1, "null loci"));
  cmd->add_option("--quantity", args->quantity,
                  "directivity (total) | co | cross (Ludwig-3 or circular, see --reference) | "
                  "theta | phi (partial directivity of E_theta / E_phi), in dBi; cuts draw the "
                  "pair (co with cross, theta with phi); realized-gain (4 pi U / P_available, "
                  "a result with voltage sources). Default: for cuts co/cross when "
                  "--reference is given or the peak is within 45 deg of the z axis, else "
                  "theta/phi; for maps directivity");
  cmd->add_option("--reference", args->reference,
                  "Polarization reference for co/cross: x | y (Ludwig-3 linear) | rhcp | lhcp | "
                  "theta | phi (co = E_theta / E_phi) | auto (the one with the largest co "
                  "component at the peak, as in report); default auto");
  cmd->add_option("--floor-db", args->floor_db,
                  "Lowest level shown, dB below the plotted peak (1..200); default 40");
  cmd->add_flag("--normalize", args->normalized,
                "Levels in dB relative to the peak (0 dB at the peak) instead of dBi");
  cmd->add_option("--projection", args->projection,
                  "Map projection: theta-phi | az-el (azimuth = phi from +x toward +y, elevation "
                  "above the xy plane) | uv (u = sin(theta) cos(phi), v = sin(theta) sin(phi), "
                  "upper hemisphere); default theta-phi");
  cmd->add_option("--contour-db", args->contour_step_db,
                  "Map contour spacing, dB (0.5..50; e.g. 3 or 10); default 10");
  cmd->add_option("--ar-max-db", args->axial_ratio_max_db,
                  "Polarization map: axial ratios at or above this (dB) count as near linear; "
                  "default 30");
  cmd->add_option("--size", args->size,
                  "Image size WIDTHxHEIGHT in px (points for SVG/PDF), 320x240 .. 8000x8000; "
                  "default 800x600 (sweep: 800x1100)");
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but warnings and errors");
  cmd->callback([args, cmd] {
    for (const CLI::Option* o : cmd->get_options()) {
      if (o->count() > 0) args->given.push_back(o->get_name());
    }
    RunPlot(*args);
  });
}

}  // namespace lobecast::cli
