// Friis transmission, polarization loss factor, far-field region and exposure
// distance (engine/link/). Each check names its source beside it.
#include <gtest/gtest.h>

#include <cmath>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/link/exposure.h"
#include "engine/link/far_field_region.h"
#include "engine/link/link_budget.h"
#include "engine/polarization.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using Cv = Eigen::Vector3cd;
const Complex j(0, 1);

// Balanis, Antenna Theory, 4th ed., sec. 2.17 (the Friis transmission equation),
// worked example of two lossless horns 100 lambda apart, directivities 16 and 20 dB,
// 2 W input, reflection coefficients 0.1 and 0.2, polarization matched (inputs from
// memory). P_r = 2 (1 - 0.1^2)(1 - 0.2^2) 10^1.6 10^2 (1 / (400 pi))^2 = 4.792 mW by
// hand from the equation (the mismatch factors fold into the gains: realized gain).
TEST(Friis, HandbookWorkedExample) {
  LinkInputs in;
  in.power_w = 2.0;
  in.tx_gain = std::pow(10.0, 1.6) * (1 - 0.1 * 0.1);
  in.rx_gain = 100.0 * (1 - 0.2 * 0.2);
  in.wavelength_m = 0.03;
  in.distance_m = 100 * in.wavelength_m;
  const LinkBudget b = Friis(in);
  EXPECT_NEAR(b.received_w, 4.792e-3, 0.0005e-3);
  EXPECT_NEAR(b.path_loss, std::pow(400 * kPi, 2), 1e-9 * b.path_loss);
  EXPECT_DOUBLE_EQ(b.eirp_w, in.power_w * in.tx_gain);
}

// ITU-R P.525 free-space basic transmission loss, L = 32.4 + 20 log f(MHz) + 20 log
// d(km) dB (from memory; its 32.4 is 20 log10(4 pi 1e9 / c0) = 32.4478 here).
TEST(Friis, PathLossMatchesTheDecibelRule) {
  for (double f_mhz : {433.92, 2450.0, 10000.0}) {
    for (double d_km : {0.01, 1.0, 35786.0}) {
      const double l_db =
          10 * std::log10(FreeSpacePathLoss(d_km * 1e3, kSpeedOfLight_m_s / (f_mhz * 1e6)));
      const double rule = 20 * std::log10(4 * kPi * 1e9 / kSpeedOfLight_m_s) +
                          20 * std::log10(f_mhz) + 20 * std::log10(d_km);
      EXPECT_NEAR(l_db, rule, 1e-9) << f_mhz << " MHz, " << d_km << " km";
      EXPECT_NEAR(rule - 20 * std::log10(f_mhz) - 20 * std::log10(d_km), 32.45, 0.01);
    }
  }
}

TEST(Friis, RefusesWhatIsNotALink) {
  LinkInputs in{1.0, 1.0, 1.0, 1.0, 10.0, 1.0};
  EXPECT_NO_THROW(Friis(in));
  for (auto bad : {&LinkInputs::power_w, &LinkInputs::distance_m, &LinkInputs::wavelength_m}) {
    LinkInputs b = in;
    b.*bad = 0.0;
    EXPECT_THROW(Friis(b), InvalidArgument);
  }
  LinkInputs g = in;
  g.tx_gain = -1;
  EXPECT_THROW(Friis(g), InvalidArgument);
  g = in;
  g.polarization_loss_factor = 1.5;
  EXPECT_THROW(Friis(g), InvalidArgument);
  g = in;
  g.polarization_loss_factor = std::nan("");
  EXPECT_TRUE(std::isnan(Friis(g).received_w));
  // A null toward the receiver: no field, no polarization, nothing received.
  g.tx_gain = 0;
  EXPECT_EQ(Friis(g).received_w, 0.0);
  g.tx_gain = 1;
  g.rx_gain = 0;
  EXPECT_EQ(Friis(g).received_w, 0.0);
}

// Polarization loss factor (IEEE Std 145-2013, polarization efficiency; Balanis
// sec. 2.12.2): 1 matched, 0 orthogonal linear, 1/2 linear against circular, 0 RHCP
// against LHCP. The wave travels along +r_hat; the receiver's own field travels
// along -r_hat, and its hand is referred to -r_hat (engine/link/link_budget.h).
struct Frame {
  Vec3 r, t, p;  // r_hat, theta_hat, phi_hat at the direction of travel
};
Frame FrameAt(double theta_deg, double phi_deg) {
  const double t = theta_deg * kDegree, p = phi_deg * kDegree;
  return {UnitVectorAt(t, p), ThetaHatAt(t, p), PhiHatAt(p)};
}
Cv Wave(const Frame& f, Complex et, Complex ep) {
  return et * f.t.cast<Complex>() + ep * f.p.cast<Complex>();
}
Cv Rhcp(const Frame& f) { return Wave(f, 1 / std::sqrt(2.0), -j / std::sqrt(2.0)); }
Cv Lhcp(const Frame& f) { return Wave(f, 1 / std::sqrt(2.0), j / std::sqrt(2.0)); }

TEST(PolarizationLoss, StandardCasesWithTheReceiverLookingBack) {
  for (const auto& [theta, phi] : {std::pair{90.0, 0.0}, std::pair{30.0, 200.0},
                                   std::pair{0.0, 0.0}, std::pair{135.0, 77.0}}) {
    const Frame tx = FrameAt(theta, phi);
    // The receiver's direction toward the transmitter: the antipode.
    const Frame rx = FrameAt(180 - theta, phi + 180);
    ASSERT_LT((rx.r + tx.r).norm(), 1e-15);
    SCOPED_TRACE(::testing::Message() << "theta " << theta << " phi " << phi);
    // Linear: the same line in space is matched whatever the direction of travel.
    const Cv lin = Wave(tx, 1.0, 0.0);
    EXPECT_NEAR(PolarizationLossFactor(lin, 0, lin, 0), 1.0, 1e-15);
    EXPECT_NEAR(PolarizationLossFactor(lin, 0, Wave(tx, 0.0, 2.0), 0), 0.0, 1e-30);
    // 45 deg against 0 deg: cos^2 45 = 1/2 (Malus).
    EXPECT_NEAR(PolarizationLossFactor(Wave(tx, 1.0, 1.0), 0, lin, 0), 0.5, 1e-15);
    // Circular: RHCP toward +r against a receiver that radiates RHCP toward -r.
    EXPECT_NEAR(PolarizationLossFactor(Rhcp(tx), 0, Rhcp(rx), 0), 1.0, 1e-15);
    EXPECT_NEAR(PolarizationLossFactor(Lhcp(tx), 0, Lhcp(rx), 0), 1.0, 1e-15);
    EXPECT_NEAR(PolarizationLossFactor(Rhcp(tx), 0, Lhcp(rx), 0), 0.0, 1e-30);
    EXPECT_NEAR(PolarizationLossFactor(Lhcp(tx), 0, Rhcp(rx), 0), 0.0, 1e-30);
    EXPECT_NEAR(PolarizationLossFactor(Rhcp(tx), 0, lin, 0), 0.5, 1e-15);
    EXPECT_NEAR(PolarizationLossFactor(lin, 0, Lhcp(rx), 0), 0.5, 1e-15);
    // Scale and phase do not matter.
    EXPECT_NEAR(PolarizationLossFactor(3.0 * std::exp(j * 0.7) * Rhcp(tx), 0,
                                       1e-3 * std::exp(-j * 2.1) * Rhcp(rx), 0),
                1.0, 1e-15);
  }
}

TEST(PolarizationLoss, FloorsDecideZerosAndUndefined) {
  const Frame tx = FrameAt(90, 0);
  const Cv a = Wave(tx, 1.0, 1e-15), b = Wave(tx, 0.0, 1.0);
  // A residual product below the floors' rounding is an exact zero ...
  EXPECT_EQ(PolarizationLossFactor(a, 1e-13, b, 1e-13), 0.0);
  // ... and a number when the floors are smaller than it.
  EXPECT_GT(PolarizationLossFactor(a, 1e-20, b, 1e-20), 0.0);
  // A field below its floor has no polarization.
  EXPECT_TRUE(std::isnan(PolarizationLossFactor(Cv::Zero(), 0, b, 0)));
  EXPECT_TRUE(std::isnan(PolarizationLossFactor(a, 2.0, b, 0)));
}

// The named receivers: PLF = |co|^2 / |E|^2 for the reference (CoCrossOf), the same
// numbers as the vector form against a receiver radiating that polarization back.
TEST(PolarizationLoss, NamedReceiverAgreesWithTheVectorForm) {
  const double theta = 60, phi = 35;
  const Frame tx = FrameAt(theta, phi), rx = FrameAt(180 - theta, phi + 180);
  const Complex et(0.3, -1.1), ep(0.8, 0.25);
  const Cv e = Wave(tx, et, ep);
  auto named = [&](PolarizationReference ref) {
    const CoCross cc = CoCrossOf(et, ep, phi * kDegree, ref);
    return PolarizationLossFactor(cc.co, cc.cross);
  };
  EXPECT_NEAR(named(PolarizationReference::kRightCircular),
              PolarizationLossFactor(e, 0, Rhcp(rx), 0), 1e-14);
  EXPECT_NEAR(named(PolarizationReference::kLeftCircular),
              PolarizationLossFactor(e, 0, Lhcp(rx), 0), 1e-14);
  EXPECT_NEAR(named(PolarizationReference::kTheta),
              PolarizationLossFactor(e, 0, tx.t.cast<Complex>(), 0), 1e-14);
  EXPECT_NEAR(named(PolarizationReference::kPhi),
              PolarizationLossFactor(e, 0, tx.p.cast<Complex>(), 0), 1e-14);
  EXPECT_NEAR(
      named(PolarizationReference::kRightCircular) + named(PolarizationReference::kLeftCircular),
      1.0, 1e-15);
  EXPECT_TRUE(std::isnan(PolarizationLossFactor(Complex(0), Complex(0))));
}

// r = sqrt(EIRP / (4 pi S)) is the inverse of S = EIRP / (4 pi r^2) (Balanis sec. 2.4,
// from memory); 100 W EIRP falls to 10 W/m^2 at sqrt(100 / (40 pi)) = 0.8921 m (by hand).
TEST(Exposure, DistanceIsTheInverseOfTheDensity) {
  EXPECT_NEAR(DistanceToDensity(100.0, 10.0), 0.8921, 0.00005);
  for (double eirp : {1e-3, 1.0, 2.5e3, 1e6}) {
    for (double r : {0.1, 3.0, 1e4}) {
      const double s = PowerDensity(eirp, r);
      EXPECT_NEAR(DistanceToDensity(eirp, s), r, 1e-14 * r);
      EXPECT_NEAR(s * 4 * kPi * r * r, eirp, 1e-14 * eirp);
    }
  }
  EXPECT_EQ(DistanceToDensity(0.0, 1.0), 0.0);
  EXPECT_THROW(DistanceToDensity(1.0, 0.0), InvalidArgument);
  EXPECT_THROW(DistanceToDensity(-1.0, 1.0), InvalidArgument);
  EXPECT_THROW(PowerDensity(1.0, 0.0), InvalidArgument);
}

// 2 D^2 / lambda with D the largest dimension (Balanis sec. 2.2.4, from memory).
TEST(FarFieldRegion, LargestDimensionAndFraunhoferDistance) {
  const double lambda = testing::TestWavelength_m();
  Array a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = 0.01 * lambda;
  a.dipoles.push_back(testing::MakeDipole(Vec3(0, 0, 0), Vec3::UnitZ(), l));
  a.dipoles.push_back(testing::MakeDipole(Vec3(3 * lambda, 4 * lambda, 0), Vec3::UnitZ(), l));
  FarFieldRegionResult r = FarFieldRegionOf(a);
  // Ends of the dipoles: the two far ends are sqrt(5^2 lambda^2 + l^2) apart.
  const double d = std::hypot(5 * lambda, l);
  EXPECT_NEAR(r.region.largest_dimension_m, d, 1e-12 * d);
  EXPECT_NEAR(r.region.fraunhofer_m, 2 * d * d / lambda, 1e-12 * d);
  EXPECT_NEAR(r.region.few_wavelengths_m, 3 * lambda, 1e-15);
  EXPECT_DOUBLE_EQ(r.region.start_m(), r.region.fraunhofer_m);
  EXPECT_FALSE(r.largest_dimension_is_bound);
  // Over PEC ground the images radiate too: a dipole at height h spans 2 h + l.
  Array g;
  g.frequency_hz = a.frequency_hz;
  g.ground = Ground::kPec;
  g.dipoles.push_back(testing::MakeDipole(Vec3(0, 0, 0.25 * lambda), Vec3::UnitZ(), l));
  r = FarFieldRegionOf(g);
  EXPECT_NEAR(r.region.largest_dimension_m, 0.5 * lambda + l, 1e-12);
  // A small array: a few wavelengths decide.
  EXPECT_DOUBLE_EQ(r.region.start_m(), 3 * lambda);
}

}  // namespace
}  // namespace lobecast
