// Self reactance and ohmic loss of thin short dipoles
// (engine/coupling/self_impedance.h) and the Gauss-Legendre rule it uses.
#include "engine/coupling/self_impedance.h"

#include <cmath>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "engine/quadrature.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;

TEST(GaussLegendre, IntegratesPolynomialsToDegreeTwoNMinusOne) {
  // int_-1^1 x^d dx = 2 / (d + 1) for even d, 0 for odd (exact, by hand).
  for (int n : {1, 2, 5, 16, 40}) {
    const QuadratureRule q = GaussLegendre(n);
    for (int d = 0; d <= 2 * n - 1; ++d) {
      double sum = 0;
      for (int i = 0; i < n; ++i) sum += q.weights[i] * std::pow(q.nodes[i], d);
      EXPECT_NEAR(sum, d % 2 ? 0.0 : 2.0 / (d + 1), 1e-14) << "n " << n << " degree " << d;
    }
  }
  // Abramowitz and Stegun (1964) table 25.4, n = 2: nodes +-1/sqrt(3), weights 1.
  const QuadratureRule q2 = GaussLegendre(2);
  EXPECT_NEAR(q2.nodes[1], 1 / std::sqrt(3.0), 4e-16);
  EXPECT_NEAR(q2.weights[0], 1.0, 1e-15);
}

double K() { return 2 * kPi; }  // lambda = 1 m

TEST(SelfReactance, NearTheTextbookShortDipoleForm) {
  // X = -120 (ln(l/2a) - 1) / tan(pi l / lambda) (with eta0 = 120 pi; Balanis 4th ed.,
  // from memory) is the leading order in a/l and kl of the same integral: agreement
  // within a few per cent where it holds (l / a >= 100, l <= lambda / 10), with the
  // 120 pi vs eta0 ratio 0.99931 of CONVENTIONS §1 well inside.
  for (double l : {0.01, 0.05, 0.1}) {
    for (double ratio : {100.0, 1e3, 1e4}) {
      const Dipole d = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), l, Distribution::kTriangular);
      const double x = SelfReactance(d, l / ratio, K());
      const double ref = SelfReactanceShortForm(l, l / ratio, K());
      EXPECT_LT(x, 0) << "short dipoles are capacitive";
      EXPECT_NEAR(x, ref, 0.03 * std::abs(ref)) << "l " << l << " l/a " << ratio;
    }
  }
}

TEST(SelfReactance, LimitsAndRefusals) {
  const Dipole d = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.02, Distribution::kTriangular);
  // Thinner wire: more capacitive; the leading term grows like ln(l/2a).
  EXPECT_LT(SelfReactance(d, 1e-5, K()), SelfReactance(d, 1e-4, K()));
  // Quasi-static: X ~ -1/(w C), so X(k) k is constant to O((kl)^2) at small kl.
  EXPECT_NEAR(SelfReactance(d, 1e-4, K() / 10) / 10, SelfReactance(d, 1e-4, K()),
              2e-2 * std::abs(SelfReactance(d, 1e-4, K())));
  // Translation and orientation do not matter.
  const Dipole e = MakeDipole(Vec3(3, -2, 7), Vec3(1, 2, 2), 0.02, Distribution::kTriangular);
  EXPECT_DOUBLE_EQ(SelfReactance(d, 1e-4, K()), SelfReactance(e, 1e-4, K()));
  const Dipole u = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.02, Distribution::kUniform);
  EXPECT_THROW(SelfReactance(u, 1e-4, K()), InvalidArgument);
  EXPECT_THROW(SelfReactance(d, 0.0, K()), InvalidArgument);
  EXPECT_THROW(SelfReactance(d, 0.01, K()), InvalidArgument);  // radius not below l/2
}

TEST(LossResistance, SkinEffectFormula) {
  // Copper (sigma = 5.8e7 S/m, a handbook value from memory) at 100 MHz: skin depth
  // 6.6 um; a 1 mm wire 0.1 m long carrying a uniform current:
  // R = l / (2 pi a) sqrt(w mu0 / (2 sigma)), computed here by hand from the
  // formula's parts (Balanis 4th ed. eq. 2-90b, from memory).
  const double w = 2 * kPi * 1e8, sigma = 5.8e7, a = 1e-3, l = 0.1;
  const Dipole u = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), l, Distribution::kUniform);
  const OhmicLoss loss = LossResistance(u, a, sigma, w);
  const double rs = std::sqrt(w * 4e-7 * kPi / (2 * sigma));  // mu0 ~ 4 pi 1e-7 (1.6e-10 rel)
  EXPECT_NEAR(loss.resistance_ohm, l / (2 * kPi * a) * rs, 1e-9 * loss.resistance_ohm);
  EXPECT_NEAR(loss.skin_depth_m, 6.6e-6, 0.05e-6);
  EXPECT_TRUE(loss.skin_effect_valid);
  // A triangular current carries a third of the mean square current.
  const Dipole t = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), l, Distribution::kTriangular);
  EXPECT_NEAR(LossResistance(t, a, sigma, w).resistance_ohm, loss.resistance_ohm / 3,
              1e-15 * loss.resistance_ohm);
  // A wire thinner than twice the skin depth is flagged.
  EXPECT_FALSE(LossResistance(u, 1e-5, sigma, w).skin_effect_valid);
  EXPECT_THROW(LossResistance(u, a, 0.0, w), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
