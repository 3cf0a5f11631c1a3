// The numerical floor (engine/rounding_floor.h, CONVENTIONS §1) and the radiated
// power of nearly cancelling currents (engine/power/radiated_power.h).
#include "engine/rounding_floor.h"

#include <cmath>
#include <limits>

#include <gtest/gtest.h>

#include "engine/analysis/pattern_analysis.h"
#include "engine/constants.h"
#include "engine/pattern.h"
#include "engine/polarization.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "test_util.h"

namespace lobecast {
namespace {

using testing::TestArray;

constexpr double kInf = std::numeric_limits<double>::infinity();

double Wavelength() { return kSpeedOfLight_m_s / testing::kTestFrequency_hz; }

AngularGrid Grid(double step_deg, double theta_stop = 180.0) {
  AngularGrid g;
  for (double t = 0; t <= theta_stop + 1e-9; t += step_deg) g.theta_deg.push_back(t);
  for (double p = 0; p < 360.0 - 1e-9; p += step_deg) g.phi_deg.push_back(p);
  return g;
}

PatternOptions Direct() {
  PatternOptions o;
  o.field = testing::DirectMethod();
  return o;
}

TEST(RoundingFloor, IsTheSumOfMagnitudesTimesTheRelativeFloor) {
  // The definition of CONVENTIONS §1: 1e-13 * (w mu0 / 4 pi) * sum |I Le|, images
  // counted as sources.
  const double l = 0.01 * Wavelength();
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.Add(Vec3(0, 0, 0.3), Vec3(1, 0, 0), l, Complex(3.0, 4.0));  // |I| = 5
  a.Add(Vec3(0.2, 0, 0.3), Vec3(0, 0, 1), l, Complex(0.0, -2.0), Distribution::kTriangular);
  const double per = 1e-13 * a.angular_frequency_rad_s() * kMu0_H_m / (4.0 * kPi);
  EXPECT_NEAR(FieldFloor_v(a, a.currents), per * (5.0 * l + 2.0 * 0.5 * l), 1e-15 * per * l);
  a.ground = Ground::kPec;
  EXPECT_NEAR(FieldFloor_v(a, a.currents), 2.0 * per * (5.0 * l + 2.0 * 0.5 * l), 1e-15 * per * l);
}

TEST(RoundingFloor, TurnstileOnAxisIsExactlyCircularWithUndefinedTilt) {
  // Two crossed dipoles in phase quadrature radiate a circular field along the axis
  // (Balanis, Antenna Theory, 4th ed., sec. 2.12, the turnstile, from memory):
  // at theta = 0 every phi of the grid names the same field, so AR 0 dB and no tilt.
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = 0.01 * Wavelength();
  a.Add(Vec3(0, 0, 0), Vec3(1, 0, 0), l, Complex(1.0, 0.0));
  a.Add(Vec3(0, 0, 0), Vec3(0, 1, 0), l, Complex(0.0, -1.0));
  const PatternResult r = ComputePattern(a, a.currents, Grid(5.0), Direct());
  const std::size_t np = r.grid.phi_deg.size();
  for (std::size_t row : {std::size_t{0}, r.grid.theta_deg.size() - 1}) {
    for (std::size_t ip = 0; ip < np; ++ip) {
      const auto k = static_cast<Eigen::Index>(row * np + ip);
      EXPECT_EQ(r.axial_ratio_db[k], 0.0) << "phi " << r.grid.phi_deg[ip];
      EXPECT_TRUE(std::isnan(r.tilt_deg[k])) << r.tilt_deg[k] << " at phi " << r.grid.phi_deg[ip];
      EXPECT_NE(r.sense[static_cast<std::size_t>(k)], 0);
    }
  }
  // The grid peak is on the axis: its phi is undefined, not the first phi of the row.
  EXPECT_EQ(r.summary.peak_theta_deg, 0.0);
  EXPECT_TRUE(std::isnan(r.summary.peak_phi_deg));
  AnalysisOptions ao;
  ao.reference = PolarizationReference::kRightCircular;
  const PatternAnalysis an = AnalyzePattern(a, a.currents, r, ao);
  EXPECT_EQ(an.peak.direction.theta_deg, 0.0);
  EXPECT_TRUE(std::isnan(an.peak.direction.phi_deg)) << an.peak.direction.phi_deg;
  EXPECT_TRUE(std::isnan(an.polarization.tilt_at_peak_deg)) << an.polarization.tilt_at_peak_deg;
  EXPECT_EQ(an.polarization.axial_ratio_at_peak_db, 0.0);
  // The cross (left-hand) part at the peak is below the floor: XPD +inf, not ~300 dB.
  EXPECT_EQ(an.polarization.xpd_at_peak_db, kInf);
  EXPECT_EQ(an.polarization.cross_polar_dbi_at_peak, -kInf);
}

TEST(RoundingFloor, TiltOnTheFrameAxesIsExact) {
  // A linear field along theta_hat with a phi part at the level of rounding: tilt 0,
  // not 1e-14; along phi_hat with theta noise: 90 (the fold of CONVENTIONS §2 keeps
  // +90, never -89.99999999999997).
  const double floor_v = 1e-13;
  const Polarization a = PolarizationOf(1.0, Complex(-1e-15, 2e-16), floor_v);
  EXPECT_EQ(a.tilt_deg, 0.0);
  EXPECT_EQ(a.axial_ratio_db, kInf);
  const Polarization b = PolarizationOf(Complex(1e-16, -3e-16), Complex(-2.0, 0.0), floor_v);
  EXPECT_EQ(b.tilt_deg, 90.0);
  EXPECT_EQ(b.sense, 0);
  const Polarization c = PolarizationOf(1.0, Complex(1.0, 1e-15), floor_v);
  EXPECT_EQ(c.tilt_deg, 45.0);
  // Above the floor the tilt is what the field says (tan 2 tau = S2 / S1).
  const Polarization d = PolarizationOf(1.0, Complex(1e-6, 0.0), 1e-13);
  EXPECT_NEAR(d.tilt_deg, 0.5 * std::atan2(2e-6, 1.0 - 1e-12) / kDegree, 1e-15);
}

TEST(RoundingFloor, CoCrossPartsThatCancelAreExactZeros) {
  // Ludwig-3 (Ludwig 1973): a y-polarized field at phi = 30 deg has E_theta = sin(phi),
  // E_phi = cos(phi), both far above the floor, and an x co-polar part that cancels.
  const double phi = 30.0 * kDegree;
  const CoCross c =
      CoCrossOf(std::sin(phi), std::cos(phi), phi, PolarizationReference::kLinearX, 1e-13);
  EXPECT_EQ(c.co, Complex(0.0));
  EXPECT_NEAR(std::abs(c.cross), 1.0, 1e-15);
}

// A horizontal Hertzian dipole at height h over PEC with its image (reversed
// horizontal current at -h: image theory, Balanis, Antenna Theory, 4th ed., sec. 4.7,
// from memory). With c = k^2 eta0 / (4 pi) and x = 2 k h:
//   |rE(zenith)| = (k eta0 / 4 pi) |I Le| 2 sin(kh)            (the two-element array factor)
//   P = 1/2 |I|^2 c Le^2 [2/3 - (j0(x) - j1(x)/x)] ~ 1/2 |I|^2 c Le^2 (2/15) x^2
// (CONVENTIONS §1's R_mn with u.u' = -1; series of DLMF 10.53.1), so
//   D = 4 pi |rE|^2 / (2 eta0 P) -> 4 pi (k eta0 / 4 pi)^2 4 (kh)^2 / (eta0 c (8/15) (kh)^2)
//     = 4 * 15 / 8 = 7.5 as h -> 0, with O((kh)^2) corrections (4e-13 at h = 1e-7 lambda).
TestArray LowHorizontalDipole(double height_wavelengths) {
  return testing::OneDipoleArray(testing::MakeDipole(Vec3(0, 0, height_wavelengths * Wavelength()),
                                                     Vec3(1, 0, 0), 0.01 * Wavelength()),
                                 Complex(1.0, 0.0), Ground::kPec);
}

TEST(RadiatedPowerDigits, HorizontalDipoleLowOverGroundHasDirectivity7p5) {
  const TestArray a = LowHorizontalDipole(1e-7);
  const PatternResult r = ComputePattern(a, a.currents, Grid(5.0, 90.0), Direct());
  EXPECT_NEAR(r.directivity[0], 7.5, 7.5e-9);  // at least 9 digits
  EXPECT_GE(r.summary.power_significant_digits, kPowerDigitsWanted);
  // The streamed route keeps them too.
  const StreamedPower sp = RadiatedPowerStreamed(a, a.currents);
  EXPECT_NEAR(sp.radiated_power_w / r.radiated_power_w, 1.0, 1e-9);
  EXPECT_GE(PowerSignificantDigits(sp.radiated_power_w, sp.term_magnitudes_w), kPowerDigitsWanted);
  // D(h) for a larger h, against the series of D = 4 pi U / P to O(x^2) is beyond this
  // test; the limit is checked at a second small height as well.
  const TestArray b = LowHorizontalDipole(1e-5);
  const PatternResult rb = ComputePattern(b, b.currents, Grid(5.0, 90.0), Direct());
  EXPECT_NEAR(rb.directivity[0], 7.5, 1e-6);
}

TEST(RadiatedPowerDigits, AntiPhasePairCloseTogetherSaysItLosesDigits) {
  // Two parallel z dipoles 1e-6 lambda apart in anti-phase: P ~ (2/15) x^2 of the
  // terms' magnitudes (x = k d ~ 6e-6), so about 11 of the 15.7 digits cancel.
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = 0.01 * Wavelength();
  a.Add(Vec3(0, 0, 0), Vec3(0, 0, 1), l, Complex(1.0, 0.0));
  a.Add(Vec3(1e-6 * Wavelength(), 0, 0), Vec3(0, 0, 1), l, Complex(-1.0, 0.0));
  const PatternResult r = ComputePattern(a, a.currents, Grid(10.0), Direct());
  EXPECT_LT(r.summary.power_significant_digits, kPowerDigitsWanted);
  EXPECT_GT(r.summary.power_significant_digits, 2.0);
  EXPECT_NE(PowerDigitsNote(r.summary.power_significant_digits), "");
  const StreamedPower sp = RadiatedPowerStreamed(a, a.currents);
  EXPECT_LT(PowerSignificantDigits(sp.radiated_power_w, sp.term_magnitudes_w), kPowerDigitsWanted);
  // One dipole alone loses nothing.
  const TestArray one = testing::OneDipoleArray(
      testing::MakeDipole(Vec3(0, 0, 0), Vec3(0, 0, 1), l), Complex(1.0, 0.0));
  const PatternResult r1 = ComputePattern(one, one.currents, Grid(10.0), Direct());
  EXPECT_GT(r1.summary.power_significant_digits, 15.0);
  EXPECT_EQ(PowerDigitsNote(r1.summary.power_significant_digits), "");
}

TEST(RadiatedPowerDigits, OwnImageSeriesMatchesTheSeparateTermsWhereNothingCancels) {
  // A vertical dipole half a wavelength up: self and image terms add (no cancellation),
  // so the combined kernel equals the sum of the two separate ones to rounding.
  const TestArray a = testing::OneDipoleArray(
      testing::MakeDipole(Vec3(0, 0, 0.3 * Wavelength()), Vec3(0.3, 0.1, 1.0), 0.01 * Wavelength()),
      Complex(1.0, 0.0), Ground::kPec);
  const double k = a.wavenumber_rad_m();
  const Dipole& d = a.dipoles[0];
  const double separate = MutualResistance(d, d, k) + MutualResistance(d, ImageOf(d), k);
  EXPECT_NEAR(SelfResistanceOverGround(d, k), separate, 1e-14 * std::abs(separate));
}

}  // namespace
}  // namespace lobecast
