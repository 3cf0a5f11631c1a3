// Far field by direct superposition (engine/field/far_field.h): analytic single-dipole
// answers first, then invariances (rotation, translation), linearity, plan reuse and
// thread independence.
#include "engine/field/far_field.h"

#include <cmath>
#include <complex>
#include <vector>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/power/radiated_power.h"
#include "engine/types.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::DirectMethod;
using testing::MakeDipole;
using testing::OneDipoleArray;
using testing::TestRng;

constexpr Complex kJ(0.0, 1.0);

Directions CoarseGrid() {
  return Directions::FromGrid(AngularGrid::FromRanges({0, 180, 5}, {0, 360, 15}));
}

// j eta0 k I Le / (4 pi): the amplitude of a z dipole's rE_theta at broadside.
Complex DipoleAmplitude(const testing::TestArray& a) {
  return kJ * kEta0_ohm * a.wavenumber_rad_m() * a.currents[0] * a.dipoles[0].effective_length_m() /
         (4 * kPi);
}

TEST(FarField, HertzianZDipoleMatchesHandbook) {
  testing::TestArray a =
      OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.0), std::polar(0.7, 0.5));
  a.dipoles[0].length_m = a.wavelength_m() / 50;
  const Directions dirs = CoarseGrid();
  const FarField f = FieldPlan(a, dirs, DirectMethod()).Execute(a.currents);
  ASSERT_EQ(f.size(), dirs.size());
  const Complex c = DipoleAmplitude(a);
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    // Infinitesimal dipole: rE_theta = j eta0 k I l sin(theta) / (4 pi), rE_phi = 0
    // (Balanis, Antenna Theory: Analysis and Design, 4th ed., 2016, sec. 4.2; section
    // number from memory).
    const Complex expected = c * std::sin(dirs.theta_rad(i));
    EXPECT_NEAR(f.e_theta[i].real(), expected.real(), 1e-13 * std::abs(c)) << "direction " << i;
    EXPECT_NEAR(f.e_theta[i].imag(), expected.imag(), 1e-13 * std::abs(c)) << "direction " << i;
    EXPECT_LE(std::abs(f.e_phi[i]), 1e-14 * std::abs(c)) << "direction " << i;
  }
}

TEST(FarField, TriangularDistributionHalvesTheField) {
  // Short centre-fed dipole with a triangular current: effective length l/2 (Balanis
  // 4th ed. sec. 4.3, from memory).
  testing::TestArray u =
      OneDipoleArray(MakeDipole(Vec3(0.01, -0.02, 0.03), Vec3(1, 2, 3), 0.004), 1.3);
  testing::TestArray t = u;
  t.dipoles[0].distribution = Distribution::kTriangular;
  const Directions dirs = CoarseGrid();
  const FarField fu = FieldPlan(u, dirs, DirectMethod()).Execute(u.currents);
  const FarField ft = FieldPlan(t, dirs, DirectMethod()).Execute(t.currents);
  const double scale = testing::Magnitude(fu).maxCoeff();
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    EXPECT_LE(std::abs(ft.e_theta[i] - 0.5 * fu.e_theta[i]), 1e-14 * scale);
    EXPECT_LE(std::abs(ft.e_phi[i] - 0.5 * fu.e_phi[i]), 1e-14 * scale);
  }
}

TEST(FarField, HorizontalDipolesAndPhaseReference) {
  // A rotated z dipole: rE = -C (u - (u.r) r), so for u = x: rE_theta = -C cos(theta)
  // cos(phi), rE_phi = C sin(phi); for u = y: -C cos(theta) sin(phi), -C cos(phi)
  // (Balanis 4th ed. sec. 4.2 rotated). A dipole at r0 adds the phase exp(+j k r_hat.r0)
  // of the exp(+jwt) far field (CONVENTIONS §1).
  TestRng rng(11);
  const Directions dirs = CoarseGrid();
  for (const Vec3& u : {Vec3(Vec3::UnitX()), Vec3(Vec3::UnitY())}) {
    const Vec3 r0(0.3, -0.1, 0.25);
    testing::TestArray a = OneDipoleArray(MakeDipole(r0, u, 0.005), rng.Phasor(0.5, 1.5));
    const FarField f = FieldPlan(a, dirs, DirectMethod()).Execute(a.currents);
    const Complex c = DipoleAmplitude(a);
    for (std::size_t i = 0; i < dirs.size(); ++i) {
      const double th = dirs.theta_rad(i), ph = dirs.phi_rad(i);
      const Complex phase = std::exp(kJ * a.wavenumber_rad_m() * dirs.r_hat(i).dot(r0));
      Complex et, ep;
      if (u.x() == 1.0) {
        et = -c * std::cos(th) * std::cos(ph);
        ep = c * std::sin(ph);
      } else {
        et = -c * std::cos(th) * std::sin(ph);
        ep = -c * std::cos(ph);
      }
      EXPECT_LE(std::abs(f.e_theta[i] - et * phase), 1e-13 * std::abs(c)) << "direction " << i;
      EXPECT_LE(std::abs(f.e_phi[i] - ep * phase), 1e-13 * std::abs(c)) << "direction " << i;
    }
  }
}

TEST(FarField, HertzianDirectivityNullsAndBeamwidth) {
  testing::TestArray a = OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.002), 1.0);
  const std::vector<double> theta = {0.0,
                                     45 * kDegree,
                                     90 * kDegree,
                                     135 * kDegree,
                                     kPi,
                                     44.9 * kDegree,
                                     45.1 * kDegree,
                                     134.9 * kDegree,
                                     135.1 * kDegree};
  const std::vector<double> phi(theta.size(), 0.3);
  const FarField f =
      FieldPlan(a, Directions::FromAngles(theta, phi), DirectMethod()).Execute(a.currents);
  const Eigen::VectorXd m = testing::Magnitude(f);
  const Eigen::VectorXd u = m.cwiseAbs2() / (2 * kEta0_ohm);
  const double p = RadiatedPower(ResistanceMatrix(a), a.currents);
  // D = 1.5 at broadside (Balanis 4th ed. sec. 4.2, from memory).
  EXPECT_NEAR(4 * kPi * u[2] / p, 1.5, 1.5e-12);
  // Nulls on the axis, theta = 0 and 180 deg (same source).
  EXPECT_LE(m[0], 1e-15 * m[2]);
  EXPECT_LE(m[4], 1e-15 * m[2]);
  // U ~ sin^2(theta): half power at 45 and 135 deg, so the half-power beamwidth is 90 deg
  // (same source); just inside the beam is above half power, just outside below.
  EXPECT_NEAR(u[1] / u[2], 0.5, 1e-13);
  EXPECT_NEAR(u[3] / u[2], 0.5, 1e-13);
  EXPECT_LT(u[5] / u[2], 0.5);
  EXPECT_GT(u[6] / u[2], 0.5);
  EXPECT_GT(u[7] / u[2], 0.5);
  EXPECT_LT(u[8] / u[2], 0.5);
}

TEST(FarField, RotatingArrayAndDirectionsTogetherKeepsMagnitude) {
  TestRng rng(2024);
  for (int trial = 0; trial < 5; ++trial) {
    const testing::TestArray a = testing::RandomArray(rng, 1 + 15 * trial, Ground::kNone);
    const Eigen::Matrix3d q = rng.Rotation();
    testing::TestArray b = a;
    for (Dipole& d : b.dipoles) {
      d.position_m = q * d.position_m;
      d.orientation = (q * d.orientation).normalized();
    }
    std::vector<double> th, ph, th_q, ph_q;
    for (int i = 0; i < 300; ++i) {
      const Vec3 r = rng.UnitVector();
      double t, p;
      testing::AnglesOf(r, t, p);
      th.push_back(t);
      ph.push_back(p);
      testing::AnglesOf(q * r, t, p);
      th_q.push_back(t);
      ph_q.push_back(p);
    }
    const Eigen::VectorXd m = testing::Magnitude(
        FieldPlan(a, Directions::FromAngles(th, ph), DirectMethod()).Execute(a.currents));
    const Eigen::VectorXd mq = testing::Magnitude(
        FieldPlan(b, Directions::FromAngles(th_q, ph_q), DirectMethod()).Execute(b.currents));
    const double scale = m.maxCoeff();
    for (int i = 0; i < m.size(); ++i) EXPECT_NEAR(mq[i], m[i], 1e-12 * scale) << "trial " << trial;
  }
}

TEST(FarField, PlanReuseEqualsFreshPlansAndIsLinear) {
  TestRng rng(7);
  testing::TestArray a = testing::RandomArray(rng, 12, Ground::kNone);
  const Directions dirs = CoarseGrid();
  Eigen::VectorXcd i1(12), i2(12);
  for (int n = 0; n < 12; ++n) {
    i1[n] = rng.Phasor(0.1, 2);
    i2[n] = rng.Phasor(0.1, 2);
  }
  const FieldPlan plan(a, dirs, DirectMethod());
  const FarField f1 = plan.Execute(i1);
  const FarField f2 = plan.Execute(i2);
  const double scale = testing::Magnitude(f1).maxCoeff();
  // A fresh plan for each current vector gives the same answer.
  testing::TestArray a2 = a;
  for (int n = 0; n < 12; ++n) a2.currents[n] = i2[n];
  EXPECT_LE(
      testing::MaxFieldDifference(FieldPlan(a2, dirs, DirectMethod()).Execute(a2.currents), f2),
      1e-15 * scale);
  EXPECT_LE(testing::MaxFieldDifference(FieldPlan(a, dirs, DirectMethod()).Execute(i1), f1),
            1e-15 * scale);
  // Execute(alpha I1 + I2) = alpha Execute(I1) + Execute(I2).
  const Complex alpha(-0.6, 1.7);
  const FarField fs = plan.Execute(alpha * i1 + i2);
  FarField expected;
  expected.e_theta = alpha * f1.e_theta + f2.e_theta;
  expected.e_phi = alpha * f1.e_phi + f2.e_phi;
  EXPECT_LE(testing::MaxFieldDifference(fs, expected), 1e-13 * scale);
}

TEST(FarField, ExecuteRangeMatchesExecute) {
  TestRng rng(8);
  const testing::TestArray a = testing::RandomArray(rng, 9, Ground::kPec);
  const Directions dirs = CoarseGrid();
  const FieldPlan plan(a, dirs, DirectMethod());
  const FarField all = plan.Execute(a.currents);
  const std::size_t chunk = 37;  // does not divide the direction count
  FarField part;
  for (std::size_t first = 0; first < dirs.size(); first += chunk) {
    const std::size_t count = std::min(chunk, dirs.size() - first);
    plan.ExecuteRange(a.currents, first, count, part);
    ASSERT_EQ(part.size(), count);
    for (std::size_t i = 0; i < count; ++i) {
      EXPECT_EQ(part.e_theta[i], all.e_theta[first + i]) << "direction " << first + i;
      EXPECT_EQ(part.e_phi[i], all.e_phi[first + i]) << "direction " << first + i;
    }
  }
}

// The direct sums take whole tiles of directions (or, for the adjoint, sources) and
// the rest one at a time: a direction's field must not depend on how many were
// asked with it, nor on its place, to the last bit (the analysis compares probes of
// one direction with the grid's values). Collinear and general moments, with and
// without images, source counts with and without a remainder of the vector width.
TEST(FarField, BatchingDoesNotChangeABit) {
  TestRng rng(15);
  const auto same = [](Complex a, Complex b) {
    return a.real() == b.real() && a.imag() == b.imag();
  };
  for (int n : {1, 3, 13, 1025}) {
    for (Ground g : {Ground::kNone, Ground::kPec}) {
      for (bool collinear : {true, false}) {
        testing::TestArray a = testing::RandomArray(rng, n, g, 3.0);
        if (collinear) {
          for (Dipole& d : a.dipoles) d.orientation = Vec3::UnitX();
        }
        std::vector<double> theta, phi;
        for (int i = 0; i < 11; ++i)
          theta.push_back(rng.Uniform(0.0, kPi)), phi.push_back(rng.Uniform(0.0, 2 * kPi));
        const Directions dirs = Directions::FromAngles(theta, phi);
        const FieldPlan plan(a, dirs, DirectMethod(1));
        const FarField all = plan.Execute(a.currents);
        for (std::size_t i = 0; i < theta.size(); ++i) {
          // Alone, and last of a batch of five (a tile of four and it).
          const FarField one =
              plan.ExecuteAt(a.currents, Directions::FromAngles({theta[i]}, {phi[i]}));
          std::vector<double> t5(4, theta[(i + 1) % theta.size()]),
              p5(4, phi[(i + 1) % phi.size()]);
          t5.push_back(theta[i]), p5.push_back(phi[i]);
          const FarField five = plan.ExecuteAt(a.currents, Directions::FromAngles(t5, p5));
          for (const FarField* f : {&one, &five}) {
            const auto k = static_cast<Eigen::Index>(f->size() - 1);
            EXPECT_TRUE(same(f->e_theta[k], all.e_theta[static_cast<Eigen::Index>(i)]) &&
                        same(f->e_phi[k], all.e_phi[static_cast<Eigen::Index>(i)]))
                << "n " << n << ", ground " << ToString(g) << ", direction " << i << " of "
                << f->size();
          }
        }
        // The adjoint's targets are the sources: the last dipole is taken alone among
        // 4 k + 1 sources and within a tile once it comes first.
        const Eigen::VectorXd w = Eigen::VectorXd::Constant(dirs.size(), 0.5);
        const DipoleSums y = plan.ExecuteAdjoint(all, w);
        testing::TestArray turned;
        turned.frequency_hz = a.frequency_hz;
        turned.ground = a.ground;
        turned.Add(a.dipoles.back(), a.currents[n - 1]);
        for (int k = 0; k + 1 < n; ++k) turned.Add(a.dipoles[k], a.currents[k]);
        const DipoleSums yt = FieldPlan(turned, dirs, DirectMethod(1)).ExecuteAdjoint(all, w);
        EXPECT_TRUE(same(yt.values[0], y.values[n - 1])) << "n " << n << ", ground " << ToString(g);
      }
    }
  }
}

TEST(FarField, ThreadCountDoesNotChangeTheResult) {
  // far_field.h: each direction's sum runs in a fixed order, so 1 and 2 threads agree.
  TestRng rng(9);
  for (FieldMethod method : {FieldMethod::kDirect, FieldMethod::kFast}) {
    for (Ground g : {Ground::kNone, Ground::kPec}) {
      const testing::TestArray a = testing::RandomArray(rng, 40, g);
      const Directions dirs =
          Directions::FromGrid(AngularGrid::FromRanges({0, 180, 2}, {0, 358, 2}));
      FieldOptions one, two;
      one.method = two.method = method;
      one.num_threads = 1;
      two.num_threads = 2;
      const FarField f1 = FieldPlan(a, dirs, one).Execute(a.currents);
      const FarField f2 = FieldPlan(a, dirs, two).Execute(a.currents);
      EXPECT_LE(testing::MaxFieldDifference(f1, f2), 1e-13 * testing::Magnitude(f1).maxCoeff())
          << ToString(method);
    }
  }
}

TEST(FarField, FastPathMeetsItsTolerance) {
  // The fast path's promise (far_field.h): error in rE over the plan's directions at most
  // tolerance_relative times the largest |rE|. The direct sum is the reference.
  TestRng rng(12);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    for (double tol : {1e-6, 1e-9, 1e-12}) {
      const testing::TestArray a = testing::RandomArray(rng, 50, g, 3.0);
      const Directions dirs =
          Directions::FromGrid(AngularGrid::FromRanges({0, 180, 1.5}, {0, 358.5, 1.5}));
      FieldOptions fast;
      fast.method = FieldMethod::kFast;
      fast.tolerance_relative = tol;
      const FieldPlan plan(a, dirs, fast);
      EXPECT_EQ(plan.method_used(), FieldMethod::kFast);
      const FarField ff = plan.Execute(a.currents);
      const FarField fd = FieldPlan(a, dirs, DirectMethod()).Execute(a.currents);
      const double peak = testing::Magnitude(fd).maxCoeff();
      double err = 0;
      for (std::size_t i = 0; i < fd.size(); ++i)
        err = std::max(err, std::sqrt(std::norm(ff.e_theta[i] - fd.e_theta[i]) +
                                      std::norm(ff.e_phi[i] - fd.e_phi[i])));
      EXPECT_LE(err, tol * peak) << "tolerance " << tol;
      EXPECT_LE(ff.error_bound_relative, tol);
      if (g == Ground::kPec)
        for (std::size_t i = 0; i < dirs.size(); ++i)
          if (dirs.theta_rad(i) > 0.5 * kPi) {
            EXPECT_EQ(ff.e_theta[i], Complex(0.0, 0.0));
            EXPECT_EQ(ff.e_phi[i], Complex(0.0, 0.0));
          }
    }
  }
}

TEST(FarField, FastPlanReuseAndCopiesFollowTheCurrents) {
  // The fast path caches per current vector and copies share the cache (far_field.h):
  // alternating current vectors, chunked execution and a copied plan must all give the
  // field of the currents actually passed, within the tolerance, and be linear.
  TestRng rng(13);
  const testing::TestArray a = testing::RandomArray(rng, 30, Ground::kNone, 3.0);
  const Directions dirs = Directions::FromGrid(AngularGrid::FromRanges({0, 180, 2}, {0, 358, 2}));
  Eigen::VectorXcd i1(30), i2(30);
  for (int n = 0; n < 30; ++n) {
    i1[n] = rng.Phasor(0.1, 2);
    i2[n] = rng.Phasor(0.1, 2);
  }
  FieldOptions fast;
  fast.method = FieldMethod::kFast;
  fast.tolerance_relative = 1e-10;
  const FieldPlan plan(a, dirs, fast);
  const FieldPlan direct(a, dirs, DirectMethod());
  const FarField d1 = direct.Execute(i1), d2 = direct.Execute(i2);
  const double s1 = testing::Magnitude(d1).maxCoeff(), s2 = testing::Magnitude(d2).maxCoeff();
  EXPECT_LE(testing::MaxFieldDifference(plan.Execute(i1), d1), 1e-10 * s1);
  EXPECT_LE(testing::MaxFieldDifference(plan.Execute(i2), d2), 1e-10 * s2);
  const FieldPlan copy = plan;
  EXPECT_LE(testing::MaxFieldDifference(copy.Execute(i1), d1), 1e-10 * s1);
  EXPECT_LE(testing::MaxFieldDifference(plan.Execute(i2), d2), 1e-10 * s2);
  FarField part;
  const std::size_t first = 1000, count = 777;
  plan.ExecuteRange(i1, first, count, part);
  ASSERT_EQ(part.size(), count);
  double err = 0;
  for (std::size_t i = 0; i < count; ++i)
    err = std::max({err, std::abs(part.e_theta[i] - d1.e_theta[first + i]),
                    std::abs(part.e_phi[i] - d1.e_phi[first + i])});
  EXPECT_LE(err, 1e-10 * s1);
  const Complex alpha(0.8, -0.3);
  FarField lin;
  lin.e_theta = alpha * d1.e_theta + d2.e_theta;
  lin.e_phi = alpha * d1.e_phi + d2.e_phi;
  EXPECT_LE(testing::MaxFieldDifference(plan.Execute(alpha * i1 + i2), lin),
            1e-10 * testing::Magnitude(lin).maxCoeff());
}

TEST(FarField, AutoTakesTheDirectSumForSmallJobs) {
  const testing::TestArray a = OneDipoleArray(MakeDipole(Vec3::Zero(), Vec3::UnitZ(), 0.01), 1.0);
  const FieldPlan plan(a, CoarseGrid());
  EXPECT_EQ(plan.method_used(), FieldMethod::kDirect);
  EXPECT_EQ(plan.Execute(a.currents).error_bound_relative, 0.0);
}

TEST(FarField, PlanCountsSourcesAndDirections) {
  TestRng rng(10);
  const Directions dirs = CoarseGrid();
  const testing::TestArray free = testing::RandomArray(rng, 5, Ground::kNone);
  const testing::TestArray pec = testing::RandomArray(rng, 5, Ground::kPec);
  const FieldPlan pf(free, dirs), pp(pec, dirs);
  EXPECT_EQ(pf.num_dipoles(), 5u);
  EXPECT_EQ(pf.num_sources(), 5u);
  EXPECT_EQ(pp.num_dipoles(), 5u);
  EXPECT_EQ(pp.num_sources(), 10u);  // dipoles plus images
  EXPECT_EQ(pf.num_directions(), dirs.size());
}

TEST(FarField, RejectsInvalidInput) {
  const Directions dirs = CoarseGrid();
  const testing::TestArray good =
      OneDipoleArray(MakeDipole(Vec3(0, 0, 0.1), Vec3::UnitZ(), 0.01), 1.0);
  EXPECT_NO_THROW(FieldPlan(good, dirs, DirectMethod()));
  EXPECT_NO_THROW(Validate(good));
  // A current vector of the wrong length (error.h names this case).
  const FieldPlan plan(good, dirs);
  EXPECT_THROW(plan.Execute(Eigen::VectorXcd::Ones(2)), InvalidArgument);

  auto expect_rejected = [&](Array a, const char* what) {
    EXPECT_THROW(Validate(a), InvalidArgument) << what;
    EXPECT_THROW(FieldPlan(a, dirs, DirectMethod()), InvalidArgument) << what;
  };
  testing::TestArray a = good;
  a.frequency_hz = 0;
  expect_rejected(a, "zero frequency");
  a = good;
  a.frequency_hz = std::nan("");
  expect_rejected(a, "NaN frequency");
  a = good;
  a.dipoles.clear();
  expect_rejected(a, "no dipoles");
  a = good;
  a.dipoles[0].orientation = Vec3(0, 0, 2);
  expect_rejected(a, "orientation not unit");
  a = good;
  a.dipoles[0].orientation = Vec3::Zero();
  expect_rejected(a, "zero orientation");
  a = good;
  a.dipoles[0].length_m = 0;
  expect_rejected(a, "zero length");
  a = good;
  a.dipoles[0].length_m = -0.01;
  expect_rejected(a, "negative length");
  a = good;
  a.dipoles[0].position_m.x() = std::numeric_limits<double>::infinity();
  expect_rejected(a, "infinite position");
  // The currents are the excitation, apart from the geometry: FieldPlan never sees
  // them, ValidateCurrents (and every computation that takes them) rejects them.
  EXPECT_NO_THROW(ValidateCurrents(good, good.currents));
  Eigen::VectorXcd nan_current = good.currents;
  nan_current[0] = Complex(std::nan(""), 0);
  EXPECT_THROW(ValidateCurrents(good, nan_current), InvalidArgument) << "NaN current";
  EXPECT_THROW(ValidateCurrents(good, Eigen::VectorXcd::Ones(2)), InvalidArgument)
      << "two currents for one dipole";
}

}  // namespace
}  // namespace lobecast
