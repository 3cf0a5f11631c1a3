// Null placement (engine/synthesis/null_placement.h): the closed-form projection,
// written out here from an independent field map (synthesis_util.h) and the normal
// equations, and the depth reached, measured independently against the peak of a
// 0.5 deg grid.
#include "engine/synthesis/null_placement.h"

#include <cmath>

#include <gtest/gtest.h>
#include <Eigen/Dense>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "engine/synthesis/steering.h"
#include "engine/synthesis/synthesis_common.h"
#include "synthesis_util.h"
#include "test_util.h"

namespace lobecast {
namespace {

using testing::FreeSpaceRows;
using testing::TestArray;

// 4 x 4 dipoles at half a wavelength in the z = 0 plane, steered to (20 deg, 0),
// amplitudes tapered (a cosine, so the currents are not all equal). Parallel
// elements in one plane share one element factor, so E_theta and E_phi rows of a
// direction would be proportional; with each dipole turned 15 deg further about z
// than the last they are not.
TestArray SteeredPanel(bool crossed = true) {
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = a.wavelength_m();
  for (int i = 0; i < 16; ++i)
    a.Add(Vec3(0.5 * l * (i % 4 - 1.5), 0.5 * l * (i / 4 - 1.5), 0.0),
          crossed ? Vec3(std::cos(i * 15 * kDegree), std::sin(i * 15 * kDegree), 0) : Vec3::UnitX(),
          0.02 * l, 1.0);
  const Eigen::VectorXcd s = SteeringPhasors(a, 20 * kDegree, 0.0);
  for (int i = 0; i < 16; ++i)
    a.currents[i] = s[i] * (0.6 + 0.4 * std::cos(kPi * (i % 4 - 1.5) / 4.0));
  return a;
}

// max |E| over a 0.5 deg sphere grid, direct sum.
double GridPeak(const Array& a, const Eigen::VectorXcd& i) {
  const FieldPlan plan(a, testing::SphereGrid(0.5), testing::DirectMethod());
  const FarField f = plan.Execute(i);
  return (f.e_theta.cwiseAbs2() + f.e_phi.cwiseAbs2()).cwiseSqrt().maxCoeff();
}

TEST(NullPlacement, EqualsTheClosedFormProjectionAndReachesMinus120dB) {
  const TestArray a = SteeredPanel();
  const std::vector<double> th = {40 * kDegree, 60 * kDegree, 35 * kDegree};
  const std::vector<double> ph = {180 * kDegree, 90 * kDegree, 250 * kDegree};
  const NullResult r =
      PlaceNulls(a, a.currents, Directions::FromAngles(th, ph), {20 * kDegree, 0.0});

  // Closed form (the problem statement): I = I0 - A^H (A A^H)^-1 A I0, A stacked from
  // the rows of CONVENTIONS §1 written out independently; A A^H is 6 x 6 and well
  // conditioned here (three distinct directions, both components).
  Eigen::MatrixXcd A(6, 16);
  for (int k = 0; k < 3; ++k) {
    const auto rows = FreeSpaceRows(a, th[k], ph[k]);
    A.row(k) = rows.theta;
    A.row(3 + k) = rows.phi;
  }
  const Eigen::MatrixXcd aah = A * A.adjoint();
  const Eigen::VectorXcd expected =
      a.currents - A.adjoint() * aah.fullPivLu().solve(A * a.currents);
  EXPECT_LE((r.currents_a - expected).norm(), 1e-12 * a.currents.norm())
      << "difference " << (r.currents_a - expected).norm();
  EXPECT_EQ(r.constraints, 6);
  EXPECT_EQ(r.rank, 6);

  // Depth at every null re the pattern's peak on a 0.5 deg grid (the issue asks for
  // -120 dB; the projection leaves rounding only).
  const double peak = GridPeak(a, r.currents_a);
  for (int k = 0; k < 3; ++k) {
    const auto rows = FreeSpaceRows(a, th[k], ph[k]);
    const double e = std::hypot(std::abs((rows.theta * r.currents_a)(0)),
                                std::abs((rows.phi * r.currents_a)(0)));
    EXPECT_LE(20 * std::log10(e / peak), -120.0) << "null " << k;
    EXPECT_LE(r.depth_db[static_cast<std::size_t>(k)], -120.0) << "null " << k;
  }

  // The directivity lost, from the test's own field and the closed-form power.
  const Eigen::MatrixXd R = ResistanceMatrix(a);
  const double d0 = testing::FreeSpaceDirectivity(a, R, a.currents, 20 * kDegree, 0.0);
  const double d1 = testing::FreeSpaceDirectivity(a, R, r.currents_a, 20 * kDegree, 0.0);
  EXPECT_NEAR(r.directivity_before, d0, 1e-10 * d0);
  EXPECT_NEAR(r.directivity_after, d1, 1e-10 * d1);
  // (Not necessarily > 0: these currents are not the directivity optimum.)
  EXPECT_NEAR(r.directivity_lost_db, 10 * std::log10(d0 / d1), 1e-9);
  EXPECT_NEAR(r.change_relative, (r.currents_a - a.currents).norm() / a.currents.norm(), 1e-12);
}

TEST(NullPlacement, DependentConstraintsDropOut) {
  // z dipoles along x: E_phi = 0 everywhere (CONVENTIONS §1), and the same null twice,
  // so 4 rows of A carry 1 independent constraint. The result equals the projection
  // on that one row, written out: I0 - a^H (a I0) / |a|^2.
  const TestArray a = testing::ZLineAlongX(8, 0.5, 0.02);
  const std::vector<double> th = {kPi / 2, kPi / 2}, ph = {60 * kDegree, 60 * kDegree};
  const NullResult r =
      PlaceNulls(a, a.currents, Directions::FromAngles(th, ph), {kPi / 2, kPi / 2});
  EXPECT_EQ(r.constraints, 4);
  EXPECT_EQ(r.rank, 1);
  const Eigen::RowVectorXcd row = FreeSpaceRows(a, th[0], ph[0]).theta;
  const Eigen::VectorXcd expected =
      a.currents - row.adjoint() * ((row * a.currents)(0) / row.squaredNorm());
  EXPECT_LE((r.currents_a - expected).norm(), 1e-12 * a.currents.norm());
}

TEST(NullPlacement, OverGroundUsesTheImages) {
  // x dipoles a quarter wavelength over PEC; the field map includes the images, so
  // the check evaluates the field through a direct plan (engine/field) at the nulls.
  TestArray a;
  a.frequency_hz = testing::kTestFrequency_hz;
  a.ground = Ground::kPec;
  const double l = a.wavelength_m();
  for (int i = 0; i < 9; ++i)
    a.Add(Vec3(0.5 * l * (i % 3), 0.5 * l * (i / 3), 0.25 * l), Vec3::UnitX(), 0.02 * l, 1.0);
  const Directions nulls = Directions::FromAngles({50 * kDegree, 30 * kDegree}, {0.0, kPi / 2});
  const NullResult r = PlaceNulls(a, a.currents, nulls, {0.0, 0.0});
  const FieldPlan plan(a, nulls, testing::DirectMethod());
  const FarField f = plan.Execute(r.currents_a);
  const double peak = GridPeak(a, r.currents_a);
  for (std::size_t k = 0; k < 2; ++k)
    EXPECT_LE(20 * std::log10(std::hypot(std::abs(f.e_theta[k]), std::abs(f.e_phi[k])) / peak),
              -120.0);
}

TEST(NullPlacement, RefusesDesignsThatCannotBeMet) {
  const TestArray a = SteeredPanel();
  // A null in the main beam (2 deg from the beam direction).
  EXPECT_THROW(
      PlaceNulls(a, a.currents, Directions::FromAngles({22 * kDegree}, {0.0}), {20 * kDegree, 0.0}),
      InvalidArgument);
  // Two dipoles of general orientation, two nulls: 4 independent constraints on 2
  // unknowns leave only I = 0.
  TestArray b;
  b.frequency_hz = testing::kTestFrequency_hz;
  const double l = b.wavelength_m();
  b.Add(Vec3(0, 0, 0), Vec3(1, 0, 1).normalized(), 0.02 * l, 1.0);
  b.Add(Vec3(0.3 * l, 0.1 * l, 0), Vec3(0, 1, 1).normalized(), 0.02 * l, 1.0);
  EXPECT_THROW(
      PlaceNulls(b, b.currents, Directions::FromAngles({80 * kDegree, 120 * kDegree}, {2.0, 4.0}),
                 {0.0, 0.0}),
      InvalidArgument);
  EXPECT_THROW(PlaceNulls(a, a.currents, Directions(), {20 * kDegree, 0.0}), InvalidArgument);
}

TEST(NullPlacement, ParallelPlanarElementsGiveOneConstraintPerNull) {
  // Parallel dipoles in one plane: E = (element factor) x (array factor), so a null of
  // the array factor zeroes both components and each null is one constraint.
  const TestArray a = SteeredPanel(false);
  const NullResult r = PlaceNulls(
      a, a.currents, Directions::FromAngles({40 * kDegree, 60 * kDegree}, {kPi, kPi / 2}),
      {20 * kDegree, 0.0});
  EXPECT_EQ(r.constraints, 4);
  EXPECT_EQ(r.rank, 2);
  for (double d : r.depth_db) EXPECT_LE(d, -120.0);
}

TEST(NullPlacement, PhaseOnlyKeepsMagnitudesAndReachesTheDepth) {
  // 16 z dipoles along x, uniform and in phase (broadside, phi = 90 deg), a null at
  // phi = 60 deg in the azimuth plane (not a null of the uniform array: its nulls are
  // at cos(phi) = m / 8).
  const TestArray a = testing::ZLineAlongX(16, 0.5, 0.02);
  const std::vector<double> th = {kPi / 2, kPi / 2}, ph = {60 * kDegree, 135 * kDegree};
  const NullResult r =
      PlaceNullsPhaseOnly(a, a.currents, Directions::FromAngles(th, ph), {kPi / 2, kPi / 2});
  EXPECT_TRUE(r.converged) << r.iterations << " iterations";
  EXPECT_LE((r.currents_a.cwiseAbs() - a.currents.cwiseAbs()).cwiseAbs().maxCoeff(), 1e-12);
  const double peak = GridPeak(a, r.currents_a);
  for (std::size_t k = 0; k < 2; ++k) {
    const double e = std::abs((FreeSpaceRows(a, th[k], ph[k]).theta * r.currents_a)(0));
    EXPECT_LE(20 * std::log10(e / peak), -120.0) << "null " << k;
    EXPECT_LE(r.depth_db[k], -120.0);
  }
  EXPECT_GT(r.directivity_lost_db, 0.0);
}

}  // namespace
}  // namespace lobecast

namespace lobecast {
namespace {

// Above kDensePowerLimit the synthesis power (PowerOf) takes auto's route: on a
// 128 x 128 lattice at half a wavelength the band-limited quadrature. Its R x and P
// against the closed form streamed (power_large.h, the O(N^2) pair sums), within the
// quadrature's aimed 1e-10 relative (with margin: 1e-9).
TEST(PowerOf, LargeLatticeTakesTheQuadratureAndAgreesWithTheClosedForm) {
  Array a;
  a.frequency_hz = testing::kTestFrequency_hz;
  const double l = a.wavelength_m();
  for (int i = 0; i < 128 * 128; ++i) {
    Dipole d;
    d.position_m = Vec3(0.5 * l * (i % 128), 0.5 * l * (i / 128), 0.0);
    d.orientation = Vec3(1.0, 0.3, 0.2).normalized();
    d.length_m = 0.02 * l;
    a.dipoles.push_back(d);
  }
  Eigen::VectorXcd x(static_cast<Eigen::Index>(a.size()));
  for (Eigen::Index m = 0; m < x.size(); ++m)
    x[m] = std::polar(1.0 + 0.5 * std::sin(0.37 * m), 0.91 * m);
  const synthesis_detail::PowerOf power(a, 0);
  EXPECT_EQ(power.route(), PowerRoute::kQuadrature);
  const Eigen::VectorXcd closed = ResistanceProductStreamed(a, x, 0);
  EXPECT_LE((power.Product(x) - closed).cwiseAbs().maxCoeff(), 1e-9 * closed.cwiseAbs().maxCoeff());
  const double p_closed = 0.5 * x.dot(closed).real();
  EXPECT_NEAR(power(x), p_closed, 1e-9 * p_closed);
}

}  // namespace
}  // namespace lobecast
