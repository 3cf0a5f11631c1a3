// `lobecast report RESULT.h5`: the pattern analysis of a result file as a table (or
// JSON). The analysis that `compute` stored under /summary/analysis is shown as is;
// it is recomputed from the stored array and field, exactly through the engine, when
// the file has none or the options ask for something else (another reference,
// threshold or null field, protected directions, --recompute).
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
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/sweep_reader.h"
#include "io/text/coupling_text.h"
#include "io/text/report_text.h"
#include "io/text/summary_text.h"
#include "io/text/sweep_text.h"

namespace lobecast::cli {
namespace {

struct ReportArgs {
  std::string input;
  bool json = false;
  std::string reference;  // empty: as stored (auto when recomputing)
  std::vector<std::string> toward;
  std::optional<double> side_lobe_threshold_db;
  std::optional<double> null_threshold_db;
  std::optional<std::size_t> max_nulls;
  std::string null_field;  // empty: as stored
  bool recompute = false;
  std::string output;  // empty or "-": standard output
  bool quiet = false;
};

void RunReport(const ReportArgs& args) {
  RefuseInputAsOutput("--output", args.output, args.input);
  CheckTextOutput(args.output);  // an unwritable folder is found before the work
  const StoredResult stored = ReadResult(args.input);
  const std::optional<StoredAnalysis> saved = ReadAnalysis(args.input);

  AnalysisOptions options = saved ? saved->options : AnalysisOptions{};
  bool recompute = !saved || args.recompute;
  auto set = [&recompute](auto& field, const auto& value) {
    if (!(field == value)) recompute = true;
    field = value;
  };
  if (!args.reference.empty()) {
    const auto ref = ParseReference(args.reference);
    set(options.reference, ref ? *ref : AutoReference(stored.result));
  } else if (!saved) {
    options.reference = AutoReference(stored.result);
  }
  for (const auto& [option, value] :
       {std::pair{"--side-lobe-threshold", args.side_lobe_threshold_db},
        std::pair{"--null-threshold", args.null_threshold_db}}) {
    if (value && !(std::isfinite(*value) && *value < 0)) {
      BadOption(option, FormatBound(*value) + " dB", "a level below 0 dB (re the peak), e.g. -30");
    }
  }
  if (args.side_lobe_threshold_db)
    set(options.side_lobe_threshold_db, *args.side_lobe_threshold_db);
  if (args.null_threshold_db) set(options.null_threshold_db, *args.null_threshold_db);
  if (args.max_nulls) set(options.max_nulls, *args.max_nulls);
  if (!args.null_field.empty()) {
    const auto f = NullFieldFromString(args.null_field);
    if (!f) {
      BadOption("--null-field", "'" + args.null_field + "'",
                JoinAlternatives(NamesOf({NullField::kTotal, NullField::kCoPolar})));
    }
    set(options.null_field, *f);
  }
  if (!args.toward.empty()) {
    std::vector<std::pair<double, double>> dirs;
    for (const std::string& t : args.toward) {
      const auto d = ParseAnglePair(t, "--toward", "THETA,PHI in deg, e.g. 90,45");
      if (!(d.first >= 0 && d.first <= 180)) {
        BadOption("--toward", "'" + t + "'", "a theta within 0 .. 180 deg");
      }
      dirs.push_back(d);
    }
    set(options.protected_directions_deg, dirs);
  }
  std::string why;
  if (!options.IsValid(&why)) throw InvalidArgument(why);

  const PatternAnalysis analysis =
      recompute ? AnalyzePattern(stored.array, stored.currents, stored.result, options)
                : saved->analysis;
  text::ReportContext context;
  context.result_path = args.input;
  context.array_name = stored.metadata.name;
  context.frequency_hz = stored.array.frequency_hz;
  context.ground = stored.array.ground;
  context.num_dipoles = stored.array.size();
  context.recomputed = recompute;
  context.field_floor_v = stored.result.field_floor_v;
  context.power_significant_digits = stored.result.summary.power_significant_digits;
  // Driven and loaded dipoles: the circuit as compute printed it.
  const std::optional<StoredCoupling> coupling =
      ReadCoupling(args.input, stored.array, stored.currents);
  if (coupling) {
    context.coupling = &coupling->result;
    context.ports = &coupling->ports;
  }
  // A frequency sweep: its per-frequency table after the design frequency's report.
  const std::optional<StoredSweep> sweep = ReadSweep(args.input);
  if (sweep) context.sweep = &*sweep;
  std::string text = args.json ? text::ReportJson(context, analysis, options)
                               : text::ReportText(context, analysis, options);
  if (!args.json) {
    if (coupling) {
      text += "\n" + text::DescribeCoupling(coupling->result, coupling->ports,
                                            stored.result.summary.peak_directivity);
    }
    if (sweep) text += "\n" + text::SweepTable(*sweep);
    // A report is a document: it carries the full note, to a file or the terminal.
    text += "\n" + text::SafetyNote();
  }
  WriteText(args.output, "the report", [&text](std::ostream& out) { out << text; });
}

}  // namespace

void AddReportCommand(CLI::App& app) {
  auto args = std::make_shared<ReportArgs>();
  CLI::App* cmd = app.add_subcommand(
      "report",
      "Print the pattern analysis of a result file: refined peak (dBi), half-power and "
      "first-null beamwidths in both principal planes (deg), front-to-back (dB), side lobes, "
      "nulls, field toward protected directions, XPD and axial ratio (dB).");
  cmd->add_option("RESULT", args->input, "Result file (HDF5) written by compute")
      ->required()
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the table");
  cmd->add_option("-o,--output", args->output,
                  "Write the report (or JSON) to this file, atomically; default or '-': "
                  "standard output")
      ->check(TextOutput());
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors besides the report itself");
  cmd->add_option("--reference", args->reference,
                  std::string(kReferenceHelp) + " (default: the one stored by compute)")
      ->check(OneOf(ReferenceNames(), true));
  cmd->add_option("--toward", args->toward,
                  "THETA,PHI (deg): report the exact field toward this protected direction; "
                  "repeatable")
      ->take_all();
  cmd->add_option("--side-lobe-threshold", args->side_lobe_threshold_db,
                  "List side lobes at or above this level (dB relative to the peak; default "
                  "-30)");
  cmd->add_option("--null-threshold", args->null_threshold_db,
                  "List nulls below this level (dB relative to the peak; default -40)");
  cmd->add_option("--max-nulls", args->max_nulls,
                  "List at most N null loci (cones first, then the deepest; default 64)")
      ->check(WholeNumberAtLeast(1, "null loci"));
  cmd->add_option("--null-field", args->null_field,
                  "Field the nulls are nulls of: total or co (co-polar for --reference)");
  cmd->add_flag("--recompute", args->recompute,
                "Recompute the analysis from the stored array and field even when the file "
                "holds one");
  cmd->callback([args] { RunReport(*args); });
}

}  // namespace lobecast::cli
