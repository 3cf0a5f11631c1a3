// Mutual impedance of elemental dipoles and the active resistance
// (engine/power/impedance.h, engine/power/power_large.h), against methods that do
// not share its closed form:
//  - the field of dipole n at r_m from its vector potential with numerical
//    derivatives, E = -j w A + grad(div A) / (j w mu0 eps0) (Balanis, Antenna
//    Theory, 4th ed., 2016, sec. 3.6; section from memory), with
//    Z_mn = -Le_m u_m . E_n(r_m) / I_n (induced EMF of a point dipole);
//  - the near and far fields of the infinitesimal dipole in spherical components
//    (Balanis 4th ed. sec. 4.2, eqs. 4-10a..c; equation numbers from memory);
//  - the mutual resistance R_mn of radiated_power.h (checked there against
//    quadrature of the far field), which Re Z_mn must equal.
#include "engine/power/impedance.h"

#include <cmath>
#include <complex>

#include <gtest/gtest.h>

#include "engine/ground.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::MakeDipole;
using testing::OneDipoleArray;
using testing::RandomArray;
using testing::TestRng;
using CLd = std::complex<long double>;

// Z_mn from the vector potential of dipole n (current 1 A) with the Hessian of
// psi = exp(-j k r) / (4 pi r) by central differences in long double:
//   E = -j w mu0 Le_n [psi u_n + (1/k^2) H(psi) u_n],  Z_mn = -Le_m u_m . E.
Complex ImpedanceByDifferences(const Dipole& m, const Dipole& n, double k) {
  const long double kk = k;
  const Vec3 d = m.position_m - n.position_m;
  // Step well below both the distance and 1/k: truncation ~ (h/r)^2 and (h k)^2.
  const long double h = 1e-4L * std::min(d.norm(), 1.0 / k);
  auto psi = [&](long double x, long double y, long double z) {
    const long double r = std::sqrt(x * x + y * y + z * z);
    return std::exp(CLd(0, -kk * r)) / (4.0L * 3.14159265358979323846264338327950288L * r);
  };
  const long double p[3] = {d.x(), d.y(), d.z()};
  CLd hess[3][3];
  for (int a = 0; a < 3; ++a) {
    for (int b = 0; b < 3; ++b) {
      auto at = [&](int sa, int sb) {
        long double q[3] = {p[0], p[1], p[2]};
        q[a] += sa * h;
        q[b] += sb * h;
        return psi(q[0], q[1], q[2]);
      };
      hess[a][b] = (at(1, 1) - at(1, -1) - at(-1, 1) + at(-1, -1)) / (4.0L * h * h);
    }
  }
  const CLd psi0 = psi(p[0], p[1], p[2]);
  CLd dot = 0;  // u_m . [psi I + H / k^2] . u_n
  for (int a = 0; a < 3; ++a) {
    CLd row = psi0 * static_cast<long double>(n.orientation[a]);
    for (int b = 0; b < 3; ++b)
      row += hess[a][b] * static_cast<long double>(n.orientation[b]) / (kk * kk);
    dot += static_cast<long double>(m.orientation[a]) * row;
  }
  const long double w_mu0 = kk * static_cast<long double>(kEta0_ohm);  // w mu0 = k eta0
  const CLd z = CLd(0, w_mu0) * static_cast<long double>(m.effective_length_m()) *
                static_cast<long double>(n.effective_length_m()) * dot;
  return Complex(static_cast<double>(z.real()), static_cast<double>(z.imag()));
}

// Z_mn from the spherical field components of the infinitesimal dipole n
// (current 1 A, axis u_n) at r = r_m - r_n (Balanis 4th ed. eqs. 4-10a, 4-10b):
//   E_r     = eta0 I Le cos(t) / (2 pi r^2) [1 + 1/(j k r)] exp(-j k r)
//   E_theta = j eta0 k I Le sin(t) / (4 pi r) [1 + 1/(j k r) - 1/(k r)^2] exp(-j k r)
Complex ImpedanceBySphericalField(const Dipole& m, const Dipole& n, double k) {
  const Vec3 d = m.position_m - n.position_m;
  const double r = d.norm();
  const Vec3 rh = d / r;
  const double ct = n.orientation.dot(rh);
  const double st = std::sqrt(std::max(0.0, 1.0 - ct * ct));
  const Complex j(0, 1), e = std::exp(-j * (k * r));
  const double le = n.effective_length_m();
  const Complex er = kEta0_ohm * le * ct / (2 * kPi * r * r) * (1.0 + 1.0 / (j * k * r)) * e;
  const Complex et = j * kEta0_ohm * k * le * st / (4 * kPi * r) *
                     (1.0 + 1.0 / (j * k * r) - 1.0 / (k * r * k * r)) * e;
  Vec3 theta_hat = Vec3::Zero();  // along increasing angle from u_n
  if (st > 1e-15) theta_hat = (ct * rh - n.orientation) / st;
  const Complex e_dot_um = er * m.orientation.dot(rh) + et * m.orientation.dot(theta_hat);
  return -m.effective_length_m() * e_dot_um;
}

double Lambda() { return kSpeedOfLight_m_s / testing::kTestFrequency_hz; }
double K() { return 2 * kPi / Lambda(); }

TEST(MutualImpedance, MatchesTheVectorPotentialByDifferences) {
  TestRng rng(70);
  const double lambda = Lambda();
  for (int t = 0; t < 40; ++t) {
    const double dist = lambda * std::pow(10.0, rng.Uniform(-2.0, 1.0));  // x from 0.06 to 63
    const Dipole a = MakeDipole(Vec3::Zero(), rng.UnitVector(), 0.01 * lambda);
    const Dipole b = MakeDipole(dist * rng.UnitVector(), rng.UnitVector(), 0.02 * lambda,
                                Distribution::kTriangular);
    const Complex z = MutualImpedance(b, a, K());
    const Complex ref = ImpedanceByDifferences(b, a, K());
    // Central differences with h = 1e-4 min(r, 1/k): truncation ~ 1e-7 relative.
    EXPECT_LT(std::abs(z - ref), 1e-6 * std::abs(ref))
        << "x = " << K() * dist << " z " << z << " ref " << ref;
  }
}

TEST(MutualImpedance, MatchesTheSphericalFieldComponents) {
  TestRng rng(71);
  const double lambda = Lambda();
  for (int t = 0; t < 200; ++t) {
    const double dist = lambda * std::pow(10.0, rng.Uniform(-3.0, 2.0));
    const Dipole a = MakeDipole(rng.UnitVector(), rng.UnitVector(), 0.01 * lambda);
    const Dipole b =
        MakeDipole(a.position_m + dist * rng.UnitVector(), rng.UnitVector(), 0.03 * lambda);
    const Complex z = MutualImpedance(b, a, K());
    const Complex ref = ImpedanceBySphericalField(b, a, K());
    // Both closed forms, different algebra: agreement to rounding of the largest term.
    const double x = K() * dist;
    const double scale =
        K() * K() * kEta0_ohm / (4 * kPi) * 0.01 * 0.03 * lambda * lambda * (1 + 3 / (x * x * x));
    EXPECT_LT(std::abs(z - ref), 1e-12 * scale) << "x = " << x;
  }
}

TEST(MutualImpedance, RealPartIsTheMutualResistanceAndReciprocal) {
  TestRng rng(72);
  const double lambda = Lambda();
  for (int t = 0; t < 300; ++t) {
    const double dist = lambda * std::pow(10.0, rng.Uniform(-4.0, 2.0));
    const Dipole a = MakeDipole(rng.UnitVector(), rng.UnitVector(), 0.01 * lambda);
    const Dipole b = MakeDipole(a.position_m + dist * rng.UnitVector(), rng.UnitVector(),
                                0.02 * lambda, Distribution::kTriangular);
    const Complex zab = MutualImpedance(a, b, K()), zba = MutualImpedance(b, a, K());
    const double r = MutualResistance(a, b, K());
    const double rself = MutualResistance(a, a, K());
    // CONVENTIONS §1: Re Z = R to rounding (the same series below x = 2).
    EXPECT_NEAR(zab.real(), r, 1e-14 * rself) << "x = " << K() * dist;
    EXPECT_EQ(zab, zba);  // reciprocity, exactly: the same expression
  }
}

TEST(MutualImpedance, ParallelSideBySideHasTheHandbookLimits) {
  // Two parallel z dipoles side by side at distance d:
  //  far (x >> 1): Z12 -> j k eta0 Le^2 exp(-j x) / (4 pi d), the far field of one
  //    (Balanis 4th ed. eq. 4-26a, from memory) times -Le of the other;
  //  near (x << 1): Z12 -> -j eta0 Le^2 / (4 pi k d^3), the quasi-static coupling of
  //    two charge dipoles (capacitive).
  const double lambda = Lambda(), le = 0.01 * lambda;
  const Dipole a = MakeDipole(Vec3::Zero(), Vec3::UnitZ(), le);
  for (double x : {1e3, 1e4}) {
    const double d = x / K();
    const Dipole b = MakeDipole(Vec3(d, 0, 0), Vec3::UnitZ(), le);
    const Complex ref =
        Complex(0, 1) * K() * kEta0_ohm * le * le * std::exp(Complex(0, -x)) / (4 * kPi * d);
    EXPECT_LT(std::abs(MutualImpedance(a, b, K()) - ref), 2.0 / x * std::abs(ref)) << x;
  }
  for (double x : {1e-3, 1e-4}) {
    const double d = x / K();
    const Dipole b = MakeDipole(Vec3(d, 0, 0), Vec3::UnitZ(), le);
    const double xref = -kEta0_ohm * le * le / (4 * kPi * K() * d * d * d);
    EXPECT_NEAR(MutualImpedance(a, b, K()).imag(), xref, 2 * x * x * std::abs(xref)) << x;
  }
}

TEST(MutualImpedance, CoincidentDipoles) {
  const double lambda = Lambda();
  const Dipole a = MakeDipole(Vec3::Zero(), Vec3::UnitX(), 0.01 * lambda);
  const Dipole b = MakeDipole(Vec3::Zero(), Vec3::UnitY(), 0.01 * lambda);
  const Dipole c = MakeDipole(Vec3::Zero(), Vec3(1, 1, 0), 0.01 * lambda);
  EXPECT_EQ(MutualImpedance(a, b, K()), Complex(0.0));  // crossed: zero by symmetry
  const Complex zac = MutualImpedance(a, c, K());
  EXPECT_NEAR(zac.real(), MutualResistance(a, c, K()), 1e-15);
  EXPECT_TRUE(std::isnan(zac.imag()));  // no finite reactance in the point model
}

TEST(ImpedanceMatrix, GroundAddsTheImageCouplingAndSelfReactanceGoesOnTheDiagonal) {
  TestRng rng(73);
  const testing::TestArray a = RandomArray(rng, 9, Ground::kPec, 1.0);
  const Eigen::VectorXd xs = Eigen::VectorXd::LinSpaced(9, -300.0, 100.0);
  const Eigen::MatrixXcd z = ImpedanceMatrix(a, xs);
  const Eigen::MatrixXd r = ResistanceMatrix(a);
  const double rmax = r.cwiseAbs().maxCoeff();
  for (int m = 0; m < 9; ++m) {
    for (int n = 0; n < 9; ++n) {
      const Dipole& dm = a.dipoles[m];
      const Dipole& dn = a.dipoles[n];
      // Free-space Z between m and (n and n's image), written out here.
      Complex ref = MutualImpedance(dm, ImageOf(dn), K());
      ref += m == n ? Complex(MutualResistance(dm, dm, K()), xs[m]) : MutualImpedance(dm, dn, K());
      EXPECT_LT(std::abs(z(m, n) - ref), 1e-13 * std::abs(ref)) << m << "," << n;
      EXPECT_NEAR(z(m, n).real(), r(m, n), 1e-14 * rmax);
      EXPECT_EQ(z(m, n), z(n, m));
    }
  }
}

// A horizontal dipole 1e-7 wavelength over PEC: it and its reversed image nearly
// cancel, so R = (k^2 eta0 Le^2 / 4 pi)(2/3 - (j0(x) - j1(x)/x)) with x = 2 k h is a
// difference of two numbers 10^12 times larger. Against the power series of j0 and j1
// (DLMF 10.53.1; equation number from memory): 2/3 - (j0 - j1/x) = 2x^2/15 - x^4/140 +
// O(x^6). Adding the image's term to the free-space self term loses ~4 of the digits.
TEST(ImpedanceMatrix, DipoleLowOverGroundKeepsTheDigitsOfItsResistance) {
  const double lambda = Lambda();
  const double h = 1e-7 * lambda;
  const testing::TestArray a = OneDipoleArray(
      MakeDipole(Vec3(0.0, 0.0, h), Vec3::UnitX(), 0.01 * lambda), 1.0, Ground::kPec);
  const Eigen::MatrixXcd z = ImpedanceMatrix(a, Eigen::VectorXd::Zero(1));
  const double x = 2.0 * K() * h;
  const double le = a.dipoles[0].effective_length_m();
  const double series =
      K() * K() * kEta0_ohm / (4.0 * kPi) * le * le * (2.0 * x * x / 15.0 - std::pow(x, 4) / 140.0);
  EXPECT_NEAR(z(0, 0).real(), series, 1e-12 * series);
  EXPECT_EQ(z(0, 0).real(), ResistanceMatrix(a)(0, 0));
}

TEST(ActiveResistance, EndfirePairNeedsTheMutualReactance) {
  // Two parallel z dipoles lambda/4 apart, currents 1 and -j (the endfire sample).
  // Independent computation: Z12 from the vector potential by differences, then
  // R_act,1 = R11 + Re(Z12 I2 / I1), R_act,2 = R22 + Re(Z21 I1 / I2).
  // By hand with eta0 = 376.73 ohm, Le = 0.02 lambda: R11 = 0.31561 ohm,
  // Z12 = 0.17924 - j 0.19187 ohm, so 0.12374 and 0.50748 ohm; the old
  // Re(sum R_mn I_n / I_m) gave 0.31561 for both.
  const double lambda = Lambda();
  testing::TestArray a =
      OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.02 * lambda), 1.0);
  a.Add(Vec3(0.25 * lambda, 0, 0), Vec3::UnitZ(), 0.02 * lambda, Complex(0, -1));
  const Complex z12 = ImpedanceByDifferences(a.dipoles[0], a.dipoles[1], K());
  const double r11 = MutualResistance(a.dipoles[0], a.dipoles[0], K());
  const double ref1 = r11 + (z12 * Complex(0, -1)).real();
  const double ref2 = r11 + (z12 / Complex(0, -1)).real();
  EXPECT_NEAR(ref1, 0.12374, 1e-5);  // the hand values above
  EXPECT_NEAR(ref2, 0.50748, 1e-5);
  for (const Eigen::VectorXd& act :
       {RadiatedPowerStreamed(a, a.currents).active_resistance_ohm,
        Eigen::VectorXd(
            ActiveImpedance(ImpedanceMatrix(a, Eigen::VectorXd::Zero(2)), a.currents).real())}) {
    EXPECT_NEAR(act[0], ref1, 1e-6 * r11);
    EXPECT_NEAR(act[1], ref2, 1e-6 * r11);
  }
}

TEST(ActiveResistance, WeightedSumIsThePowerAndSelfReactanceDoesNotMatter) {
  // sum_m 1/2 |I_m|^2 Re Z_act,m = 1/2 Re(I^H Z I) = 1/2 I^H R I = P (Z symmetric,
  // X real: I^H X I is real), whatever the self reactances.
  TestRng rng(74);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = RandomArray(rng, 17, g);
    const Eigen::VectorXcd i = a.currents;
    const Eigen::VectorXd act0 =
        ActiveImpedance(ImpedanceMatrix(a, Eigen::VectorXd::Zero(17)), i).real();
    const Eigen::VectorXd act1 =
        ActiveImpedance(ImpedanceMatrix(a, Eigen::VectorXd::Constant(17, -1e3)), i).real();
    double sum = 0;
    for (int m = 0; m < 17; ++m) sum += 0.5 * std::norm(i[m]) * act0[m];
    const double p = RadiatedPower(ResistanceMatrix(a), i);
    EXPECT_NEAR(sum, p, 1e-11 * p);
    EXPECT_LT((act0 - act1).cwiseAbs().maxCoeff(), 1e-11 * act0.cwiseAbs().maxCoeff());
  }
}

TEST(ActiveResistance, InPhaseCurrentsNeedNoReactance) {
  // With real currents X I / I_m is real, so Re Z_act = (R I)_m / I_m.
  TestRng rng(75);
  testing::TestArray a = RandomArray(rng, 12, Ground::kPec);
  for (Eigen::Index m = 0; m < a.currents.size(); ++m)
    a.currents[m] = std::abs(a.currents[m]) * (rng.Uniform() < 0.5 ? 1 : -1);
  const Eigen::VectorXcd i = a.currents;
  const Eigen::MatrixXd r = ResistanceMatrix(a);
  const Eigen::VectorXd act = RadiatedPowerStreamed(a, i).active_resistance_ohm;
  const Eigen::VectorXcd ri = r.cast<Complex>() * i;
  for (int m = 0; m < 12; ++m) {
    const double tol = 1e-12 * r.cwiseAbs().maxCoeff() * i.cwiseAbs().sum() / std::abs(i[m]);
    EXPECT_NEAR(act[m], (ri[m] / i[m]).real(), tol) << m;
  }
}

TEST(ActiveResistance, UndefinedForAnUndrivenElementAndSelfForOne) {
  TestRng rng(76);
  testing::TestArray a = RandomArray(rng, 4, Ground::kNone);
  a.currents[2] = 0;
  const Eigen::VectorXd act =
      ActiveImpedance(ImpedanceMatrix(a, Eigen::VectorXd::Zero(4)), a.currents).real();
  EXPECT_TRUE(std::isnan(act[2]));
  EXPECT_TRUE(std::isfinite(act[0]));
  const testing::TestArray one = OneDipoleArray(a.dipoles[0], a.currents[0]);
  const double r11 = MutualResistance(one.dipoles[0], one.dipoles[0], K());
  EXPECT_NEAR(RadiatedPowerStreamed(one, one.currents).active_resistance_ohm[0], r11, 1e-14 * r11);
}

}  // namespace
}  // namespace lobecast
