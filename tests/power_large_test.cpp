// Matrix-free power (engine/power/power_large.h) against the resistance-matrix route
// (engine/power/radiated_power.h) -- the same closed form, two summation orders -- and
// against the handbook self resistance.
#include "engine/power/power_large.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "engine/power/impedance.h"
#include "engine/power/radiated_power.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::RandomArray;
using testing::TestRng;

TEST(StreamedPower, MatchesTheMatrixRoute) {
  TestRng rng(31);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    for (double extent : {0.3, 3.0, 20.0}) {  // mostly near pairs (series) to mostly far ones
      const testing::TestArray a = RandomArray(rng, 257, g, extent);
      const Eigen::VectorXcd cur = a.currents;
      const Eigen::MatrixXd r = ResistanceMatrix(a);
      const StreamedPower s = RadiatedPowerStreamed(a, cur);
      const double p = RadiatedPower(r, cur);
      EXPECT_NEAR(s.radiated_power_w, p, 1e-12 * std::abs(p))
          << ToString(g) << " extent " << extent;
      const Eigen::MatrixXcd z = ImpedanceMatrix(a, Eigen::VectorXd::Zero(a.size()));
      const Eigen::VectorXd act = ActiveImpedance(z, cur).real();
      // Active resistances are differences of large terms (reactances grow like
      // 1/x^3 at close spacing): compare element m on the scale of sum |Z_mn I_n| / |I_m|.
      const Eigen::VectorXd scale = (z.cwiseAbs() * cur.cwiseAbs()).cwiseQuotient(cur.cwiseAbs());
      for (Eigen::Index m = 0; m < act.size(); ++m) {
        EXPECT_NEAR(s.active_resistance_ohm[m], act[m], 1e-12 * scale[m])
            << ToString(g) << " extent " << extent << " element " << m;
      }
    }
  }
}

TEST(StreamedPower, ResistanceProductMatchesTheMatrix) {
  // R x streamed (for iterative solvers) against the matrix times x, row by row on
  // the scale of sum_n |R_mn x_n|.
  TestRng rng(37);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = RandomArray(rng, 200, g, 1.0);
    const Eigen::MatrixXd r = ResistanceMatrix(a);
    const Eigen::VectorXcd expected = r * a.currents;
    const Eigen::VectorXcd got = ResistanceProductStreamed(a, a.currents);
    const Eigen::VectorXd scale = r.cwiseAbs() * a.currents.cwiseAbs();
    for (Eigen::Index m = 0; m < got.size(); ++m)
      EXPECT_LE(std::abs(got[m] - expected[m]), 1e-12 * scale[m]) << ToString(g) << " row " << m;
  }
}

TEST(StreamedPower, SingleHertzianDipoleMatchesHandbook) {
  // R = (2 pi / 3) eta0 (l / lambda)^2 (Balanis 4th ed. sec. 4.2, eq. 4-19, written
  // with eta0 instead of 120 pi as CONVENTIONS §1 asks; equation number from memory).
  testing::TestArray a = testing::OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3(1, 2, 2) / 3.0, 0.0),
                                                 Complex(0.3, -0.4));
  a.dipoles[0].length_m = a.wavelength_m() / 40;
  const double r = 2 * kPi / 3 * kEta0_ohm * std::pow(1.0 / 40, 2);
  const StreamedPower s = RadiatedPowerStreamed(a, a.currents);
  EXPECT_NEAR(s.radiated_power_w, 0.5 * 0.25 * r, 1e-14 * r);
  EXPECT_NEAR(s.active_resistance_ohm[0], r, 1e-13 * r);
}

TEST(StreamedPower, ThreadCountDoesNotChangeTheResult) {
  TestRng rng(32);
  const testing::TestArray a = RandomArray(rng, 600, Ground::kPec, 8.0);
  const StreamedPower s1 = RadiatedPowerStreamed(a, a.currents, 1);
  const StreamedPower s2 = RadiatedPowerStreamed(a, a.currents, 2);
  EXPECT_EQ(s1.radiated_power_w, s2.radiated_power_w);
  EXPECT_EQ((s1.active_resistance_ohm - s2.active_resistance_ohm).cwiseAbs().maxCoeff(), 0.0);
}

TEST(StreamedPower, ZeroCurrentGivesNanActiveResistance) {
  TestRng rng(33);
  testing::TestArray a = RandomArray(rng, 4, Ground::kNone);
  a.currents[2] = 0.0;
  const StreamedPower s = RadiatedPowerStreamed(a, a.currents);
  EXPECT_TRUE(std::isnan(s.active_resistance_ohm[2]));
  EXPECT_FALSE(std::isnan(s.active_resistance_ohm[1]));
  EXPECT_THROW(RadiatedPowerStreamed(a, Eigen::VectorXcd::Ones(3)), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
