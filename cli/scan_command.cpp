// `lobecast scan ARRAY.toml`: the scan impedance of a phased array, element by
// element, as the beam is steered along a plane.
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "cli/commands.h"
#include "cli/option_checks.h"
#include "cli/progress_bar.h"
#include "cli/text_output.h"
#include "engine/constants.h"
#include "engine/coupling/scan.h"
#include "engine/error.h"
#include "engine/sweep/scan_sweep.h"
#include "engine/synthesis/beam_setup.h"
#include "io/hdf5/scan_writer.h"
#include "io/input/array_reader.h"
#include "io/input_error.h"
#include "io/io_error.h"
#include "io/output_file.h"
#include "io/plot/canvas.h"
#include "io/plot/frame.h"
#include "io/plot/scan_plot.h"
#include "io/plot/sweep_plot.h"
#include "io/text/scan_text.h"
#include "io/text/text_format.h"

namespace lobecast::cli {
namespace {

struct ScanArgs {
  std::string input;
  std::string output;  // CSV; empty: none
  std::string plot;    // PNG, SVG or PDF; empty: none
  double phi_deg = 0;
  double theta_start_deg = 0;
  double theta_stop_deg = 60;
  double step_deg = 5;
  std::string match = "first";
  bool quiet = false;
  // The pattern at every steering angle (engine/sweep/scan_sweep.h).
  bool pattern = false;
  std::string pattern_csv;   // empty: none
  std::string pattern_plot;  // empty: none
  // Given on the command line, for the options that belong to the scan impedance.
  bool match_given = false;
};

// The pattern figures at every steering direction, as a table, a CSV and a plot.
void RunScanPattern(const ScanArgs& args, const ArrayDescription& desc,
                    const Eigen::VectorXcd& amplitudes, const std::vector<double>& theta,
                    const std::vector<double>& phi, bool quiet) {
  ScanSweepOptions options;
  std::string broadside = "+z";
  if (desc.design) {
    options.lattice = desc.design->lattice;
    options.broadside = UnsteeredBeam(desc.design->lattice, desc.array.dipoles.front().orientation);
    broadside =
        text::Printf("the lattice's broadside, theta %.4g deg, phi %.4g deg",
                     std::acos(options.broadside.z()) / kDegree,
                     WrappedDegrees(std::atan2(options.broadside.y(), options.broadside.x())));
  }
  ProgressBar bar(!args.quiet);
  options.progress = [&bar](double f) { bar.Update(f); };
  const ScanSweep sweep = RunScanSweep(desc.array, amplitudes, theta, phi, desc.grid, options);
  bar.Finish();
  if (!quiet) std::fputs(text::ScanPatternTable(sweep, broadside).c_str(), stdout);
  if (!args.pattern_csv.empty()) {
    WriteText(args.pattern_csv, "the scan pattern table",
              [&sweep](std::ostream& out) { out << text::ScanPatternCsv(sweep); });
    if (!quiet && args.pattern_csv != kStdout)
      std::printf("wrote        %s\n", args.pattern_csv.c_str());
  }
  if (!args.pattern_plot.empty()) {
    const std::string name =
        desc.name.empty() ? std::filesystem::path(args.input).stem().string() : desc.name;
    plot::WriteScanPatternPlot(sweep,
                               name + " - " + plot::FormatFrequency(desc.array.frequency_hz) +
                                   ", " + std::to_string(desc.array.size()) +
                                   (desc.array.size() == 1 ? " dipole" : " dipoles"),
                               broadside, args.pattern_plot);
    if (!quiet) std::printf("wrote        %s\n", args.pattern_plot.c_str());
  }
}

void RunScan(const ScanArgs& args) {
  for (const std::string* image : {&args.plot, &args.pattern_plot}) {
    if (!image->empty() && !plot::ImageFormatFromPath(*image)) {
      throw InputError(SourceLocation{image == &args.plot ? "--plot" : "--pattern-plot"},
                       "found '" + *image + "', expected a file name ending in .png, .svg or .pdf");
    }
  }
  const bool pattern = args.pattern || !args.pattern_csv.empty() || !args.pattern_plot.empty();
  if (args.output == kStdout && args.pattern_csv == kStdout)
    BadOption("--pattern-csv", "'-' with -o -", "standard output for one of the two tables");
  if (args.theta_stop_deg < args.theta_start_deg) {
    BadOption("--theta-stop",
              FormatBound(args.theta_stop_deg) + " deg, below --theta-start " +
                  FormatBound(args.theta_start_deg) + " deg",
              "--theta-start <= --theta-stop");
  }
  RefuseInputAsOutput("--output", args.output, args.input);
  RefuseInputAsOutput("--plot", args.plot, args.input);
  // An unwritable folder is found before the work.
  CheckTextOutput(args.output);
  if (!args.plot.empty()) CheckOutputWritable(args.plot);
  if (!args.pattern_csv.empty()) CheckTextOutput(args.pattern_csv);
  if (!args.pattern_plot.empty()) CheckOutputWritable(args.pattern_plot);
  RefuseInputAsOutput("--pattern-csv", args.pattern_csv, args.input);
  RefuseInputAsOutput("--pattern-plot", args.pattern_plot, args.input);
  ArrayDescription desc = ReadArrayDescription(args.input);
  PrintWarnings(desc.warnings);
  // The file's own circuit, solved once: Z with every element's self reactance (the
  // scan impedance is each element's input impedance, so none may be unknown) and
  // the currents whose magnitudes are the taper.
  CouplingOptions options;
  options.reference_impedance_ohm = desc.reference_impedance_ohm;
  const CouplingResult ref = SolveCoupling(desc.array, desc.ports, desc.wires, options);
  // With --pattern an array without wire data gets the pattern alone.
  bool impedance = true;
  for (Eigen::Index m = 0; m < ref.self_reactance_ohm.size(); ++m)
    impedance = impedance && !std::isnan(ref.self_reactance_ohm[m]);
  if (pattern && !impedance) {
    for (const auto& [given, option] :
         {std::pair{!args.output.empty(), "--output"}, std::pair{!args.plot.empty(), "--plot"},
          std::pair{args.match_given, "--match"}}) {
      if (given) {
        BadOption(option,
                  "it for an array without wire data (no radius or self_reactance: no scan "
                  "impedance)",
                  "--pattern-csv and --pattern-plot for the pattern figures");
      }
    }
  }
  for (Eigen::Index m = 0; m < ref.self_reactance_ohm.size() && !pattern; ++m) {
    if (std::isnan(ref.self_reactance_ohm[m])) {
      const SourceLocation& at = desc.dipole_locations[static_cast<std::size_t>(m)];
      // A generated dipole takes its wire from the design's [element] template.
      const bool generated = desc.design && at.line == desc.design->lattice_where.line &&
                             at.column == desc.design->lattice_where.column;
      if (generated) {
        throw InputError(desc.design->element_where, "element", "no self reactance",
                         "radius = <wire radius> (triangular current) or self_reactance = "
                         "<ohm> in [element]: the scan impedance is each element's input "
                         "impedance");
      }
      throw InputError(
          at, "dipole[" + std::to_string(m) + "]", "no self reactance",
          "radius = <wire radius> (triangular current) or self_reactance = <ohm> on every "
          "dipole: the scan impedance is each element's input impedance");
    }
  }
  // The taper: the magnitudes of the currents the file gives (or its circuit
  // solves); their phases are replaced by the steering. The input impedance
  // includes the wire's loss resistance.
  const Eigen::VectorXcd amplitudes = ref.circuit.current_a.cwiseAbs().cast<Complex>();
  std::vector<double> theta, phi;
  for (double t = args.theta_start_deg; t <= args.theta_stop_deg + 1e-9 * args.step_deg;
       t += args.step_deg) {
    theta.push_back(t * kDegree);
    phi.push_back(args.phi_deg * kDegree);
  }
  const bool to_stdout = args.output == kStdout || args.pattern_csv == kStdout;
  if (!impedance) {
    if (!args.quiet && !to_stdout) {
      std::printf("array        %s, %zu dipoles; taper |I| from the file, phases from steering\n",
                  desc.name.empty() ? args.input.c_str() : desc.name.c_str(), desc.array.size());
      std::printf(
          "scan         no wire data (radius or self_reactance): the pattern only, "
          "no scan impedance\n");
    }
    RunScanPattern(args, desc, amplitudes, theta, phi, args.quiet || to_stdout);
    return;
  }
  // Above the coupling limit the file's circuit was streamed (no matrix): so is
  // every scan direction's Z I (scan.h).
  const bool streamed = ref.impedance_ohm.size() == 0;
  Eigen::MatrixXcd z = ref.impedance_ohm;
  if (!streamed) z.diagonal().real() += ref.loss_resistance_ohm;
  Eigen::VectorXcd diagonal(ref.self_reactance_ohm.size());
  for (Eigen::Index m = 0; m < diagonal.size(); ++m)
    diagonal[m] = Complex(ref.loss_resistance_ohm[m], ref.self_reactance_ohm[m]);
  auto scan_table = [&](const std::vector<double>& th, const std::vector<double>& ph,
                        const Eigen::VectorXcd& reference_ohm) {
    return streamed ? ScanImpedanceStreamed(desc.array, diagonal, amplitudes, th, ph, reference_ohm)
                    : ScanImpedance(desc.array, z, amplitudes, th, ph, reference_ohm);
  };
  const auto n = static_cast<Eigen::Index>(desc.array.size());
  Eigen::VectorXcd reference = Eigen::VectorXcd::Constant(n, desc.reference_impedance_ohm);
  std::string reference_text =
      text::Printf("%g ohm (reference_impedance)", desc.reference_impedance_ohm);
  if (args.match == "first") {
    // Each element conjugate-matched to its own impedance at the first scan angle.
    reference = scan_table({theta.front()}, {phi.front()}, reference)
                    .active_impedance_ohm.row(0)
                    .transpose()
                    .conjugate();
    reference_text =
        text::Printf("each element's conjugate match at theta %g deg (power waves, Kurokawa 1965)",
                     args.theta_start_deg);
  }
  const ScanImpedanceTable table = scan_table(theta, phi, reference);
  // With -o -, standard output is the CSV alone; the table and "wrote" lines go away.
  const bool csv_to_stdout = to_stdout;
  const bool quiet = args.quiet || csv_to_stdout;
  if (!quiet) {
    std::printf("array        %s, %zu dipoles; taper |I| from the file, phases from steering\n",
                desc.name.empty() ? args.input.c_str() : desc.name.c_str(), desc.array.size());
    std::fputs(text::ScanTable(table, reference_text).c_str(), stdout);
  }
  const bool h5 = std::filesystem::path(args.output).extension() == ".h5";
  if (h5) {
    ScanFileInfo info;
    info.frequency_hz = desc.array.frequency_hz;
    info.name = desc.name;
    info.reference = reference_text;
    info.input_text = desc.source_text;
    WriteScanFile(args.output, table, info);
    if (!quiet) std::printf("wrote        %s\n", args.output.c_str());
  } else if (!args.output.empty()) {
    WriteText(args.output, "the scan table",
              [&table](std::ostream& out) { out << text::ScanCsv(table); });
    if (!quiet) std::printf("wrote        %s\n", args.output.c_str());
  }
  if (!args.plot.empty()) {
    plot::ScanPlotLabels labels;
    labels.array_name =
        desc.name.empty() ? std::filesystem::path(args.input).stem().string() : desc.name;
    labels.frequency_hz = desc.array.frequency_hz;
    labels.reference = reference_text;
    plot::WriteScanPlot(table, labels, args.plot);
    if (!quiet) std::printf("wrote        %s\n", args.plot.c_str());
  }
  if (pattern) RunScanPattern(args, desc, amplitudes, theta, phi, quiet);
}

}  // namespace

void AddScanCommand(CLI::App& app) {
  auto args = std::make_shared<ScanArgs>();
  CLI::App* cmd = app.add_subcommand(
      "scan",
      "Scan impedance: steer the array's beam (phase steering, the file's current magnitudes "
      "as taper) along the plane phi = --phi from --theta-start to --theta-stop, and print "
      "each element's active reflection coefficient |Gamma| against the reference impedance "
      "(every dipole needs a radius or a reactance).");
  cmd->add_option("ARRAY", args->input,
                  "Array description or design file (TOML; a design has a [lattice] table)")
      ->required()
      ->check(ExistingInput("an array description (TOML)"));
  cmd->add_option("-o,--output", args->output,
                  "CSV table (theta_deg, phi_deg, element, active impedance in ohm, |Gamma|, "
                  "phase, VSWR), or with a .h5 name an HDF5 file (/scan: the active impedance "
                  "and reflection per angle and element); written atomically; '-': the CSV "
                  "on standard output (and nothing else there)")
      ->check(TextOutput());
  cmd->add_option("--plot", args->plot,
                  "|Gamma| against scan angle, one line per element (.png, .svg or .pdf), "
                  "written atomically")
      ->check(BinaryOutput("an image"));
  cmd->add_option("--phi", args->phi_deg, "Scan plane: azimuth phi (deg)")->capture_default_str();
  cmd->add_option("--theta-start", args->theta_start_deg, "First scan angle theta (deg)")
      ->check(NumberIn(0.0, 180.0, "deg"))
      ->capture_default_str();
  cmd->add_option("--theta-stop", args->theta_stop_deg, "Last scan angle theta (deg)")
      ->check(NumberIn(0.0, 180.0, "deg"))
      ->capture_default_str();
  cmd->add_option("--step", args->step_deg, "Scan step (deg)")
      ->check(NumberIn(1e-3, 180.0, "deg"))
      ->capture_default_str();
  cmd->add_option("--match", args->match,
                  "What Gamma is measured against: first (each element conjugate-matched at "
                  "the first scan angle: shows the mismatch scanning adds) or reference (the "
                  "file's real reference_impedance)")
      ->check(OneOf({"first", "reference"}))
      ->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but warnings and errors");
  cmd->add_flag("--pattern", args->pattern,
                "Also compute the pattern (on the file's grid) at every steering angle and "
                "print its figures: peak directivity (dBi), scan loss re broadside (dB), beam "
                "direction and pointing error (deg), half-power beamwidths (deg), side-lobe "
                "level (dB) and, for a design's lattice, grating lobes and their onset. "
                "Needs no wire data: without it the pattern figures come alone");
  cmd->add_option("--pattern-csv", args->pattern_csv,
                  "The pattern figures as CSV, one row per steering angle (implies --pattern); "
                  "written atomically; '-': standard output")
      ->check(TextOutput());
  cmd->add_option("--pattern-plot", args->pattern_plot,
                  "The pattern figures against steering angle (.png, .svg or .pdf; implies "
                  "--pattern), the grating-lobe onset marked")
      ->check(BinaryOutput("an image"));
  cmd->callback([args, cmd] {
    args->match_given = cmd->get_option("--match")->count() > 0;
    RunScan(*args);
  });
}

}  // namespace lobecast::cli
