// `lobecast compute ARRAY.toml [-o RESULT.h5]`: the main job.
#include <algorithm>
#include <chrono>
#include <cmath>
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
#include "cli/run_limits.h"
#include "cli/scale_out.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/error.h"
#include "engine/pattern.h"
#include "engine/pattern_stream.h"
#include "engine/sweep/frequency_sweep.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/analysis_writer.h"
#include "io/hdf5/coupling_writer.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "io/hdf5/schema.h"
#include "io/hdf5/sweep_reader.h"
#include "io/hdf5/sweep_writer.h"
#include "io/input/array_reader.h"
#include "io/input/solve_circuit.h"
#include "io/output_file.h"
#include "io/plot/plot.h"
#include "io/plot/sweep_plot.h"
#include "io/safety_note.h"
#include "io/text/coupling_text.h"
#include "io/text/report_text.h"
#include "io/text/summary_text.h"
#include "io/text/sweep_text.h"
#include "io/text/text_format.h"

namespace lobecast::cli {
namespace {

struct ComputeArgs {
  std::string input;
  std::string output;
  int threads = 0;
  bool quiet = false;
  std::string method = "auto";
  double tolerance = 1e-9;
  bool resistance_matrix = false;
  std::string plots_dir;           // empty: no plots
  std::string reference = "auto";  // for the stored analysis
  bool no_analysis = false;
  // Given on the command line (not just defaulted), for the options that only
  // apply to some runs.
  bool tolerance_given = false;
  bool reference_given = false;
  std::size_t max_nulls = AnalysisOptions{}.max_nulls;
  std::string power_method = "auto";
  double power_tolerance = PowerQuadratureOptions{}.target_relative;
  bool power_tolerance_given = false;
  RunLimits limits;
  bool stream = false;  // --stream
};

// Refuses options that do not apply to what was asked (exit 2, before any work).
void RefuseInapplicable(const ComputeArgs& args) {
  if (args.tolerance_given && args.method == ToString(FieldMethod::kDirect)) {
    BadOption("--tolerance", "it with --method direct (the exact sum has no tolerance)",
              "--tolerance only with --method fast or auto");
  }
  if (args.resistance_matrix && args.power_method == ToString(PowerMethod::kQuadrature)) {
    BadOption("--resistance-matrix", "it with --power-method quadrature (which builds no matrix)",
              "--resistance-matrix only with --power-method closed or auto");
  }
  if (args.power_tolerance_given && args.power_method == ToString(PowerMethod::kClosed)) {
    BadOption("--power-tolerance", "it with --power-method closed (the closed form has none)",
              "--power-tolerance only with --power-method quadrature or auto");
  }
  if (args.reference_given && args.no_analysis) {
    BadOption("--reference", "it with --no-analysis (no analysis to take a reference)",
              "one of --reference and --no-analysis");
  }
}

// RESULT defaults to the input's stem with .h5, in the current directory.
std::string DefaultOutput(const std::string& input) {
  return std::filesystem::path(input).stem().string() + ".h5";
}

// How the file describes the sweep's excitation.
SweepFileInfo SweepInfoOf(const ArrayDescription& desc,
                          const std::optional<CouplingResult>& coupling) {
  SweepFileInfo info;
  if (desc.design && desc.design->steering) info.steering = ToString(desc.design->steering->mode);
  info.coupled = coupling.has_value();
  if (coupling) info.gain_definition = RealizedGainReferenceOf(*coupling).definition;
  return info;
}

// Every frequency of the description, the design one (already computed) first. The
// progress bar covers the whole sweep; a line per frequency would drown short ones.
FrequencySweep RunSweep(const ArrayDescription& desc, const PatternResult& result,
                        const PatternAnalysis* analysis, const CouplingResult* coupling,
                        const PatternOptions& options, const AnalysisOptions& analysis_options,
                        bool quiet) {
  SweepExcitation excitation;
  excitation.design_currents_a = desc.currents;
  if (desc.design && desc.design->steering) {
    excitation.steering = desc.design->steering;
    excitation.steered_first = desc.design->first_generated;
    excitation.steered_count = desc.design->generated;
  }
  excitation.coupled = coupling != nullptr;
  excitation.ports = desc.ports;
  excitation.wires = desc.wires;
  excitation.coupling.reference_impedance_ohm = desc.reference_impedance_ohm;
  excitation.coupling.num_threads = options.field.num_threads;
  excitation.coupling.force_matrix = options.store_resistance_matrix;
  SweepOptions sweep_options;
  sweep_options.pattern = options;
  sweep_options.analysis = analysis_options;
  ProgressBar bar(!quiet);
  sweep_options.progress = [&bar](std::size_t, double f) { bar.Update(f); };
  try {
    FrequencySweep sweep =
        RunFrequencySweepSplit(desc.array, desc.frequencies_hz, excitation, desc.grid,
                               sweep_options, DesignPoint{&result, analysis, coupling});
    bar.Finish();
    return sweep;
  } catch (const InvalidArgument& e) {
    bar.Finish();
    throw InputError(SourceLocation{desc.source_path, 1, 1},
                     std::string("frequency sweep rejected: ") + e.what());
  }
}

// ---- Streaming: the grid in blocks of theta rows straight into the file ----

// Why a run streams: "" (in memory), "--stream", or the in-memory estimate above
// the memory limit. What cannot stream yet is refused when asked, and left to the
// memory limit's refusal when not.
std::string WhyStream(const ComputeArgs& args, const ArrayDescription& desc,
                      const RunEstimate& in_memory) {
  std::string why;
  const double limit = MemoryLimitBytes(args.limits);
  if (args.stream) {
    why = "asked: --stream";
  } else if (limit > 0 && in_memory.memory_bytes > limit) {
    why = text::Printf("the in-memory estimate of %.3g GB is above the memory limit of %.3g GB",
                       in_memory.memory_bytes / 1e9, limit / 1e9);
  } else {
    return "";
  }
  const auto cannot = [&](const char* option, const char* what) {
    if (!args.stream) return std::string();  // the memory limit refuses it instead
    BadOption("--stream", std::string("it with ") + what,
              std::string("--stream without ") + option);
  };
  if (!args.plots_dir.empty()) return cannot("--plots", "--plots (plots read the whole grid)");
  if (!desc.frequencies_hz.empty()) {
    return cannot("a frequency sweep",
                  "a frequency sweep ('frequencies': every frequency in memory)");
  }
  if (ProcessCount() > 1) {
    return cannot("mpirun",
                  "more than one MPI process (a streamed result is written by one "
                  "process as its blocks are finished)");
  }
  if (NeedsCoupling(desc.ports, desc.wires)) {
    return cannot("a port circuit",
                  "a port circuit (drive, load or wire keys: its gain table is written whole)");
  }
  return why;
}

// The streamed compute: each finished block of rows goes to the file and to the
// analysis' view (engine/pattern_stream.h), then is dropped; the file appears
// under its name only when complete (PatternFileWriter, io/output_file.h).
void RunStreamed(const ComputeArgs& args, const ArrayDescription& desc,
                 const PatternOptions& options, const std::string& why, const std::string& output,
                 std::chrono::steady_clock::time_point t0) {
  ProgressBar bar(!args.quiet);
  PatternOptions with_bar = options;
  with_bar.progress = [&bar](double f) { bar.Update(f); };
  PatternFileWriter writer(output, desc.array, desc.currents, desc.grid, MetadataOf(desc));
  PatternSampler sampler(desc.grid, kStreamViewDirections);
  const PatternResult header = ComputePatternBlocks(
      desc.array, desc.currents, desc.grid, with_bar,
      [&](std::size_t first_row, const PatternResult& rows) {
        writer.WriteRows(first_row, RowsOf(rows, 0, rows.grid.theta_deg.size()));
        sampler.Add(first_row, rows);
      });
  bar.Finish();
  WriteResultTail(writer, header);
  writer.WriteStringAttribute(std::string(schema::kSummaryGroup),
                              std::string(schema::kStreamedAttribute), why);

  std::optional<PatternAnalysis> analysis;
  AnalysisOptions analysis_options;
  // The summary's text reads the view (it holds the peak), so it is built with or
  // without an analysis.
  const PatternResult view = sampler.Finish(desc.array, desc.currents, header, options.field);
  const std::string seen =
      sampler.stride() == 1
          ? std::string("the whole streamed grid")
          : text::Printf(
                "a 1-in-%zu sub-grid of the streamed grid (%zu theta x %zu phi, with the "
                "peak's row and column), refined exactly",
                sampler.stride(), view.grid.theta_deg.size(), view.grid.phi_deg.size());
  if (!args.no_analysis) {
    const auto ref = ParseReference(args.reference);
    analysis_options.reference = ref ? *ref : AutoReference(view);
    analysis_options.max_nulls = args.max_nulls;
    analysis = AnalyzeOrWarn(desc, view, analysis_options);
    if (analysis) {
      WriteAnalysis(writer, *analysis, analysis_options);
      writer.WriteStringAttribute(std::string(schema::kAnalysisGroup),
                                  std::string(schema::kAnalysisGridAttribute),
                                  "analysis on " + seen);
    }
  }
  writer.Finish();
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  if (!args.quiet) {
    std::fputs(text::DescribeResult(desc, view, output, wall, &desc.grid).c_str(), stdout);
    std::printf("streamed     to the file in blocks of theta rows as they were finished (%s)\n",
                why.c_str());
    if (analysis) {
      std::printf("analysis on  %s\n", seen.c_str());
      std::fputs(text::AnalysisBrief(*analysis).c_str(), stdout);
    }
    std::fflush(stdout);
    std::fprintf(stderr, "%s\n", std::string(kSafetyLine).c_str());
  }
}

void RunCompute(const ComputeArgs& args) {
  RefuseInapplicable(args);
  RefuseInputAsOutput("--output", args.output.empty() ? DefaultOutput(args.input) : args.output,
                      args.input);
  // Under MPI (cli/scale_out.h) the other ranks compute their theta rows, silently;
  // rank 0 alone writes (the output folder need exist on its host only).
  const bool lead = IsLeadProcess();
  const bool quiet = args.quiet || !lead;
  // An unwritable folder is found before the work, not after it.
  if (lead) CheckOutputWritable(args.output.empty() ? DefaultOutput(args.input) : args.output);
  if (lead && !args.plots_dir.empty()) CheckFolderWritable(args.plots_dir);
  const auto t0 = std::chrono::steady_clock::now();
  ArrayDescription desc = ReadArrayDescription(args.input);
  if (lead) PrintWarnings(desc.warnings);
  RunSize size;
  size.dipoles = desc.array.size();
  size.ground = desc.array.ground;
  size.directions = desc.grid.size();
  size.method = *FieldMethodFromString(args.method);  // validated by CLI11
  size.resistance_matrix =
      args.resistance_matrix || size.dipoles <= PatternOptions{}.resistance_matrix_max_dipoles;
  size.threads = args.threads;
  PatternOptions options;
  options.field.num_threads = args.threads;
  options.field.method = *FieldMethodFromString(args.method);  // validated by CLI11
  options.field.tolerance_relative = args.tolerance;
  options.store_resistance_matrix = args.resistance_matrix;
  options.power_method = *PowerMethodFromString(args.power_method);  // validated by CLI11
  options.power_quadrature.target_relative = args.power_tolerance;
  // Priced at the routes the job will take (the quadrature, the fast path), once.
  RoutePrices prices = PriceRoutes(desc.array, desc.grid, options);
  if (!args.no_analysis) prices.analysis_bytes = PatternProbe::SearchBytes(desc.array);
  const std::string stream_why = WhyStream(args, desc, EstimateRun(size, prices));
  size.streamed = !stream_why.empty();
  CheckRunLimits(EstimateRun(size, prices), args.limits, args.input, quiet);
  const std::string output = args.output.empty() ? DefaultOutput(args.input) : args.output;
  if (lead && size.streamed) {
    CheckOutputFits(output,
                    EstimatedResultBytes(size.dipoles, size.directions, size.resistance_matrix),
                    "the streamed result");
  }
  // A large array's circuit is solved iteratively: the bar follows the residual's
  // digits toward the target (engine/coupling/iterative_circuit.h).
  ProgressBar solve_bar(!quiet);
  const double solve_digits = -std::log10(IterativeCircuitOptions{}.target_relative_residual);
  const std::optional<CouplingResult> coupling = SolveArrayCircuit(
      desc, args.threads, args.resistance_matrix, [&, done = 0.0](int, double residual) mutable {
        done = std::max(done, std::clamp(-std::log10(residual) / solve_digits, 0.0, 1.0));
        solve_bar.Update(done);
      });
  solve_bar.Finish();

  if (lead) StopForTestAt("compute");  // test hook (io/output_file.h)
  if (size.streamed) return RunStreamed(args, desc, options, stream_why, output, t0);
  ProgressBar bar(!quiet);
  options.progress = [&bar](double f) { bar.Update(f); };
  const PatternResult result = ComputePatternSplit(desc.array, desc.currents, desc.grid, options);
  bar.Finish();

  // The pattern analysis goes into the file (/summary/analysis), so `report` needs
  // no recomputation. A failed analysis costs the analysis, not the result.
  // Under MPI only rank 0 holds the whole result: it analyses (the sweep's split
  // takes its polarization reference) and writes.
  std::optional<PatternAnalysis> analysis;
  AnalysisOptions analysis_options;
  if (!args.no_analysis) {
    const auto ref = ParseReference(args.reference);
    analysis_options.reference = ref    ? *ref
                                 : lead ? AutoReference(result)
                                        : PolarizationReference{};
    analysis_options.max_nulls = args.max_nulls;
    if (lead) analysis = AnalyzeOrWarn(desc, result, analysis_options);
  }

  // A frequency sweep (`frequencies`): the design frequency above, then the others.
  std::optional<FrequencySweep> sweep;
  if (!desc.frequencies_hz.empty()) {
    sweep = RunSweep(desc, result, analysis ? &*analysis : nullptr, coupling ? &*coupling : nullptr,
                     options, analysis_options, quiet);
  }
  if (!lead) return;  // the file and the text: rank 0

  const ResultMetadata meta = MetadataOf(desc);
  ResultWriteOptions write_options;
  if (analysis || coupling || sweep) {
    write_options.before_finish = [&](PatternFileWriter& w) {
      if (coupling) WriteCoupling(w, *coupling, desc.ports, result);
      if (analysis) WriteAnalysis(w, *analysis, analysis_options);
      if (sweep) WriteSweep(w, *sweep, desc.grid, SweepInfoOf(desc, coupling));
    };
  }
  WriteResult(output, desc.array, desc.currents, result, meta, write_options);
  if (!args.plots_dir.empty()) {
    // Drawn from the file just written, so the plots show exactly what it holds.
    std::vector<std::string> skipped;
    const std::optional<StoredAnalysis> stored = ReadAnalysis(output);
    plot::WriteStandardPlots(ReadResult(output), stored ? &stored->analysis : nullptr,
                             args.plots_dir, std::filesystem::path(output).stem().string(),
                             &skipped);
    for (const std::string& s : skipped) PrintWarnings({"plot skipped: " + s});
    // A sweep adds its figures against frequency, "<stem>-sweep.png".
    if (sweep) {
      const std::string stem = std::filesystem::path(output).stem().string();
      plot::WriteSweepPlot(
          ReadResult(output), *ReadSweep(output),
          (std::filesystem::path(args.plots_dir) / (stem + "-sweep.png")).string());
    }
  }
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  if (!args.quiet) {
    std::fputs(text::DescribeResult(desc, result, output, wall).c_str(), stdout);
    if (coupling) {
      std::fputs(
          text::DescribeCoupling(*coupling, desc.ports, result.summary.peak_directivity).c_str(),
          stdout);
    }
    if (analysis) std::fputs(text::AnalysisBrief(*analysis).c_str(), stdout);
    if (sweep) {
      const SweepFileInfo info = SweepInfoOf(desc, coupling);
      StoredSweep table;
      table.points = sweep->points;
      table.design_frequency_hz = desc.array.frequency_hz;
      table.steering = std::string(info.steering);
      table.coupled = info.coupled;
      std::fputs(text::SweepTable(table).c_str(), stdout);
    }
    std::fflush(stdout);
    // The full note is in the file (root attribute safety_note) and the report.
    std::fprintf(stderr, "%s\n", std::string(kSafetyLine).c_str());
  }
}

}  // namespace

void AddComputeCommand(CLI::App& app) {
  auto args = std::make_shared<ComputeArgs>();
  CLI::App* cmd = app.add_subcommand(
      "compute",
      "Compute the far field rE (V), intensity (W/sr), directivity, polarization, radiated "
      "power (W) and resistances (ohm) of an array description on its grid, and write them "
      "to an HDF5 result file. A file with 'frequencies' is a frequency sweep: every frequency "
      "is computed and analysed (peak, squint, beamwidths, side-lobe level) into /sweep, the "
      "first (design) frequency into the usual datasets.");
  cmd->add_option("ARRAY", args->input,
                  "Array description or design file (TOML; a design has a [lattice] table)")
      ->required()
      ->check(ExistingInput("an array description (TOML)"));
  cmd->add_option("-o,--output", args->output,
                  "Result file (HDF5); default: the array file's name with .h5, in the "
                  "current directory. Written atomically: a failed run leaves it untouched. "
                  "The folder must exist; '-' is refused (HDF5 is binary)")
      ->check(BinaryOutput("an HDF5 result"));
  cmd->add_option("-t,--threads", args->threads,
                  "Threads for the field computation (count); 0 = all cores")
      ->check(WholeNumberAtLeast(0, "0 = all cores"));
  cmd->add_option("--method", args->method,
                  "Field method: direct (exact sum over every dipole-direction pair), fast "
                  "(non-uniform FFT, accurate to --tolerance of the pattern peak; a lattice "
                  "transform when the elements sit on a regular grid) or auto (fast only "
                  "where it is clearly cheaper)")
      ->check(OneOf(NamesOf({FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto})))
      ->capture_default_str();
  CLI::Option* tolerance =
      cmd->add_option("--tolerance", args->tolerance,
                      "Fast method: error allowed in rE, relative to the pattern's peak |rE| "
                      "(1e-14 .. 0.01); refused with --method direct")
          ->check(NumberIn(1e-14, 1e-2, ""))
          ->capture_default_str();
  cmd->add_flag("--resistance-matrix", args->resistance_matrix,
                "Store the N x N mutual resistance matrix (ohm) even above 4096 dipoles, "
                "where it is otherwise streamed (8 N^2 bytes); with a circuit, the impedance "
                "matrix too (16 N^2 bytes), which driven and loaded ports need above 4096");
  cmd->add_option("--power-method", args->power_method,
                  "Radiated power: closed (the closed-form sum over dipole pairs, O(N^2), with "
                  "the active resistances), quadrature (over directions, exact for the "
                  "pattern's band limit to --power-tolerance, through the fast field path; no "
                  "active resistances) or auto (the closed form unless it would take seconds "
                  "and the quadrature is well below it)")
      ->check(OneOf(NamesOf({PowerMethod::kClosed, PowerMethod::kQuadrature, PowerMethod::kAuto})))
      ->capture_default_str();
  CLI::Option* power_tolerance =
      cmd->add_option("--power-tolerance", args->power_tolerance,
                      "Quadrature power: the error aimed at, relative to P (1e-14 .. 0.01); the "
                      "bound met is reported; refused with --power-method closed")
          ->check(NumberIn(1e-14, 1e-2, ""))
          ->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors (no summary, no safety line)");
  cmd->add_option("--plots", args->plots_dir,
                  "Also write a standard set of PNG plots into this folder (which must exist): "
                  "polar cuts in the two principal planes of the analysis through the beam (phi = "
                  "0 and 90 deg "
                  "without an analysis) and a theta-phi directivity map (dBi); for a sweep also "
                  "its figures against frequency")
      ->check(OutputFolder());
  CLI::Option* reference =
      cmd->add_option("--reference", args->reference,
                      std::string(kReferenceHelp) + "; for the analysis stored in the file")
          ->check(OneOf(ReferenceNames(), true));
  cmd->add_option("--max-nulls", args->max_nulls,
                  "List at most N null loci in the stored analysis (cones first, then the "
                  "deepest)")
      ->capture_default_str()
      ->check(WholeNumberAtLeast(1, "null loci"));
  AddRunLimitOptions(cmd, args->limits);
  cmd->add_flag("--stream", args->stream,
                "Compute the grid in blocks of theta rows, each written to the result file as "
                "it is finished (memory: a block and the array, not the grid); the analysis "
                "sees a sub-grid of at most 2^18 directions plus the peak's row and column, "
                "refined exactly. Chosen by itself when the in-memory estimate is above the "
                "memory limit. Refused with --plots, a frequency sweep or driven/loaded ports; "
                "a result that would not fit on the disk is refused before the work");
  cmd->add_flag("--no-analysis", args->no_analysis,
                "Skip the pattern analysis (beams, lobes, nulls, polarization purity) that "
                "is otherwise stored under /summary/analysis");
  cmd->callback([args, tolerance, reference, power_tolerance] {
    args->tolerance_given = tolerance->count() > 0;
    args->power_tolerance_given = power_tolerance->count() > 0;
    args->reference_given = reference->count() > 0;
    RunCompute(*args);
  });
}

}  // namespace lobecast::cli
