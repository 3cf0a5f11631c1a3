// Maximum directivity (engine/synthesis/max_directivity.h): optimality by random
// perturbation, the closed-form maximum f R^-1 f^H written out here, the limit of
// widely spaced elements, and a superdirective endfire line.
#include "engine/synthesis/max_directivity.h"

#include <cmath>

#include <gtest/gtest.h>
#include <Eigen/Dense>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/power/radiated_power.h"
#include "synthesis_util.h"
#include "test_util.h"

namespace lobecast {
namespace {

using testing::FreeSpaceRows;
using testing::TestArray;
using testing::TestRng;

// Partial directivity in polarization p: 4 pi |p^H E|^2 / (2 eta0 P), from the test's
// own field rows and the closed-form power.
double PartialDirectivity(const Array& a, const Eigen::MatrixXd& R, const Eigen::VectorXcd& i,
                          const Direction& d, const PolarizationVector& p) {
  const auto rows = FreeSpaceRows(a, d.theta_rad, d.phi_rad);
  const Complex e = std::conj(p.theta) * (rows.theta * i)(0) + std::conj(p.phi) * (rows.phi * i)(0);
  return 4 * kPi * std::norm(e) / (2 * kEta0_ohm) / RadiatedPower(R, i);
}

TEST(MaxDirectivity, NoRandomPerturbationIncreasesD) {
  // A Rayleigh quotient's maximizer: D(I + dI) <= D(I) for every dI (property test).
  TestRng rng(1301);
  TestArray a = testing::RandomArray(rng, 8, Ground::kNone, 0.8);
  const Direction beam{50 * kDegree, 30 * kDegree};
  const PolarizationVector p = PolarizationVector::RightCircular();
  MaxDirectivityOptions o;
  o.regularization = 0;
  const MaxDirectivityResult r = MaximizeDirectivity(a, beam, p, o);
  const Eigen::MatrixXd R = ResistanceMatrix(a);
  const double d0 = PartialDirectivity(a, R, r.currents_a, beam, p);
  EXPECT_NEAR(r.partial_directivity, d0, 1e-9 * d0);
  for (int trial = 0; trial < 200; ++trial) {
    const double size = trial < 100 ? 1e-3 : 0.3;  // small and large perturbations
    Eigen::VectorXcd di(8);
    for (int n = 0; n < 8; ++n) di[n] = size * rng.Phasor(0.0, 1.0);
    const double d = PartialDirectivity(a, R, r.currents_a + di, beam, p);
    EXPECT_LE(d, d0 * (1 + 1e-12)) << "trial " << trial;
  }
  // The closed form: D_max = (4 pi / eta0) f R^-1 f^H with f = p^H (E_theta, E_phi) rows
  // (Harrington 1961, from memory; the Rayleigh quotient's maximum).
  const auto rows = FreeSpaceRows(a, beam.theta_rad, beam.phi_rad);
  const Eigen::RowVectorXcd f = std::conj(p.theta) * rows.theta + std::conj(p.phi) * rows.phi;
  const Eigen::MatrixXcd Rc = R.cast<Complex>();
  const double dmax = 4 * kPi / kEta0_ohm * (f * Rc.ldlt().solve(f.adjoint()))(0).real();
  EXPECT_NEAR(r.partial_directivity, dmax, 1e-9 * dmax);
  EXPECT_GE(r.directivity, r.partial_directivity * (1 - 1e-12));
  EXPECT_NEAR(r.currents_a.cwiseAbs().maxCoeff(), 1.0, 1e-12);
}

TEST(MaxDirectivity, WidelySpacedElementsApproachTheSumOfElementDirectivities) {
  // 8 parallel z dipoles 40 wavelengths apart along x, broadside: each alone has
  // D = 1.5 toward theta = 90 deg (Balanis 4th ed. sec. 4.2, from memory), and with no
  // coupling the maximum is the sum, 1.5 N. The coupling R_mn / R_mm = 1.5 (j0 - j1/x)
  // ~ 1.5 / x at x = k d >> 1 changes D at first order by at most sum_n |R_mn| / R_mm
  // <= (N - 1) 1.5 (1/x + 1/x^2): that is the tolerance.
  const int n = 8;
  const TestArray a = testing::ZLineAlongX(n, 40, 0.01);
  const MaxDirectivityResult r =
      MaximizeDirectivity(a, {kPi / 2, kPi / 2}, PolarizationVector::Theta());
  const double x = 2 * kPi * 40;
  const double tol = (n - 1) * 1.5 * (1 / x + 1 / (x * x));
  EXPECT_NEAR(r.directivity / (1.5 * n), 1.0, tol) << "D = " << r.directivity;
  EXPECT_FALSE(r.superdirective);
  EXPECT_NEAR(r.sensitivity_re_uniform, 1.0, tol);
  EXPECT_GT(r.digits_in_power, 13.0);
}

TEST(MaxDirectivity, UniformBroadsideSensitivityIsOneOverN) {
  // The normalization of the sensitivity factor: widely spaced (so the optimum is
  // uniform to O(1/x)), Ks = 1/N (Hansen, Phased Array Antennas, 2nd ed., 2009,
  // superdirectivity chapter, from memory).
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = a.wavelength_m();
  for (int i = 0; i < 5; ++i) a.Add(Vec3(0, 60 * l * i, 0), Vec3::UnitX(), 0.01 * l, 1.0);
  const MaxDirectivityResult r =
      MaximizeDirectivity(a, {0.0, 0.0}, PolarizationVector::LudwigX(0.0));
  EXPECT_NEAR(r.sensitivity_factor, 1.0 / 5, 4 * 1.5 / (2 * kPi * 60));
}

TEST(MaxDirectivity, ShortEndfireLineIsSuperdirective) {
  // 4 z dipoles a tenth of a wavelength apart along x, endfire toward +x in the
  // azimuth plane. Uzkov (1946, from memory) shows N isotropic points approach N^2;
  // for dipoles the bound of an antenna whose field has spherical-wave degree L,
  // D <= L^2 + 2L (R. F. Harrington, "On the gain and beamwidth of directional
  // antennas", IRE Trans. AP-6, 1958, from memory), with L = N here. The optimum must
  // exceed N (an ordinary array's order) and stay below that bound, and be flagged.
  const int n = 4;
  const TestArray a = testing::ZLineAlongX(n, 0.1, 0.01);
  MaxDirectivityOptions o;
  o.regularization = 0;
  const MaxDirectivityResult r =
      MaximizeDirectivity(a, {kPi / 2, 0.0}, PolarizationVector::Theta(), o);
  EXPECT_GT(r.directivity, n);
  EXPECT_LT(r.directivity, n * n + 2 * n);
  EXPECT_TRUE(r.superdirective) << "N Ks = " << r.sensitivity_re_uniform;
  EXPECT_GT(r.sensitivity_re_uniform, kSuperdirectiveRatio);
  // Digits left in P: computed here from the closed-form matrix.
  const Eigen::MatrixXd R = ResistanceMatrix(a);
  const Eigen::VectorXd m = r.currents_a.cwiseAbs();
  const double s = 0.5 * m.dot(R.cwiseAbs() * m);
  const double digits = -std::log10(2.220446049250313e-16 * s / RadiatedPower(R, r.currents_a));
  EXPECT_NEAR(r.digits_in_power, digits, 1e-6);
  EXPECT_LT(r.digits_in_power, 14.0);  // superdirective currents cancel
  // The regularization trades D for lower sensitivity.
  o.regularization = 1e-3;
  const MaxDirectivityResult g =
      MaximizeDirectivity(a, {kPi / 2, 0.0}, PolarizationVector::Theta(), o);
  EXPECT_LT(g.directivity, r.directivity);
  EXPECT_LT(g.sensitivity_factor, r.sensitivity_factor);
  EXPECT_EQ(g.regularization, 1e-3);
}

TEST(MaxDirectivity, ConjugateGradientsAgreeWithTheDenseSolve) {
  // 8 x 8 x dipoles at 0.4 wavelength, beam at (30 deg, 45 deg), Ludwig-3 x: the two
  // solvers of one problem.
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = a.wavelength_m();
  for (int i = 0; i < 64; ++i)
    a.Add(Vec3(0.4 * l * (i % 8), 0.4 * l * (i / 8), 0), Vec3::UnitX(), 0.02 * l, 1.0);
  const Direction beam{30 * kDegree, 45 * kDegree};
  const PolarizationVector p = PolarizationVector::LudwigX(beam.phi_rad);
  MaxDirectivityOptions o;
  o.regularization = 1e-8;
  o.solver = DirectivitySolver::kDense;
  const MaxDirectivityResult dense = MaximizeDirectivity(a, beam, p, o);
  o.solver = DirectivitySolver::kConjugateGradient;
  const MaxDirectivityResult cg = MaximizeDirectivity(a, beam, p, o);
  EXPECT_EQ(cg.solver_used, DirectivitySolver::kConjugateGradient);
  EXPECT_GT(cg.cg_iterations, 0);
  EXPECT_NEAR(cg.directivity, dense.directivity, 1e-9 * dense.directivity);
  EXPECT_LE((cg.currents_a - dense.currents_a).norm(), 1e-6 * dense.currents_a.norm());
  EXPECT_TRUE(cg.digits_is_lower_bound);
  EXPECT_LE(cg.digits_in_power, dense.digits_in_power + 1e-9);
  // Stopped when the directivity estimate settles instead: fewer iterations, and D
  // from below (CG's Rayleigh quotients rise monotonically to the maximum).
  o.cg_directivity_tolerance = 1e-6;
  const MaxDirectivityResult quick = MaximizeDirectivity(a, beam, p, o);
  EXPECT_LT(quick.cg_iterations, cg.cg_iterations);
  EXPECT_LE(quick.directivity, dense.directivity * (1 + 1e-12));
  EXPECT_GT(quick.directivity, 0.99 * dense.directivity);
}

TEST(MaxDirectivity, VerticalDipoleOnPecGroundHasDirectivityThree) {
  // One z dipole at h -> 0 over PEC: D = 3 toward the horizon (CONVENTIONS §1; Balanis
  // 4th ed. sec. 4.7.2, from memory). At h = 1e-4 wavelength the image's phase differs
  // by 2 k h ~ 1.3e-3 rad, which changes D at order (k h)^2 ~ 4e-7.
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.ground = Ground::kPec;
  a.Add(Vec3(0, 0, 1e-4 * a.wavelength_m()), Vec3::UnitZ(), 0.01 * a.wavelength_m(), 1.0);
  const MaxDirectivityResult r =
      MaximizeDirectivity(a, {kPi / 2, 0.3}, PolarizationVector::Theta());
  EXPECT_NEAR(r.directivity, 3.0, 3e-6);
  EXPECT_NEAR(r.sensitivity_factor, 1.0, 1e-12);  // N = 1: Ks = 1/N
}

TEST(MaxDirectivity, RefusesBadInput) {
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.Add(Vec3::Zero(), Vec3::UnitZ(), 0.01, 1.0);
  // A z dipole has no field along its axis.
  EXPECT_THROW(MaximizeDirectivity(a, {0.0, 0.0}, PolarizationVector::Theta()), InvalidArgument);
  EXPECT_THROW(MaximizeDirectivity(a, {kPi / 2, 0.0}, PolarizationVector{1.0, 1.0}),
               InvalidArgument);
  MaxDirectivityOptions o;
  o.regularization = -1;
  EXPECT_THROW(MaximizeDirectivity(a, {kPi / 2, 0.0}, PolarizationVector::Theta(), o),
               InvalidArgument);
}

}  // namespace
}  // namespace lobecast
