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
#include "cli/text_output.h"
#include "engine/coupling/scan.h"
#include "engine/error.h"
#include "io/hdf5/scan_writer.h"
#include "io/input/array_reader.h"
#include "io/input_error.h"
#include "io/io_error.h"
#include "io/output_file.h"
#include "io/plot/canvas.h"
#include "io/plot/scan_plot.h"
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
};

void RunScan(const ScanArgs& args) {
  if (!args.plot.empty() && !plot::ImageFormatFromPath(args.plot)) {
    throw InputError(
        SourceLocation{"--plot"},
        "found '" + args.plot + "', expected a file name ending in .png, .svg or .pdf");
  }
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
  ArrayDescription desc = ReadArrayDescription(args.input);
  PrintWarnings(desc.warnings);
  // The file's own circuit, solved once: Z with every element's self reactance (the
  // scan impedance is each element's input impedance, so none may be unknown) and
  // the currents whose magnitudes are the taper.
  CouplingOptions options;
  options.reference_impedance_ohm = desc.reference_impedance_ohm;
  const CouplingResult ref = SolveCoupling(desc.array, desc.ports, desc.wires, options);
  for (Eigen::Index m = 0; m < ref.self_reactance_ohm.size(); ++m) {
    if (std::isnan(ref.self_reactance_ohm[m])) {
      throw InputError(
          desc.dipole_locations[static_cast<std::size_t>(m)], "dipole[" + std::to_string(m) + "]",
          "no self reactance",
          "radius = <wire radius> (triangular current) or self_reactance = <ohm> on every "
          "dipole: the scan impedance is each element's input impedance");
    }
  }
  // The taper: the magnitudes of the currents the file gives (or its circuit
  // solves); their phases are replaced by the steering. The input impedance
  // includes the wire's loss resistance.
  const Eigen::VectorXcd amplitudes = ref.circuit.current_a.cwiseAbs().cast<Complex>();
  Eigen::MatrixXcd z = ref.impedance_ohm;
  z.diagonal().real() += ref.loss_resistance_ohm;
  std::vector<double> theta, phi;
  for (double t = args.theta_start_deg; t <= args.theta_stop_deg + 1e-9 * args.step_deg;
       t += args.step_deg) {
    theta.push_back(t * kDegree);
    phi.push_back(args.phi_deg * kDegree);
  }
  const auto n = static_cast<Eigen::Index>(desc.array.size());
  Eigen::VectorXcd reference = Eigen::VectorXcd::Constant(n, desc.reference_impedance_ohm);
  std::string reference_text =
      text::Printf("%g ohm (reference_impedance)", desc.reference_impedance_ohm);
  if (args.match == "first") {
    // Each element conjugate-matched to its own impedance at the first scan angle.
    reference = ScanImpedance(desc.array, z, amplitudes, {theta.front()}, {phi.front()}, reference)
                    .active_impedance_ohm.row(0)
                    .transpose()
                    .conjugate();
    reference_text =
        text::Printf("each element's conjugate match at theta %g deg (power waves, Kurokawa 1965)",
                     args.theta_start_deg);
  }
  const ScanImpedanceTable table = ScanImpedance(desc.array, z, amplitudes, theta, phi, reference);
  // With -o -, standard output is the CSV alone; the table and "wrote" lines go away.
  const bool csv_to_stdout = args.output == kStdout;
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
  cmd->callback([args] { RunScan(*args); });
}

}  // namespace lobecast::cli
