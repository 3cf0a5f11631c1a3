// Monte Carlo tolerance studies (engine/tolerance/tolerance.h): the statistics
// against closed forms within Monte Carlo confidence intervals, reproducibility,
// and the error-free limit.
#include "engine/tolerance/tolerance.h"

#include <cmath>
#include <limits>
#include <numeric>
#include <vector>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/synthesis/taper.h"
#include "engine/tolerance/trial_random.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::TestArray;

// N z-directed dipoles along x at half-wavelength pitch with amplitudes a_n, steered
// to (theta 90, phi phi0_deg): in the theta = 90 deg plane every element radiates
// alike (sin theta = 1), so the field there is a constant times the array factor
// sum_n I_n exp(j k x_n cos phi).
TestArray SteeredLine(const std::vector<double>& a, double phi0_deg) {
  TestArray t;
  t.frequency_hz = testing::kTestFrequency_hz;
  const double lambda = t.wavelength_m();
  const double k = 2.0 * kPi / lambda;
  for (std::size_t n = 0; n < a.size(); ++n) {
    const double x = 0.5 * lambda * static_cast<double>(n);
    t.Add(Vec3(x, 0, 0), Vec3::UnitZ(), 0.01 * lambda,
          std::polar(a[n], -k * x * std::cos(phi0_deg * kDegree)));
  }
  return t;
}

// The theta = 90 deg plane, phi every step_deg.
AngularGrid HorizonPlane(double step_deg) {
  AngularGrid g;
  g.theta_deg = {90.0};
  for (double p = 0.0; p <= 360.0 + 1e-9; p += step_deg) g.phi_deg.push_back(p);
  return g;
}

ToleranceOptions Options(std::size_t trials, std::uint64_t seed, int threads = 1) {
  ToleranceOptions o;
  o.trials = trials;
  o.seed = seed;
  o.pattern.field = testing::DirectMethod(threads);
  return o;
}

struct MeanAndError {
  double mean = 0.0;
  double standard_error = 0.0;
};
MeanAndError MeanOf(const std::vector<double>& x) {
  const double n = static_cast<double>(x.size());
  const double mean = std::accumulate(x.begin(), x.end(), 0.0) / n;
  double ss = 0.0;
  for (double v : x) ss += (v - mean) * (v - mean);
  return {mean, std::sqrt(ss / (n - 1.0) / n)};
}

// Four standard errors: a correct expectation fails this with probability 6e-5
// (normal tail); the seed is fixed, so the outcome is too.
constexpr double kConfidenceSigmas = 4.0;

TEST(TrialRandom, StandardGeneratorsAndKnownValues) {
  // The C++ standard fixes mt19937_64's 10000th output for the default seed
  // ([rand.predef], ISO/IEC 14882:2020): our stream rests on that sequence.
  std::mt19937_64 mt;
  mt.discard(9999);
  EXPECT_EQ(mt(), 9981545732273789042ULL);
  // SplitMix64 from state 0 gives 0xe220a8397b1dcdaf first (the reference C code of
  // Vigna's splitmix64.c; from memory).
  EXPECT_EQ(Mix64(0), 0xe220a8397b1dcdafULL);
  // Streams differ by seed, trial and kind; the same key repeats.
  TrialRandom a(7, 3, ErrorStream::kPhase), b(7, 3, ErrorStream::kPhase);
  TrialRandom c(7, 4, ErrorStream::kPhase), d(8, 3, ErrorStream::kPhase),
      e(7, 3, ErrorStream::kAmplitude);
  const double x = a.Normal();
  EXPECT_EQ(x, b.Normal());
  EXPECT_NE(x, c.Normal());
  EXPECT_NE(x, d.Normal());
  EXPECT_NE(x, e.Normal());
}

TEST(TrialRandom, NormalsHaveUnitVarianceAndIndicesAreUniform) {
  // Sample moments of 2e5 Box-Muller normals: mean 0 +- 4/sqrt(n), variance 1 +-
  // 4 sqrt(2/n) (the variance of a sample variance of normals is 2 sigma^4 / n).
  TrialRandom r(12345, 0, ErrorStream::kAmplitude);
  const int n = 200000;
  double sum = 0, sum2 = 0;
  for (int i = 0; i < n; ++i) {
    const double z = r.Normal();
    sum += z;
    sum2 += z * z;
  }
  EXPECT_NEAR(sum / n, 0.0, 4.0 / std::sqrt(n));
  EXPECT_NEAR(sum2 / n, 1.0, 4.0 * std::sqrt(2.0 / n));
  // Every element is chosen with probability m / n.
  TrialRandom f(1, 0, ErrorStream::kFailure);
  std::vector<int> hits(10, 0);
  const int draws = 20000;
  for (int i = 0; i < draws; ++i) {
    const auto chosen = ChooseDistinct(f, 10, 3);
    ASSERT_EQ(chosen.size(), 3u);
    ASSERT_TRUE(chosen[0] < chosen[1] && chosen[1] < chosen[2]);
    for (std::size_t c : chosen) ++hits[c];
  }
  const double p = 0.3, sd = std::sqrt(draws * p * (1 - p));
  for (int h : hits) EXPECT_NEAR(h, draws * p, kConfidenceSigmas * sd);
}

TEST(Tolerance, PercentilesAreNumpysLinearDefinition) {
  // numpy.percentile([1, 2, 3, 4, 10], [5, 50, 95]) = [1.2, 3.0, 8.8] (numpy's
  // "linear" method, Hyndman and Fan type 7; worked by hand from its definition).
  const double x[] = {1, 2, 3, 4, 10};
  EXPECT_DOUBLE_EQ(PercentileOfSorted(x, 5, 5.0), 1.2);
  EXPECT_DOUBLE_EQ(PercentileOfSorted(x, 5, 50.0), 3.0);
  EXPECT_DOUBLE_EQ(PercentileOfSorted(x, 5, 95.0), 8.8);
  const ScalarStatistics s = StatisticsOf({1, 2, 3, 4, 10}, {5, 95});
  EXPECT_DOUBLE_EQ(s.mean, 4.0);
  EXPECT_DOUBLE_EQ(s.std_dev, std::sqrt(50.0 / 4.0));  // sum of squares 9+4+1+0+36 = 50
  EXPECT_EQ(s.min, 1.0);
  EXPECT_EQ(s.max, 10.0);
}

TEST(Tolerance, MeanBeamPowerUnderPhaseErrorsMatchesClosedForm) {
  // Gaussian phase errors p_n ~ N(0, s^2), independent: with c_n the error-free
  // terms of the beam field (all in phase at the beam, |c_n| = C a_n),
  //   E|sum c_n e^{j p_n}|^2 = sum_n sum_m c_n conj(c_m) E[e^{j (p_n - p_m)}],
  // and E[e^{j p}] = e^{-s^2/2} (the characteristic function of N(0, s^2)), so the
  // terms n != m get e^{-s^2/2} e^{-s^2/2} = e^{-s^2} and n = m gets 1:
  //   E|AF|^2 = e^{-s^2} |sum a|^2 + (1 - e^{-s^2}) sum |a|^2   (s in radians),
  // relative to the error-free |sum a|^2: e^{-s^2} + (1 - e^{-s^2}) sum a^2 / (sum a)^2.
  // (Ruze's phase-error law for apertures has the same e^{-s^2} factor; J. Ruze,
  // Proc. IEEE 54, 1966, from memory.)
  const std::vector<double> a = {0.4, 0.7, 0.9, 1.0, 1.0, 0.9, 0.7, 0.4};
  const TestArray line = SteeredLine(a, 60.0);
  ToleranceOptions o = Options(4000, 2026);
  const double sigma_deg = 30.0;
  o.errors.phase_sigma_deg = sigma_deg;
  ToleranceTargets targets;
  targets.beam = UnitVectorAt(90.0 * kDegree, 60.0 * kDegree);
  const ToleranceResult r = RunTolerance(line, line.currents, HorizonPlane(10.0), targets, o);

  const double u0 = r.baseline_figures.beam_directivity * r.baseline_figures.radiated_w / (4 * kPi);
  std::vector<double> ratio;
  for (const TrialFigures& t : r.trials)
    ratio.push_back(t.beam_directivity * t.radiated_w / (4 * kPi) / u0);
  const MeanAndError m = MeanOf(ratio);
  double sum = 0, sum2 = 0;
  for (double v : a) sum += v, sum2 += v * v;
  auto expected = [&](double s_rad) {
    const double q = std::exp(-s_rad * s_rad);
    return q + (1.0 - q) * sum2 / (sum * sum);
  };
  const double s = sigma_deg * kDegree;
  EXPECT_NEAR(m.mean, expected(s), kConfidenceSigmas * m.standard_error)
      << "standard error " << m.standard_error;
  // The check can fail: 20% more or less phase error is far outside the interval.
  EXPECT_GT(std::abs(m.mean - expected(1.2 * s)), kConfidenceSigmas * m.standard_error);
  EXPECT_GT(std::abs(m.mean - expected(0.8 * s)), kConfidenceSigmas * m.standard_error);
}

TEST(Tolerance, SideLobeFloorMatchesErrorVarianceOverNEta) {
  // Classic estimate of the side-lobe floor that random errors raise (R. S. Elliott,
  // Antenna Theory and Design, 1981, sec. 4.x; R. C. Hansen, Phased Array Antennas,
  // ch. 7, random errors; both from memory): far from the beam, where the error-free
  // pattern is negligible, the mean power pattern relative to the error-free peak is
  //   E|AF(u)|^2 / |sum a|^2 ~ sigma^2 sum a^2 / (sum a)^2 = sigma^2 / (N eta_taper),
  // eta_taper = (sum a)^2 / (N sum a^2), sigma^2 = the total error variance per element
  // = sigma_amplitude^2 + sigma_phase^2 (amplitude as a relative error,
  // sigma_dB ln 10 / 20; phase in radians), valid for small errors.
  // What is compared: the mean over trials and over side-lobe directions of the
  // theta = 90 deg plane (|cos phi| >= 0.5, outside the main beam; every element
  // radiates alike there) of U / U_peak(error-free). A -60 dB Dolph-Chebyshev taper
  // keeps the error-free side lobes 3 orders below the floor, and the small-error
  // approximation is good to 0.4% here (the exact variance E g^2 - |E g e^{jp}|^2 =
  // e^{2 sa^2} - e^{sa^2 - sp^2} differs from sa^2 + sp^2 by O(sigma^4)).
  const int n = 16;
  TaperSpec spec;
  spec.kind = TaperKind::kChebyshev;
  spec.sidelobe_db = -60.0;
  const std::vector<double> a = LineTaper(spec, n);
  const TestArray line = SteeredLine(a, 90.0);  // broadside: the beam along +y
  ToleranceOptions o = Options(1500, 99);
  o.errors.amplitude_sigma_db = 0.5;
  o.errors.phase_sigma_deg = 3.0;
  ToleranceTargets targets;
  targets.beam = Vec3::UnitY();
  for (double phi = 0.0; phi <= 60.0 + 1e-9; phi += 5.0) {
    targets.protected_directions.push_back(UnitVectorAt(0.5 * kPi, phi * kDegree));
    targets.protected_directions.push_back(UnitVectorAt(0.5 * kPi, (180.0 - phi) * kDegree));
  }
  const ToleranceResult r = RunTolerance(line, line.currents, HorizonPlane(15.0), targets, o);
  const double u0 = r.baseline_figures.beam_directivity * r.baseline_figures.radiated_w / (4 * kPi);
  std::vector<double> floor_per_trial;
  for (const TrialFigures& t : r.trials) {
    double s = 0;
    for (double u : t.protected_intensity_w_sr) s += u / u0;
    floor_per_trial.push_back(s / static_cast<double>(t.protected_intensity_w_sr.size()));
  }
  const MeanAndError m = MeanOf(floor_per_trial);
  const double sa = 0.5 * std::log(10.0) / 20.0, sp = 3.0 * kDegree;
  const double eta = TaperEfficiency(a);
  const double classic = (sa * sa + sp * sp) / (n * eta);
  // Allowance: the confidence interval plus the 0.4% of the small-error approximation
  // and the error-free side lobes (at most 1e-6 of the peak, 0.2% of the floor).
  const double allowance = kConfidenceSigmas * m.standard_error + 0.006 * classic;
  EXPECT_NEAR(m.mean, classic, allowance)
      << "classic " << ToDb(classic) << " dB, measured " << ToDb(m.mean) << " dB";
  // The check can fail: leaving the taper efficiency out (sigma^2 / N), or the phase
  // variance, is rejected.
  EXPECT_GT(std::abs(m.mean - (sa * sa + sp * sp) / n), allowance);
  EXPECT_GT(std::abs(m.mean - sa * sa / (n * eta)), allowance);
}

ToleranceResult AllErrorsStudy(std::uint64_t seed, int threads,
                               std::size_t max_block_bytes = std::size_t{256} << 20) {
  testing::TestRng rng(5);
  const TestArray panel = testing::ZLattice(rng, 4, Ground::kPec);
  ToleranceOptions o = Options(12, seed, threads);
  o.max_block_bytes = max_block_bytes;
  o.errors.amplitude_sigma_db = 1.0;
  o.errors.phase_sigma_deg = 10.0;
  o.errors.position_sigma_m = 0.01 * panel.wavelength_m();
  o.errors.failure_probability = 0.1;
  AngularGrid g;
  for (double t = 0; t <= 90.0 + 1e-9; t += 5.0) g.theta_deg.push_back(t);
  for (double p = 0; p <= 360.0 + 1e-9; p += 10.0) g.phi_deg.push_back(p);
  ToleranceTargets targets;
  targets.protected_directions = {UnitVectorAt(40 * kDegree, kPi)};
  return RunTolerance(panel, panel.currents, g, targets, o);
}

void ExpectSameBits(const ToleranceResult& a, const ToleranceResult& b) {
  ASSERT_EQ(a.trials.size(), b.trials.size());
  for (std::size_t k = 0; k < a.trials.size(); ++k) {
    const TrialFigures &x = a.trials[k], &y = b.trials[k];
    EXPECT_EQ(x.radiated_w, y.radiated_w) << k;
    EXPECT_EQ(x.beam_directivity, y.beam_directivity) << k;
    EXPECT_EQ(x.peak_sidelobe_db, y.peak_sidelobe_db) << k;
    EXPECT_EQ(x.pointing_error_deg, y.pointing_error_deg) << k;
    EXPECT_EQ(x.protected_intensity_w_sr, y.protected_intensity_w_sr) << k;
    EXPECT_EQ(x.failed_elements, y.failed_elements) << k;
  }
  EXPECT_TRUE(a.directivity_mean == b.directivity_mean);
  EXPECT_TRUE(a.intensity_mean_w_sr == b.intensity_mean_w_sr);
  EXPECT_TRUE(a.directivity_percentiles == b.directivity_percentiles);
}

TEST(Tolerance, SameSeedSameBitsOnAnyThreadCountOtherSeedOtherResult) {
  const ToleranceResult one = AllErrorsStudy(42, 1);
  const ToleranceResult two = AllErrorsStudy(42, 2);
  ExpectSameBits(one, two);
  const ToleranceResult other = AllErrorsStudy(43, 2);
  EXPECT_NE(one.trials[0].radiated_w, other.trials[0].radiated_w);
  EXPECT_FALSE(one.directivity_mean == other.directivity_mean);
  // Blocks of one theta row (a small memory budget) change nothing either (direct
  // sums: each direction's sum does not depend on its block).
  const ToleranceResult rows = AllErrorsStudy(42, 2, 1);
  EXPECT_EQ(rows.blocks, 19u);
  EXPECT_EQ(one.blocks, 1u);
  ExpectSameBits(one, rows);
}

TEST(Tolerance, ZeroErrorsGiveTheBaselineInEveryTrial) {
  testing::TestRng rng(8);
  const TestArray panel = testing::ZLattice(rng, 3, Ground::kPec);
  ToleranceOptions o = Options(5, 1, 2);
  AngularGrid g;
  for (double t = 0; t <= 90.0 + 1e-9; t += 3.0) g.theta_deg.push_back(t);
  for (double p = 0; p <= 360.0 + 1e-9; p += 6.0) g.phi_deg.push_back(p);
  ToleranceTargets targets;
  targets.protected_directions = {UnitVectorAt(50 * kDegree, 0.3)};
  const ToleranceResult r = RunTolerance(panel, panel.currents, g, targets, o);
  const TrialFigures& b = r.baseline_figures;
  for (const TrialFigures& t : r.trials) {
    EXPECT_EQ(t.radiated_w, b.radiated_w);
    EXPECT_EQ(t.beam_directivity, b.beam_directivity);
    EXPECT_EQ(t.peak_sidelobe_db, b.peak_sidelobe_db);
    EXPECT_EQ(t.pointing_error_deg, 0.0);
    EXPECT_EQ(t.peak_directivity, b.peak_directivity);
    EXPECT_EQ(t.null_depth_db, b.null_depth_db);
    EXPECT_EQ(t.failed_elements, 0u);
  }
  for (Eigen::Index i = 0; i < r.directivity_mean.size(); ++i) {
    const double d0 = r.baseline.directivity[i];
    for (Eigen::Index p = 0; p < r.directivity_percentiles.rows(); ++p)
      ASSERT_EQ(r.directivity_percentiles(p, i), d0) << i;
    // A sum of K equal values over K: within rounding of the value.
    ASSERT_NEAR(r.directivity_mean[i], d0, 4e-16 * d0) << i;
  }
  // The beam is the refined error-free peak when no design beam is given.
  EXPECT_EQ(r.beam_r_hat, b.peak_r_hat);
  EXPECT_FALSE(r.beam_from_design);
}

TEST(Tolerance, PositionErrorsAreExactPerTrialPatterns) {
  // One trial: its per-direction percentile is its own directivity, which must be the
  // compute job's pattern of the displaced array, bit for bit (no expansion).
  testing::TestRng rng(11);
  const TestArray panel = testing::ZLattice(rng, 3);
  ToleranceOptions o = Options(1, 77, 2);
  o.errors.position_sigma_m = 0.05 * panel.wavelength_m();
  o.errors.phase_sigma_deg = 5.0;
  const AngularGrid g = HorizonPlane(5.0);
  const ToleranceResult r = RunTolerance(panel, panel.currents, g, {}, o);
  const TrialArray t = ApplyTrialErrors(panel, panel.currents, o.errors, 77, 0);
  EXPECT_NE(t.array.dipoles[0].position_m, panel.dipoles[0].position_m);
  const PatternResult p = ComputePattern(t.array, t.currents_a, g, o.pattern);
  for (Eigen::Index i = 0; i < p.directivity.size(); ++i)
    ASSERT_EQ(r.directivity_percentiles(1, i), p.directivity[i]) << i;
  EXPECT_EQ(r.trials[0].radiated_w, p.radiated_power_w);
}

TEST(Tolerance, FailuresByCountAndByProbability) {
  testing::TestRng rng(3);
  const TestArray panel = testing::ZLattice(rng, 4);
  ToleranceOptions o = Options(400, 5, 2);
  o.errors.failure_count = 3;
  const ToleranceResult by_count = RunTolerance(panel, panel.currents, HorizonPlane(30.0), {}, o);
  for (const TrialFigures& t : by_count.trials) EXPECT_EQ(t.failed_elements, 3u);
  o.errors.failure_count.reset();
  o.errors.failure_probability = 0.2;
  const ToleranceResult by_p = RunTolerance(panel, panel.currents, HorizonPlane(30.0), {}, o);
  std::vector<double> failed;
  for (const TrialFigures& t : by_p.trials)
    failed.push_back(static_cast<double>(t.failed_elements));
  const MeanAndError m = MeanOf(failed);
  // Binomial(16, 0.2): mean 3.2.
  EXPECT_NEAR(m.mean, 16 * 0.2, kConfidenceSigmas * m.standard_error);
  // Failed elements carry no current: exactly N - 1 failures of N leave one radiating,
  // N are refused.
  o.errors.failure_probability = 0;
  o.errors.failure_count = 16;
  EXPECT_THROW(RunTolerance(panel, panel.currents, HorizonPlane(30.0), {}, o), InvalidArgument);
}

TEST(Tolerance, OptionsAreChecked) {
  ToleranceOptions o;
  std::string why;
  EXPECT_TRUE(o.IsValid(&why)) << why;
  o.errors.phase_sigma_deg = -1;
  EXPECT_FALSE(o.IsValid(&why));
  EXPECT_NE(why.find("phase_sigma_deg"), std::string::npos) << why;
  o = {};
  o.errors.failure_probability = 1.0;
  EXPECT_FALSE(o.IsValid(&why));
  o = {};
  o.percentiles = {50, 5};
  EXPECT_FALSE(o.IsValid(&why));
  o = {};
  o.trials = 0;
  EXPECT_FALSE(o.IsValid(&why));
}

}  // namespace
}  // namespace lobecast
