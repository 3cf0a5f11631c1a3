// `lobecast tolerance FILE.toml --trials K --seed S -o OUT.h5`: a Monte Carlo
// tolerance study (engine/tolerance/tolerance.h) of an array or design file.
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "cli/analysis_setup.h"
#include "cli/commands.h"
#include "cli/enum_names.h"
#include "cli/option_checks.h"
#include "cli/progress_bar.h"
#include "cli/scale_out.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/tolerance/tolerance.h"
#include "io/hdf5/analysis_writer.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "io/hdf5/schema.h"
#include "io/hdf5/tolerance_writer.h"
#include "io/input/array_reader.h"
#include "io/input/units.h"
#include "io/plot/tolerance_plot.h"
#include "io/safety_note.h"
#include "io/text/tolerance_text.h"

namespace lobecast::cli {
namespace {

struct ToleranceArgs {
  std::string input;
  std::string output;
  std::size_t trials = 100;
  std::uint64_t seed = 1;
  double amplitude_db = 0;
  double phase_deg = 0;
  std::string position;  // a length: "0.001", "1 mm", "0.02 wavelength"
  double failures = 0;
  std::optional<std::size_t> failed_count;
  std::string plots_dir;
  int threads = 0;
  std::string method = "auto";
  bool quiet = false;
};

// --position: a bare number is metres; a unit (m, cm, mm, wavelength) may follow.
double PositionSigma_m(const std::string& text, double wavelength_m) {
  const std::string expected = "a standard deviation >= 0 in m, or with a unit (" +
                               std::string(kLengthUnitList) + "), e.g. \"0.5 mm\"";
  const std::optional<Quantity> q = SplitQuantity(text);
  if (!q || !std::isfinite(q->value) || q->value < 0)
    BadOption("--position", "'" + text + "'", expected);
  if (q->unit.empty()) return q->value;
  const std::optional<LengthUnit> unit = LengthUnitFromString(q->unit);
  if (!unit) BadOption("--position", "unit '" + q->unit + "'", expected);
  return q->value * MetresPer(*unit, wavelength_m);
}

// RESULT defaults to the input's stem with -tolerance.h5, in the current directory.
std::string DefaultOutput(const std::string& input) {
  return std::filesystem::path(input).stem().string() + "-tolerance.h5";
}

void RunTolerance(const ToleranceArgs& args) {
  if (args.failed_count && args.failures > 0) {
    BadOption("--failed-count", "it with --failures (two failure models)",
              "one of --failures P and --failed-count M");
  }
  const std::string output = args.output.empty() ? DefaultOutput(args.input) : args.output;
  RefuseInputAsOutput("--output", output, args.input);
  const auto t0 = std::chrono::steady_clock::now();
  ArrayDescription desc = ReadArrayDescription(args.input);
  // Under MPI (cli/scale_out.h) the other ranks compute their trials, silently.
  const bool lead = IsLeadProcess();
  const bool quiet = args.quiet || !lead;
  if (lead) PrintWarnings(desc.warnings);
  const double sigma_m =
      args.position.empty() ? 0.0 : PositionSigma_m(args.position, desc.array.wavelength_m());
  if (desc.ports.size() == desc.array.size()) {
    for (const Port& p : desc.ports) {
      if (p.kind != PortKind::kCurrent) {
        BadOption("ARRAY", "driven or loaded dipoles",
                  "current-forced dipoles: the study perturbs the terminal currents, and a "
                  "solved circuit would change with every error set");
      }
    }
  }
  if (args.failed_count && *args.failed_count >= desc.array.size()) {
    BadOption("--failed-count", std::to_string(*args.failed_count),
              "fewer than the array's " + std::to_string(desc.array.size()) + " elements");
  }

  ToleranceOptions o;
  o.trials = args.trials;
  o.seed = args.seed;
  o.errors.amplitude_sigma_db = args.amplitude_db;
  o.errors.phase_sigma_deg = args.phase_deg;
  o.errors.position_sigma_m = sigma_m;
  o.errors.failure_probability = args.failures;
  o.errors.failure_count = args.failed_count;
  o.pattern.field.num_threads = args.threads;
  o.pattern.field.method = *FieldMethodFromString(args.method);  // validated by CLI11
  ProgressBar bar(!quiet);
  o.progress = [&bar](double f) { bar.Update(f); };

  ToleranceTargets targets;
  if (desc.design) {
    if (desc.design->steering) targets.beam = desc.design->steering->direction;
    for (const DesignNull& n : desc.design->nulls)
      targets.protected_directions.push_back(
          UnitVectorAt(n.theta_deg * kDegree, n.phi_deg * kDegree));
  }
  const ToleranceResult study = RunToleranceSplit(desc.array, desc.currents, desc.grid, targets, o);
  bar.Finish();
  if (!lead) return;

  // The error-free result is a full result file (report, plot and export read it),
  // with its analysis, and the study under /tolerance.
  AnalysisOptions analysis_options;
  analysis_options.reference = AutoReference(study.baseline);
  const std::optional<PatternAnalysis> analysis =
      AnalyzeOrWarn(desc, study.baseline, analysis_options);
  ResultWriteOptions write_options;
  write_options.before_finish = [&](PatternFileWriter& w) {
    if (analysis) WriteAnalysis(w, *analysis, analysis_options);
    WriteTolerance(w, study, o, desc.array.wavelength_m());
  };
  WriteResult(output, desc.array, desc.currents, study.baseline, MetadataOf(desc), write_options);

  if (!args.plots_dir.empty()) {
    // The baseline as the file holds it; the statistics as written from memory.
    const StoredResult stored = ReadResult(output);
    const std::string stem = std::filesystem::path(output).stem().string();
    const std::string line = std::to_string(study.trials.size()) + " trials, seed " +
                             std::to_string(o.seed) + "; " +
                             o.errors.Describe(desc.array.wavelength_m());
    const std::filesystem::path dir(args.plots_dir);
    plot::WriteEnvelopePlot(stored, study, plot::EnvelopeCut(stored, study.beam_r_hat), line,
                            (dir / (stem + "-envelope.png")).string());
    schema::VisitTrialScalars<TrialFigures>([&](const schema::Dataset& d, const char* what,
                                                auto value) {
      // A count is the same in every trial: its histogram would say nothing.
      if (d.name() == "failed_elements" && o.errors.failure_probability == 0) return;
      std::vector<double> v;
      for (const TrialFigures& t : study.trials) v.push_back(value(t));
      plot::WriteHistogram(stored, v, value(study.baseline_figures), what,
                           d.units == "1" ? std::string(what)
                                          : std::string(what) + " (" + std::string(d.units) + ")",
                           line, (dir / (stem + "-" + std::string(d.name()) + ".png")).string());
    });
  }
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  if (!args.quiet) {
    std::fputs(text::DescribeTolerance(desc, study, o, output, wall).c_str(), stdout);
    std::fflush(stdout);
    std::fprintf(stderr, "%s\n", std::string(kSafetyLine).c_str());
  }
}

}  // namespace

void AddToleranceCommand(CLI::App& app) {
  auto args = std::make_shared<ToleranceArgs>();
  CLI::App* cmd = app.add_subcommand(
      "tolerance",
      "Monte Carlo tolerance study: K trials of random amplitude, phase and position errors "
      "and element failures on an array or design file; per-direction statistics of the "
      "directivity and per-trial beam directivity, side-lobe level, pointing error, "
      "radiated power and null depths, written to an HDF5 result file (/tolerance) with the "
      "error-free pattern.");
  cmd->add_option("ARRAY", args->input,
                  "Array description or design file (TOML; a design's [steer] is the beam "
                  "direction and its [[null]]s the protected directions)")
      ->required()
      ->check(ExistingInput("an array description (TOML)"));
  cmd->add_option("--trials", args->trials, "Number of trials K (error sets drawn)")
      ->capture_default_str()
      ->check(WholeNumberAtLeast(1, "trials"));
  cmd->add_option("--seed", args->seed,
                  "Seed (whole number): trial k's errors depend on (seed, k) only, whatever "
                  "the thread count")
      ->capture_default_str()
      ->check(WholeNumberAtLeast(0, "any seed"));
  cmd->add_option("--amplitude-db", args->amplitude_db,
                  "Amplitude error: |I| x 10^(x/20), x Gaussian with this standard deviation "
                  "(dB, 0 .. 20)")
      ->check(NumberIn(0, 20, "dB"));
  cmd->add_option("--phase-deg", args->phase_deg,
                  "Phase error: Gaussian with this standard deviation (deg, 0 .. 180)")
      ->check(NumberIn(0, 180, "deg"));
  cmd->add_option("--position", args->position,
                  "Position error: Gaussian per axis with this standard deviation; metres, or "
                  "with a unit: \"0.5 mm\", \"0.02 wavelength\" (m, cm, mm, wavelength)");
  cmd->add_option("--failures", args->failures,
                  "Each element fails open (current 0) with this probability, independently "
                  "(0 .. 0.99)")
      ->check(NumberIn(0, 0.99, ""));
  cmd->add_option("--failed-count", args->failed_count,
                  "Exactly this many elements fail open in every trial, uniformly chosen "
                  "(instead of --failures)")
      ->check(WholeNumberAtLeast(0, "elements"));
  cmd->add_option("-o,--output", args->output,
                  "Result file (HDF5): the error-free pattern and the study under /tolerance; "
                  "default: the array file's name with -tolerance.h5, in the current directory. "
                  "Written atomically; the folder must exist; '-' is refused (HDF5 is binary)")
      ->check(BinaryOutput("an HDF5 result"));
  cmd->add_option("--plots", args->plots_dir,
                  "Also write PNG plots into this folder (which must exist): the envelope (mean "
                  "directivity and percentile band along the phi plane through the beam) and a "
                  "histogram of each per-trial figure")
      ->check(OutputFolder());
  cmd->add_option("-t,--threads", args->threads,
                  "Threads for the field computation (count); 0 = all cores. The result does "
                  "not depend on it")
      ->check(WholeNumberAtLeast(0, "0 = all cores"));
  cmd->add_option("--method", args->method,
                  "Field method for every trial: direct, fast or auto (as compute)")
      ->check(OneOf(NamesOf({FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto})))
      ->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors (no summary, no safety line)");
  cmd->callback([args] { RunTolerance(*args); });
}

}  // namespace lobecast::cli
