// A tolerance study under /tolerance (tolerance_writer.h).
#include "io/hdf5/tolerance_writer.h"

#include <cmath>
#include <cstdio>
#include <limits>
#include <vector>

#include "engine/constants.h"
#include "io/hdf5/schema.h"

namespace lobecast {

void AnglesDegOf(const Vec3& r, double& theta_deg, double& phi_deg) {
  const double rho = std::hypot(r.x(), r.y());
  theta_deg = std::atan2(rho, r.z()) / kDegree;
  if (rho == 0.0) {
    phi_deg = std::numeric_limits<double>::quiet_NaN();
    return;
  }
  phi_deg = std::atan2(r.y(), r.x()) / kDegree;
  if (phi_deg < 0.0) phi_deg += 360.0;
}

void WriteTolerance(PatternFileWriter& w, const ToleranceResult& r, const ToleranceOptions& o,
                    double wavelength_m) {
  namespace s = schema;
  const std::string group(s::kToleranceGroup);
  const std::size_t k = r.trials.size(), j = r.protected_directions.size();
  const std::size_t nt = r.baseline.grid.theta_deg.size(), np = r.baseline.grid.phi_deg.size();
  const std::size_t npct = r.percentiles.size();
  auto table = [&](const s::Dataset& d, std::vector<std::size_t> dims, const double* data) {
    w.WriteTable(std::string(d.path), dims, data, d.units);
  };

  const ErrorModel& e = o.errors;
  w.WriteIntAttribute(group, "trials", static_cast<std::int64_t>(k));
  w.WriteStringAttribute(group, "seed", std::to_string(o.seed));  // 64 bits, unsigned
  w.WriteAttribute(group, "amplitude_sigma_db", e.amplitude_sigma_db);
  w.WriteAttribute(group, "phase_sigma_deg", e.phase_sigma_deg);
  w.WriteAttribute(group, "position_sigma_m", e.position_sigma_m);
  w.WriteAttribute(group, "failure_probability", e.failure_probability);
  w.WriteIntAttribute(group, "failure_count",
                      e.failure_count ? static_cast<std::int64_t>(*e.failure_count) : -1);
  w.WriteStringAttribute(group, "distributions", e.Describe(wavelength_m));
  w.WriteStringAttribute(group, "random_numbers",
                         "per trial k and kind of error: std::mt19937_64 seeded with "
                         "SplitMix64(SplitMix64(SplitMix64(seed) ^ k) ^ kind), normals by "
                         "Box-Muller (engine/tolerance/trial_random.h)");
  w.WriteStringAttribute(group, "percentile_method",
                         "linear interpolation between order statistics (Hyndman and Fan type "
                         "7, numpy's default)");
  w.WriteStringAttribute(group, "side_lobe_region",
                         "grid directions outside the error-free main beam: the lobe of the "
                         "grid maximum down to its first minima all round (main_beam)");
  double theta = 0, phi = 0;
  AnglesDegOf(r.beam_r_hat, theta, phi);
  w.WriteAttribute(group, "beam_theta_deg", theta);
  w.WriteAttribute(group, "beam_phi_deg", phi);
  w.WriteStringAttribute(group, "beam_source",
                         r.beam_from_design ? "design" : "error-free refined peak");
  AnglesDegOf(r.baseline_figures.peak_r_hat, theta, phi);
  w.WriteAttribute(group, "baseline_peak_theta_deg", theta);
  w.WriteAttribute(group, "baseline_peak_phi_deg", phi);

  // Per-trial scalars, their baselines and the summary table.
  std::vector<double> summary;
  std::vector<std::string> rows, units;
  s::VisitTrialScalars<TrialFigures>([&](const s::Dataset& d, const char*, auto value) {
    std::vector<double> v;
    for (const TrialFigures& t : r.trials) v.push_back(value(t));
    table(d, {k}, v.data());
    const double base = value(r.baseline_figures);
    w.WriteAttribute(group, "baseline_" + std::string(d.name()), base);
    const ScalarStatistics st = StatisticsOf(v, r.percentiles);
    for (double x : {st.mean, st.std_dev, st.min, st.max, base}) summary.push_back(x);
    for (double x : st.percentiles) summary.push_back(x);
    rows.emplace_back(d.name());
    units.emplace_back(d.units);
  });
  table(s::kTolSummary, {rows.size(), 5 + npct}, summary.data());
  w.WriteStrings(std::string(s::kTolSummaryRows.path), rows, s::kTolSummaryRows.units);
  w.WriteStrings(std::string(s::kTolSummaryUnits.path), units, s::kTolSummaryUnits.units);
  std::string columns = "mean, std, min, max, baseline";
  for (double p : r.percentiles) {
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, ", p%g", p);
    columns += buffer;
  }
  w.WriteStringAttribute(group, "summary_columns", columns);

  std::vector<double> pt(k), pp(k);
  for (std::size_t i = 0; i < k; ++i) AnglesDegOf(r.trials[i].peak_r_hat, pt[i], pp[i]);
  table(s::kTolPeakTheta, {k}, pt.data());
  table(s::kTolPeakPhi, {k}, pp.data());

  if (j > 0) {
    std::vector<double> th(j), ph(j), u(k * j), depth(k * j);
    for (std::size_t i = 0; i < j; ++i) AnglesDegOf(r.protected_directions[i], th[i], ph[i]);
    for (std::size_t t = 0; t < k; ++t)
      for (std::size_t i = 0; i < j; ++i) {
        u[t * j + i] = r.trials[t].protected_intensity_w_sr[i];
        depth[t * j + i] = r.trials[t].null_depth_db[i];
      }
    table(s::kTolProtectedTheta, {j}, th.data());
    table(s::kTolProtectedPhi, {j}, ph.data());
    table(s::kTolProtectedIntensity, {k, j}, u.data());
    table(s::kTolNullDepth, {k, j}, depth.data());
  }

  table(s::kTolPercent, {npct}, r.percentiles.data());
  table(s::kTolDirectivityMean, {nt, np}, r.directivity_mean.data());
  table(s::kTolIntensityMean, {nt, np}, r.intensity_mean_w_sr.data());
  // Eigen is column-major (percentile, direction): each column is one direction,
  // the file is percentile-major.
  const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> pct =
      r.directivity_percentiles;
  table(s::kTolDirectivityPercentile, {npct, nt, np}, pct.data());
  std::vector<double> beam(r.main_beam.size());
  for (std::size_t i = 0; i < beam.size(); ++i) beam[i] = r.main_beam[i] ? 1.0 : 0.0;
  table(s::kTolMainBeam, {nt, np}, beam.data());
}

}  // namespace lobecast
