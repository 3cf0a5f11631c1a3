// The text of a tolerance study (tolerance_text.h).
#include "io/text/tolerance_text.h"

#include <cmath>
#include <vector>

#include "engine/decibels.h"
#include "io/hdf5/schema.h"
#include "io/hdf5/tolerance_writer.h"
#include "io/text/summary_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

// 12 characters, the first always a space: "%.5g" of a negative number below 1e-4
// takes 11 (-0.00012814), and columns must not run together.
std::string Cell(double v) {
  if (std::isnan(v)) return Printf(" %11s", "undefined");
  return Printf(" %11.5g", v);
}

// One table row: name (unit), baseline, mean, std, min, percentiles, max.
std::string Row(const std::string& what, const std::string& unit, double baseline,
                const ScalarStatistics& st, bool with_std = true) {
  // Dimensionless figures ("1") name no unit.
  const std::string label = unit == "1" ? what : what + " (" + unit + ")";
  std::string s = Printf("  %-46s", label.c_str());
  s += Cell(baseline) + Cell(st.mean) + (with_std ? Cell(st.std_dev) : Printf("%12s", "-")) +
       Cell(st.min);
  for (double p : st.percentiles) s += Cell(p);
  return s + Cell(st.max) + "\n";
}

}  // namespace

std::string DescribeTolerance(const ArrayDescription& desc, const ToleranceResult& r,
                              const ToleranceOptions& o, const std::string& output_path,
                              double wall_seconds) {
  std::string s;
  const std::size_t k = r.trials.size();
  s += Printf("tolerance    %zu trials, seed %llu, %zu dipoles at %s\n", k,
              static_cast<unsigned long long>(o.seed), desc.array.size(),
              FormatFrequency(desc.array.frequency_hz).c_str());
  s += "errors       " + o.errors.Describe(desc.array.wavelength_m()) + "\n";
  double theta = 0, phi = 0;
  AnglesDegOf(r.beam_r_hat, theta, phi);
  s += "beam         " + FormatDirection(theta, phi) +
       (r.beam_from_design ? " (the design's)" : " (the error-free refined peak)") + "\n";
  s += "side lobes   outside the error-free main beam (down to its first minima), grid maximum "
       "re the trial's grid maximum\n";
  s += Printf("  %-46s%12s%12s%12s%12s", "per trial", "error-free", "mean", "std", "min");
  for (double p : r.percentiles) s += Printf("%12s", Printf("p%g", p).c_str());
  s += Printf("%12s\n", "max");
  schema::VisitTrialScalars<TrialFigures>([&](const schema::Dataset& d, const char* what,
                                              auto value) {
    std::vector<double> v;
    for (const TrialFigures& t : r.trials) v.push_back(value(t));
    s += Row(what, std::string(d.units), value(r.baseline_figures), StatisticsOf(v, r.percentiles));
  });
  // dBi of the linear statistics (a mean in dB would weigh the low trials more).
  std::vector<double> d;
  for (const TrialFigures& t : r.trials) d.push_back(t.beam_directivity);
  ScalarStatistics st = StatisticsOf(d, r.percentiles);
  st.mean = ToDb(st.mean);
  st.min = ToDb(st.min);
  st.max = ToDb(st.max);
  for (double& p : st.percentiles) p = ToDb(p);
  s += Row("beam directivity (of the linear values)", "dBi",
           ToDb(r.baseline_figures.beam_directivity), st, false);
  for (std::size_t j = 0; j < r.protected_directions.size(); ++j) {
    std::vector<double> depth;
    for (const TrialFigures& t : r.trials) depth.push_back(t.null_depth_db[j]);
    AnglesDegOf(r.protected_directions[j], theta, phi);
    s += Row(Printf("null depth at theta %g, phi %g", theta, phi), "dB re beam",
             r.baseline_figures.null_depth_db[j], StatisticsOf(depth, r.percentiles));
  }
  s += Printf("time         %.3f s (%.3g s per trial; baseline %.3f s, %zu block%s)\n",
              wall_seconds, r.seconds_trials / static_cast<double>(k), r.seconds_baseline, r.blocks,
              r.blocks == 1 ? "" : "s");
  s += "output       " + output_path + "\n";
  return s;
}

}  // namespace lobecast::text
