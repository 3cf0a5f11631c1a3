// `lobecast exposure RESULT.h5 --power W --limit W/m^2`: far-field RF-exposure
// estimates from a result: per direction the EIRP and the distance at which the
// far-field power density S = EIRP / (4 pi r^2) falls to the limit the user gives,
// the worst direction first (the refined peak), then the directions asked for
// (--toward), a cut (--cut) or by default the plane through z and the worst
// direction; --distance adds the density there; --map draws the distance over the
// grid. No limit is built in; every output carries the exposure note.
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
#include "engine/analysis/beam.h"
#include "engine/constants.h"
#include "engine/grid.h"
#include "engine/link/exposure.h"
#include "engine/link/far_field_region.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/exposure_map.h"
#include "io/safety_note.h"
#include "io/text/export_samples.h"
#include "io/text/exposure_text.h"

namespace lobecast::cli {
namespace {

struct ExposureArgs {
  std::string input;
  double power_w = 0;
  double limit_w_m2 = 0;
  std::optional<double> distance_m;
  std::vector<std::string> toward;
  std::string cut;
  std::optional<double> step_deg;
  std::string map;
  std::string projection;
  bool json = false, csv = false;
  std::string output;
  bool quiet = false;
};

void RunExposure(const ExposureArgs& args) {
  RefuseInputAsOutput("--output", args.output, args.input);
  RefuseInputAsOutput("--map", args.map, args.input);
  if (args.json && args.csv) BadOption("--csv", "together with --json", "one of them");
  if (!args.projection.empty() && args.map.empty()) {
    BadOption("--projection", "without --map", "--map FILE (the projection is the map's)");
  }
  std::optional<CutSpec> cut;
  if (!args.cut.empty()) {
    std::string why;
    cut = ParseCutSpec(args.cut, &why);
    if (!cut) BadOption("--cut", "'" + args.cut + "'", why);
  }
  if (args.step_deg && !(cut && cut->kind == CutSpec::Kind::kGreatCircle)) {
    BadOption("--step", "without a great-circle cut",
              "--cut great-circle:THETA,PHI,HEADING (other cuts take the grid's spacing)");
  }
  std::vector<std::pair<double, double>> toward;
  for (const std::string& t : args.toward) {
    const auto d = ParseAnglePair(t, "--toward", "THETA,PHI in deg, e.g. 90,45");
    if (!(d.first >= 0 && d.first <= 180)) {
      BadOption("--toward", "'" + t + "'", "a theta within 0 .. 180 deg");
    }
    toward.push_back(d);
  }

  const StoredResult stored = ReadResult(args.input);
  const std::optional<StoredCoupling> coupling =
      ReadCoupling(args.input, stored.array, stored.currents);
  const Station station(stored, coupling);
  text::ExposureReport r;
  r.result_path = args.input;
  r.name = stored.metadata.name;
  r.frequency_hz = stored.array.frequency_hz;
  r.ground = stored.array.ground;
  r.power_w = args.power_w;
  r.basis = station.basis();
  r.limit_w_m2 = args.limit_w_m2;
  r.distance_m = args.distance_m;
  r.region = FarFieldRegionOf(stored.array);

  auto row_of = [&](const std::string& kind, double theta_deg, double phi_deg, double directivity) {
    text::ExposureRow row;
    row.kind = kind;
    row.theta_deg = theta_deg;
    row.phi_deg = phi_deg;
    row.directivity = directivity;
    row.gain = directivity * r.basis.factor;
    row.eirp_w = r.power_w * row.gain;
    row.distance_to_limit_m = DistanceToDensity(row.eirp_w, r.limit_w_m2);
    if (r.distance_m) row.density_w_m2 = PowerDensity(row.eirp_w, *r.distance_m);
    return row;
  };
  // The worst direction: the refined peak, as the pattern analysis finds it.
  // Reported as the analysis reports it (a phi of 360 as 0, NaN on the z axis) and
  // evaluated at the direction reported.
  Vec3 peak_r_hat;
  const DirectionDeg worst = RefinePeak(station.probe(), stored.result.grid,
                                        stored.result.directivity, AnalysisOptions{}, &peak_r_hat)
                                 .direction;
  const double worst_phi_deg = std::isnan(worst.phi_deg) ? 0.0 : worst.phi_deg;
  r.rows.push_back(
      row_of("worst", worst.theta_deg, worst.phi_deg,
             station.Toward(UnitVectorAt(worst.theta_deg * kDegree, worst_phi_deg * kDegree))
                 .directivity));
  std::string what = "the worst direction (the refined peak of the gain)";
  for (const auto& [theta, phi] : toward) {
    const StationToward t = station.Toward(UnitVectorAt(theta * kDegree, phi * kDegree));
    r.rows.push_back(row_of("toward", theta, phi, t.directivity));
  }
  if (!toward.empty()) what += ", the directions asked for (exact)";
  if (!cut && toward.empty()) {
    cut = CutSpec{CutSpec::Kind::kPhi, worst_phi_deg, 0, 0, 0};
  }
  if (cut) {
    const std::vector<ExportSample> samples = CutSamples(stored, *cut, args.step_deg.value_or(1));
    for (const ExportSample& s : samples) {
      text::ExposureRow row = row_of("cut", s.theta_deg, s.phi_deg, s.directivity);
      row.cut_angle_deg = s.cut_angle_deg;
      row.exact = s.exact;
      r.rows.push_back(row);
    }
    const bool exact = !samples.empty() && samples.front().exact;
    what += ", then the cut " + DescribeCut(*cut) +
            (exact ? " (computed exactly)" : " (from the stored grid)") +
            (cut->kind == CutSpec::Kind::kTheta ? "" : "; cut_deg: signed angle along it");
  }
  r.rows_what = what;

  if (!args.map.empty()) {
    plot::ExposureMapOptions m;
    m.power_w = r.power_w;
    m.gain_factor = r.basis.factor;
    m.gain_name = r.basis.name();
    m.limit_w_m2 = r.limit_w_m2;
    m.worst_deg = {worst.theta_deg, worst_phi_deg};
    m.far_field_from_m = r.region.region.start_m();
    m.worst_distance_m = r.rows.front().distance_to_limit_m;
    if (!args.projection.empty()) m.projection = *plot::MapProjectionFromString(args.projection);
    plot::WriteExposureMap(stored, m, args.map);
    r.map_path = args.map;
  }
  r.cautions = text::ExposureCautions(r);
  PrintWarnings(r.cautions);
  r.cautions.push_back(text::ExposureGroundNote(r.ground));
  const std::string out = args.json  ? text::ExposureJson(r)
                          : args.csv ? text::ExposureCsv(r)
                                     : text::ExposureText(r);
  WriteText(args.output, "the exposure table", [&out](std::ostream& s) { s << out; });
  if (!args.quiet) std::fprintf(stderr, "%s\n", std::string(kExposureLine).c_str());
}

}  // namespace

void AddExposureCommand(CLI::App& app) {
  auto args = std::make_shared<ExposureArgs>();
  CLI::App* cmd = app.add_subcommand(
      "exposure",
      "Far-field RF-exposure estimate from a result: per direction the gain (dBi), EIRP (W) "
      "and the distance (m) at which the far-field power density EIRP / (4 pi r^2) falls to "
      "the limit you give (W/m^2); the worst direction first. An estimate only: the near "
      "field and reflections can raise exposure, compliance is for qualified persons under "
      "the applicable regulations.");
  cmd->add_option("RESULT", args->input, "Result file (HDF5) written by compute")
      ->required()
      ->check(ExistingInput("a result file (HDF5) written by 'lobecast compute'"));
  cmd->add_option("--power", args->power_w,
                  "Transmit power (W): radiated, accepted or available from the source, "
                  "whichever the result's gain refers to (the output says which)")
      ->required()
      ->check(NumberAbove(0, "W"));
  cmd->add_option("--limit", args->limit_w_m2,
                  "Power-density limit to compare with (W/m^2), from the regulation that "
                  "applies to you; lobecast holds none")
      ->required()
      ->check(NumberAbove(0, "W/m^2"));
  cmd->add_option("--distance", args->distance_m,
                  "Also give the far-field power density (W/m^2) at this distance (m)")
      ->check(NumberAbove(0, "m"));
  cmd->add_option("--toward", args->toward,
                  "THETA,PHI (deg): a row for this direction, computed exactly; repeatable")
      ->take_all();
  cmd->add_option("--cut", args->cut,
                  "Rows along a cut: phi=DEG, theta=DEG or great-circle:THETA,PHI,HEADING "
                  "(deg; as in export); default without --toward: phi = the worst direction's "
                  "phi");
  cmd->add_option("--step", args->step_deg, "Spacing along a great-circle cut (deg; default 1)")
      ->check(NumberIn(1e-3, 90, "deg"));
  cmd->add_option("--map", args->map,
                  "Draw the distance to the limit over the grid (m) to this image (.png, .svg "
                  "or .pdf)")
      ->check(BinaryOutput("an image"));
  cmd->add_option("--projection", args->projection,
                  "Map projection: theta-phi (default), az-el or uv (upper hemisphere)")
      ->check(OneOf(NamesOf({plot::MapProjection::kThetaPhi, plot::MapProjection::kAzEl,
                             plot::MapProjection::kUv}),
                    true));
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the table");
  cmd->add_flag("--csv", args->csv,
                "Print CSV (a header with units in the names, one row per direction, the "
                "notes in a last column)");
  cmd->add_option("-o,--output", args->output,
                  "Write the table (or JSON, CSV) to this file, atomically; default or '-': "
                  "standard output")
      ->check(TextOutput());
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors besides the table itself");
  cmd->callback([args] { RunExposure(*args); });
}

}  // namespace lobecast::cli
