// `lobecast link RESULT.h5 ...`: a free-space link budget from a lobecast result to a
// receiver, either a simple one (gain, polarization) or a second result. Geometry:
//
//   --toward THETA,PHI --distance M   the receiver stands M metres from the
//                                     transmitter's origin toward (THETA, PHI) in the
//                                     transmitter's coordinates;
//   --tx-position X,Y,Z --rx-position X,Y,Z
//                                     the origins of the two results in one local frame
//                                     (m) whose axes are the transmitter's; direction
//                                     and distance follow.
//
// A receiving result stands with its axes parallel to the transmitter's unless
// --rx-rotate AX,AY,AZ,DEG turns it (right-hand about the axis, in the common frame):
// a direction alone would leave its roll about the link open, and the polarization
// loss factor depends on it. Its own direction toward the transmitter is -r_hat turned
// into its coordinates, and is printed.
#include <cmath>
#include <cstdio>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "cli/analysis_setup.h"
#include "cli/commands.h"
#include "cli/option_checks.h"
#include "cli/text_output.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/grid.h"
#include "engine/link/far_field_region.h"
#include "engine/link/link_budget.h"
#include "engine/synthesis/lattice_generator.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/text/link_text.h"
#include "io/text/number_text.h"
#include "io/text/summary_text.h"

namespace lobecast::cli {
namespace {

struct LinkArgs {
  std::string input;
  std::string toward;
  std::optional<double> distance_m;
  std::string tx_position, rx_position;
  double power_w = 0;
  std::optional<double> rx_gain_dbi;
  std::string rx_polarization;
  std::string rx;
  std::string rx_rotate;
  std::optional<double> sensitivity_dbm;
  bool json = false, csv = false;
  std::string output;
  bool quiet = false;
};

// `count` comma-separated finite numbers.
std::vector<double> ParseNumbers(const std::string& text, std::size_t count,
                                 const std::string& option, const std::string& expected) {
  std::vector<double> out;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = text.find(',', start);
    std::string cell = text.substr(start, comma == std::string::npos ? comma : comma - start);
    while (!cell.empty() && cell.front() == ' ') cell.erase(cell.begin());
    while (!cell.empty() && cell.back() == ' ') cell.pop_back();
    const auto v = ParseFiniteNumber(cell);
    if (!v) BadOption(option, "'" + text + "'", expected);
    out.push_back(*v);
    if (comma == std::string::npos) break;
    start = comma + 1;
  }
  if (out.size() != count) BadOption(option, "'" + text + "'", expected);
  return out;
}

Vec3 ParsePoint(const std::string& text, const std::string& option) {
  const std::vector<double> v = ParseNumbers(text, 3, option, "X,Y,Z in m, e.g. 0,0,10");
  return {v[0], v[1], v[2]};
}

void RequireSameFrequency(const StoredResult& tx, const StoredResult& rx, const std::string& path) {
  const double f1 = tx.array.frequency_hz, f2 = rx.array.frequency_hz;
  if (std::fabs(f1 - f2) > 1e-9 * f1) {
    BadOption("--rx", path + " at " + text::FormatFrequency(f2),
              "a result at the transmitter's frequency, " + text::FormatFrequency(f1));
  }
}

void RunLink(const LinkArgs& args) {
  RefuseInputAsOutput("--output", args.output, args.input);
  if (args.json && args.csv) BadOption("--csv", "together with --json", "one of them");
  const bool by_direction = !args.toward.empty() || args.distance_m;
  const bool by_position = !args.tx_position.empty() || !args.rx_position.empty();
  if (by_direction == by_position) {
    BadOption("--toward", by_direction ? "both a direction and positions" : "no geometry",
              "either --toward THETA,PHI with --distance M, or --tx-position X,Y,Z with "
              "--rx-position X,Y,Z");
  }
  text::LinkReport r;
  Vec3 r_hat;
  if (by_direction) {
    if (args.toward.empty()) BadOption("--toward", "none", "THETA,PHI (deg) with --distance");
    if (!args.distance_m) BadOption("--distance", "none", "the distance in m with --toward");
    const auto d = ParseAnglePair(args.toward, "--toward", "THETA,PHI in deg, e.g. 90,0");
    if (!(d.first >= 0 && d.first <= 180)) {
      BadOption("--toward", "'" + args.toward + "'", "a theta within 0 .. 180 deg");
    }
    r_hat = UnitVectorAt(d.first * kDegree, d.second * kDegree);
    r.distance_m = *args.distance_m;
    r.toward = {d.first, d.second};
  } else {
    if (args.tx_position.empty() || args.rx_position.empty()) {
      BadOption(args.tx_position.empty() ? "--tx-position" : "--rx-position", "none",
                "both --tx-position and --rx-position (X,Y,Z in m)");
    }
    const Vec3 tx = ParsePoint(args.tx_position, "--tx-position");
    const Vec3 rx = ParsePoint(args.rx_position, "--rx-position");
    const Vec3 d = rx - tx;
    if (!(d.norm() > 0)) {
      BadOption("--rx-position", "the transmitter's position", "a receiver elsewhere");
    }
    r_hat = d / d.norm();
    r.distance_m = d.norm();
    const SphericalAngles a = AnglesOf(r_hat);
    r.toward = {a.theta_rad / kDegree, a.phi_rad / kDegree};
    r.tx_position_m = tx;
    r.rx_position_m = rx;
  }
  const bool rx_result = !args.rx.empty();
  if (rx_result && args.rx_gain_dbi) {
    BadOption("--rx-gain-dbi", "together with --rx", "one of them: --rx gives the gain");
  }
  if (rx_result && !args.rx_polarization.empty()) {
    BadOption("--rx-polarization", "together with --rx",
              "one of them: --rx gives the polarization");
  }
  if (!rx_result && !args.rx_rotate.empty()) {
    BadOption("--rx-rotate", "without --rx", "a receiving result (--rx RESULT.h5) to turn");
  }
  if (rx_result) RefuseInputAsOutput("--output", args.output, args.rx);

  const StoredResult tx_stored = ReadResult(args.input);
  const std::optional<StoredCoupling> tx_coupling =
      ReadCoupling(args.input, tx_stored.array, tx_stored.currents);
  const Station tx(tx_stored, tx_coupling);
  r.frequency_hz = tx_stored.array.frequency_hz;
  r.wavelength_m = tx_stored.array.wavelength_m();
  r.power_w = args.power_w;
  r.tx.result_path = args.input;
  r.tx.name = tx_stored.metadata.name;
  r.tx.basis = tx.basis();
  r.tx.toward = tx.Toward(r_hat);
  r.tx.region = FarFieldRegionOf(tx_stored.array);
  r.tx.ground_pec = tx_stored.array.ground == Ground::kPec;
  if (r.tx.toward.below_ground) {
    BadOption(by_direction ? "--toward" : "--rx-position",
              "a receiver below the transmitter's PEC ground (theta > 90 deg)",
              "a receiver above it, theta <= 90 deg");
  }

  std::optional<StoredResult> rx_stored;
  std::optional<StoredCoupling> rx_coupling;
  if (rx_result) {
    rx_stored = ReadResult(args.rx);
    RequireSameFrequency(tx_stored, *rx_stored, args.rx);
    rx_coupling = ReadCoupling(args.rx, rx_stored->array, rx_stored->currents);
    Eigen::Matrix3d rotation = Eigen::Matrix3d::Identity();
    if (!args.rx_rotate.empty()) {
      const std::vector<double> v = ParseNumbers(args.rx_rotate, 4, "--rx-rotate",
                                                 "AX,AY,AZ,DEG: an axis and an angle, e.g. "
                                                 "1,0,0,180");
      const Vec3 axis(v[0], v[1], v[2]);
      if (!(axis.norm() > 0)) BadOption("--rx-rotate", "a zero axis", "a non-zero axis");
      rotation = AxisAngleRotation(axis, v[3] * kDegree);
      r.rx_rotation_axis = axis;
      r.rx_rotation_deg = v[3];
    }
    const Station rx(*rx_stored, rx_coupling, rotation);
    r.rx.result_path = args.rx;
    r.rx.name = rx_stored->metadata.name;
    r.rx.basis = rx.basis();
    r.rx.toward = rx.Toward(-r_hat);
    r.rx.region = FarFieldRegionOf(rx_stored->array);
    r.rx.ground_pec = rx_stored->array.ground == Ground::kPec;
    if (r.rx.toward.below_ground) {
      BadOption("--rx",
                "a transmitter below the receiver's PEC ground (theta > 90 deg in its "
                "coordinates)",
                "a transmitter above it (turn the receiver with --rx-rotate?)");
    }
    r.polarization_loss_factor = PolarizationLossFactor(r.tx.toward.field_v, r.tx.toward.floor_v,
                                                        r.rx.toward.field_v, r.rx.toward.floor_v);
  } else {
    r.rx_gain_given = args.rx_gain_dbi.has_value();
    r.given_rx_gain = FromDb(args.rx_gain_dbi.value_or(0.0));
    if (!args.rx_polarization.empty()) {
      r.rx_polarization = PolarizationReferenceFromString(args.rx_polarization);
      const StationToward& t = r.tx.toward;
      const CoCross cc = CoCrossOf(t.e_theta, t.e_phi, t.direction.phi_deg * kDegree,
                                   *r.rx_polarization, t.floor_v);
      r.polarization_loss_factor = PolarizationLossFactor(cc.co, cc.cross);
    }
  }
  LinkInputs in;
  in.power_w = r.power_w;
  in.tx_gain = r.tx.toward.gain;
  in.rx_gain = rx_result ? r.rx.toward.gain : r.given_rx_gain;
  in.polarization_loss_factor = r.polarization_loss_factor;
  in.distance_m = r.distance_m;
  in.wavelength_m = r.wavelength_m;
  r.budget = Friis(in);
  r.sensitivity_dbm = args.sensitivity_dbm;
  r.cautions = text::LinkCautions(r);
  for (const std::string& c : r.cautions) PrintWarnings({c});

  const std::string out = args.json  ? text::LinkJson(r)
                          : args.csv ? text::LinkCsv(r)
                                     : text::LinkText(r);
  WriteText(args.output, "the link budget", [&out](std::ostream& s) { s << out; });
}

}  // namespace

void AddLinkCommand(CLI::App& app) {
  auto args = std::make_shared<LinkArgs>();
  CLI::App* cmd = app.add_subcommand(
      "link",
      "Free-space link budget from a result (the transmitter) to a receiver: the transmit "
      "gain toward the receiver (exact, off the grid; dBi), EIRP (W, dBm), path loss (Friis, "
      "dB), polarization loss factor, received power (W, dBm) and margin (dB). Geometry: "
      "--toward with --distance, or --tx-position with --rx-position.");
  cmd->add_option("RESULT", args->input, "Transmitting result file (HDF5) written by compute")
      ->required()
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_option("--toward", args->toward,
                  "THETA,PHI (deg): the receiver's direction in the transmitter's coordinates");
  cmd->add_option("--distance", args->distance_m,
                  "Distance from the transmitter's origin to the receiver (m)")
      ->check(NumberAbove(0, "m"));
  cmd->add_option("--tx-position", args->tx_position,
                  "X,Y,Z (m): the transmitter's origin in a local frame with the transmitter's "
                  "axes (instead of --toward and --distance)");
  cmd->add_option("--rx-position", args->rx_position,
                  "X,Y,Z (m): the receiver's origin in the same frame");
  cmd->add_option("--power", args->power_w,
                  "Transmit power (W): radiated, accepted or available from the source, "
                  "whichever the result's gain refers to (the output says which)")
      ->required()
      ->check(NumberAbove(0, "W"));
  cmd->add_option("--rx-gain-dbi", args->rx_gain_dbi,
                  "Receiver gain toward the transmitter (dBi; default 0, isotropic)")
      ->check(NumberIn(-300, 300, "dBi"));
  cmd->add_option("--rx-polarization", args->rx_polarization,
                  "The wave polarization the receiver is matched to, at the direction of "
                  "arrival: x or y (Ludwig-3), theta or phi, rhcp or lhcp (sense about the "
                  "direction of travel, IEEE Std 145-2013); default: matched (PLF 1)")
      ->check(OneOf(PolarizationReferenceNames(), true));
  cmd->add_option("--rx", args->rx,
                  "A result file as the receiver: its exact gain and polarization toward the "
                  "transmitter (same frequency; axes parallel to the transmitter's unless "
                  "--rx-rotate)")
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_option("--rx-rotate", args->rx_rotate,
                  "AX,AY,AZ,DEG: turn the receiving result DEG deg about the axis (right-hand, "
                  "common frame), e.g. 1,0,0,180 to face a copy of the transmitter back");
  cmd->add_option("--sensitivity", args->sensitivity_dbm,
                  "Receiver sensitivity (dBm): print the margin over it (dB)")
      ->check(NumberIn(-400, 100, "dBm"));
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the table");
  cmd->add_flag("--csv", args->csv, "Print a CSV header and row (units in the names)");
  cmd->add_option("-o,--output", args->output,
                  "Write the table (or JSON, CSV) to this file, atomically; default or '-': "
                  "standard output")
      ->check(TextOutput());
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors besides the budget itself");
  cmd->callback([args] { RunLink(*args); });
}

}  // namespace lobecast::cli
