// `lobecast export RESULT.h5`: the pattern as a CSV or TSV table for spreadsheets:
// the stored grid, one cut, or one direction (--at), in theta-phi or azimuth-
// elevation. Directions off the stored grid are computed exactly through the engine
// (io/text/export_samples.h); the formatting is io/text/pattern_export.h.
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
#include "cli/text_output.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/error.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/sweep_reader.h"
#include "io/io_error.h"
#include "io/safety_note.h"
#include "io/text/export_samples.h"
#include "io/text/pattern_export.h"
#include "io/text/summary_text.h"
#include "io/text/sweep_text.h"
#include "io/text/text_format.h"

namespace lobecast::cli {
namespace {

struct ExportArgs {
  std::string input;
  std::string output;  // empty: stdout
  std::string format = "csv";
  std::string coords = "theta-phi";
  std::string reference = "auto";
  std::string cut;  // empty: the full grid
  double step_deg = 1.0;
  std::string at;  // empty: no single-direction lookup
  bool no_notes = false;
  std::string notes = "column";
  std::string precision = "display";
  bool decimal_comma = false;
  bool quiet = false;
  bool step_given = false;
  bool notes_given = false;
  bool sweep = false;              // the per-frequency table of a sweep instead of the pattern
  std::vector<std::string> given;  // options given on the command line
};

// `--sweep`: the /sweep table as CSV (io/text/sweep_text.h).
void RunSweepExport(const ExportArgs& args) {
  for (const std::string& o : args.given) {
    if (o != "--sweep" && o != "--output" && o != "--quiet" && o != "RESULT")
      BadOption(o, "it with --sweep (the sweep's table has one layout)",
                "only -o and -q with --sweep");
  }
  RefuseInputAsOutput("--output", args.output, args.input);
  (void)ReadResult(args.input);  // a complete result, or the usual message
  const std::optional<StoredSweep> sweep = ReadSweep(args.input);
  if (!sweep) {
    BadOption("--sweep", "a result of one frequency (no /sweep group)",
              "a sweep result: compute a file that gives 'frequencies'");
  }
  const std::string csv = text::SweepCsv(*sweep);
  WriteText(args.output, "the export", [&](std::ostream& out) { out << csv; });
}

void RunExport(const ExportArgs& args) {
  if (args.sweep) return RunSweepExport(args);
  PatternTableOptions table;
  const auto format = ExportFormatFromString(args.format);
  if (!format) {
    BadOption("--format", "'" + args.format + "'",
              JoinAlternatives(NamesOf({ExportFormat::kCsv, ExportFormat::kTsv})));
  }
  table.format = *format;
  table.precision = *ExportPrecisionFromString(args.precision);  // checked by CLI11
  table.decimal_comma = args.decimal_comma;
  if (args.no_notes && args.notes_given && args.notes != "none") {
    BadOption("--no-notes", "it with --notes " + args.notes, "one of the two");
  }
  table.notes_style = args.notes == "comments" ? NotesStyle::kComments : NotesStyle::kColumn;
  const bool with_notes = !args.no_notes && args.notes != "none";
  const auto coords = ExportCoordinatesFromString(args.coords);
  if (!coords) {
    BadOption("--coords", "'" + args.coords + "'",
              JoinAlternatives(
                  NamesOf({ExportCoordinates::kThetaPhi, ExportCoordinates::kAzimuthElevation})));
  }
  table.coordinates = *coords;
  const std::optional<PolarizationReference> fixed = ParseReference(args.reference);
  std::optional<CutSpec> cut;
  if (!args.cut.empty()) {
    std::string why;
    cut = ParseCutSpec(args.cut, &why);
    if (!cut) {
      const std::size_t e = why.find("expected ");
      BadOption("--cut", "'" + args.cut + "'", e == std::string::npos ? why : why.substr(e + 9));
    }
  }
  if (args.step_given && !(cut && cut->kind == CutSpec::Kind::kGreatCircle)) {
    BadOption("--step",
              std::string("it with ") +
                  (cut ? "--cut " + args.cut + " (a cut on the stored grid's own spacing)"
                   : !args.at.empty() ? "--at (one direction)"
                                      : "the whole grid"),
              "--step only with --cut great-circle:THETA,PHI,HEADING");
  }
  if (!(args.step_deg > 0 && args.step_deg <= 90)) {
    BadOption("--step", FormatBound(args.step_deg) + " deg", "0 < step <= 90 deg");
  }
  std::optional<std::pair<double, double>> at;
  const bool az_el = table.coordinates == ExportCoordinates::kAzimuthElevation;
  if (!args.at.empty()) {
    auto d = ParseAnglePair(
        args.at, "--at",
        az_el ? "AZIMUTH,ELEVATION in deg (with --coords az-el)" : "THETA,PHI in deg");
    if (az_el) {
      if (!(d.second >= -90 && d.second <= 90)) {
        BadOption("--at", "'" + args.at + "'", "an elevation within -90 .. 90 deg");
      }
      d = {90.0 - d.second, d.first};
    } else if (!(d.first >= 0 && d.first <= 180)) {
      BadOption("--at", "'" + args.at + "'", "a theta within 0 .. 180 deg");
    }
    at = d;
  }

  RefuseInputAsOutput("--output", args.output, args.input);
  CheckTextOutput(args.output);  // an unwritable folder is found before the work
  const StoredResult stored = ReadResult(args.input);
  table.reference = fixed ? *fixed : AutoReference(stored.result);
  table.radiated_power_w = stored.result.radiated_power_w;
  table.field_floor_v = stored.result.field_floor_v;
  std::vector<ExportSample> samples;
  std::string what;
  if (at) {
    samples = ExactSamples(stored, {*at});
    what = "one direction, computed exactly through the engine";
  } else if (cut) {
    samples = CutSamples(stored, *cut, args.step_deg);
    table.cut_angle_column = cut->kind != CutSpec::Kind::kTheta;
    const bool exact = !samples.empty() && samples.front().exact;
    what = "cut " + DescribeCut(*cut) +
           (exact ? ", computed exactly through the engine" : ", from the stored grid");
    if (cut->kind == CutSpec::Kind::kPhi) {
      what += "; cut_angle_deg = theta on the phi half, -theta on the phi + 180 deg half";
    } else if (cut->kind == CutSpec::Kind::kGreatCircle) {
      what += "; cut_angle_deg = signed angle along the circle from that direction";
    }
  } else {
    samples = GridSamples(stored);
    what = "the stored grid, theta-major";
  }
  if (with_notes) {
    const std::string name = stored.metadata.name.empty() ? "(unnamed)" : stored.metadata.name;
    table.notes = {
        "lobecast export of " + args.input + ": " + name + ", " +
            text::FormatFrequency(stored.array.frequency_hz) + ", ground " +
            std::string(ToString(stored.array.ground)),
        "note: " + std::string(kSafetyNote),
        "directions: " + what + " (" + std::to_string(samples.size()) + " rows)",
        "coordinates: " + CoordinateDefinition(table.coordinates),
        "co_dBi, cross_dBi: reference " + text::ReferenceName(table.reference) +
            "; directivity of the currents as given (gain = directivity for a lossless, "
            "matched array)",
        "sense: +1 right-hand, -1 left-hand, 0 linear or no field (IEEE Std 145-2013); "
        "-inf: zero field; nan: undefined at zero field",
    };
  }
  // Straight into the stream: a full-grid table is not held in memory twice.
  WriteText(args.output, "the export",
            [&](std::ostream& out) { WritePatternTable(out, samples, table); });
}

}  // namespace

void AddExportCommand(CLI::App& app) {
  auto args = std::make_shared<ExportArgs>();
  CLI::App* cmd = app.add_subcommand(
      "export",
      "Write the pattern of a result file as a CSV or TSV table: one header row (units in "
      "the names: directivity_dBi, co_dBi, cross_dBi, axial_ratio_dB, tilt_deg, sense, "
      "phase_theta_deg, phase_phi_deg, rE_theta_V, rE_phi_V), then one row per direction. "
      "Directions off the stored grid are computed exactly, not interpolated.");
  cmd->add_option("RESULT", args->input, "Result file (HDF5) written by compute")
      ->required()
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_option("-o,--output", args->output,
                  "Table file, written atomically; default or '-': standard output")
      ->check(TextOutput());
  cmd->add_option("--format", args->format, "csv (default) or tsv")
      ->check(OneOf(NamesOf({ExportFormat::kCsv, ExportFormat::kTsv}), true));
  cmd->add_flag("--decimal-comma", args->decimal_comma,
                "Write ',' as the decimal mark, for spreadsheets in locales that use one; CSV "
                "cells are then separated by ';'");
  cmd->add_option("--precision", args->precision,
                  "display (default: angles and dB to 0.001, fields to 6 significant digits) or "
                  "full (the shortest decimals that read back to the stored doubles)")
      ->check(OneOf(NamesOf({ExportPrecision::kDisplay, ExportPrecision::kFull}), true));
  cmd->add_option("--coords", args->coords,
                  "theta-phi (default; theta from +z, phi from +x toward +y) or az-el "
                  "(azimuth from +x toward +y in the xy plane, elevation above it)")
      ->check(OneOf(NamesOf({ExportCoordinates::kThetaPhi, ExportCoordinates::kAzimuthElevation}),
                    true));
  cmd->add_option("--reference", args->reference, kReferenceHelp)
      ->check(OneOf(ReferenceNames(), true));
  CLI::Option* cut = cmd->add_option(
      "--cut", args->cut,
      "One cut instead of the grid: phi=DEG (the plane through z; signed theta), theta=DEG "
      "(a cone), or great-circle:THETA,PHI,HEADING (deg: the great circle through that "
      "direction, leaving it HEADING deg from theta_hat toward phi_hat)");
  CLI::Option* step = cmd->add_option(
      "--step", args->step_deg,
      "Spacing along a great-circle cut (deg; default 1); refused with other cuts, whose "
      "spacing is the grid's");
  CLI::Option* at = cmd->add_option(
      "--at", args->at,
      "One direction, computed exactly: THETA,PHI (deg), or AZIMUTH,ELEVATION (deg) with "
      "--coords az-el");
  at->excludes(cut);
  CLI::Option* notes = cmd->add_option(
      "--notes", args->notes,
      "Where the notes (source, coordinates, reference, safety note) go: column (default: a "
      "last 'notes' column, one note per row, so the table stays rectangular for "
      "spreadsheets), comments ('#' lines before the header, for readers that skip them) or "
      "none");
  notes->check(OneOf({"column", "comments", "none"}, true));
  cmd->add_flag("--no-notes", args->no_notes, "The same as --notes none");
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors besides the table itself");
  cmd->add_flag("--sweep", args->sweep,
                "A frequency sweep's table instead of the pattern (CSV): per frequency the peak "
                "directivity (dBi), its direction and squint (deg), radiated power (W), half-power "
                "beamwidths (deg), side-lobe level (dB), and with a circuit gain and input match");
  cmd->callback([args, step, notes, cmd] {
    for (const CLI::Option* o : cmd->get_options())
      if (o->count() > 0) args->given.push_back(o->get_name());
    args->step_given = step->count() > 0;
    args->notes_given = notes->count() > 0;
    RunExport(*args);
  });
}

}  // namespace lobecast::cli
