// The whole pattern job (engine/pattern.h): its pieces agree with the engine parts
// they come from, directivity integrates to 4 pi, and the summary says what was done.
#include "engine/pattern.h"

#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/polarization.h"
#include "engine/power/radiated_power.h"
#include "engine/types.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::TestRng;

// int D dOmega on a theta-phi grid (phi [0, 360) periodic, theta from 0 in equal steps)
// by the trapezoid rule in both angles, weight sin(theta), over theta <= theta_max_deg.
// With a PEC ground D jumps to 0 below the horizon, so the rule must stop at 90 deg
// (half weight there) instead of running across the jump.
double IntegrateOverSphere(const AngularGrid& g, const Eigen::VectorXd& v, double theta_max_deg) {
  const std::size_t np = g.phi_deg.size();
  std::size_t nt = 0;
  while (nt < g.theta_deg.size() && g.theta_deg[nt] <= theta_max_deg + 1e-9) ++nt;
  const double dt = (g.theta_deg[1] - g.theta_deg[0]) * kDegree;
  const double dp = 2 * kPi / np;
  double sum = 0;
  for (std::size_t i = 0; i < nt; ++i) {
    const double w = (i == 0 || i + 1 == nt ? 0.5 : 1.0) * dt * std::sin(g.theta_deg[i] * kDegree);
    for (std::size_t j = 0; j < np; ++j) sum += w * dp * v[i * np + j];
  }
  return sum;
}

TEST(Pattern, DirectivityIntegratesToFourPi) {
  // int D dOmega = 4 pi by definition of D (CONVENTIONS §1). The trapezoid in theta has an
  // O(h^2) endpoint error, ~1e-4 relative at 1 deg for these small arrays; 1e-3 allows it.
  TestRng rng(80);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = testing::RandomArray(rng, 6, g, 1.0);
    const AngularGrid grid = AngularGrid::FromRanges({0, 180, 1}, {0, 359, 1});
    const PatternResult p = ComputePattern(a, a.currents, grid);
    EXPECT_NEAR(IntegrateOverSphere(grid, p.directivity, g == Ground::kPec ? 90.0 : 180.0), 4 * kPi,
                1e-3 * 4 * kPi)
        << ToString(g);
  }
}

TEST(Pattern, PartsAgreeWithTheEngine) {
  TestRng rng(81);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = testing::RandomArray(rng, 9, g);
    const AngularGrid grid = AngularGrid::FromRanges({0, 180, 4}, {0, 356, 4});
    const PatternResult p = ComputePattern(a, a.currents, grid);
    const std::size_t n = grid.size();
    ASSERT_EQ(p.field.size(), n);
    ASSERT_EQ(static_cast<std::size_t>(p.intensity_w_sr.size()), n);
    ASSERT_EQ(static_cast<std::size_t>(p.directivity.size()), n);
    ASSERT_EQ(static_cast<std::size_t>(p.axial_ratio_db.size()), n);
    ASSERT_EQ(static_cast<std::size_t>(p.tilt_deg.size()), n);
    ASSERT_EQ(p.sense.size(), n);
    EXPECT_EQ(p.grid.theta_deg, grid.theta_deg);
    EXPECT_EQ(p.grid.phi_deg, grid.phi_deg);

    const FarField f = FieldPlan(a, Directions::FromGrid(grid)).Execute(a.currents);
    const double scale = testing::Magnitude(f).maxCoeff();
    EXPECT_LE(testing::MaxFieldDifference(p.field, f), 1e-13 * scale);

    const Eigen::MatrixXd r = ResistanceMatrix(a);
    const double power = RadiatedPower(r, a.currents);
    EXPECT_LE((p.resistance_ohm - r).cwiseAbs().maxCoeff(), 1e-14 * r.cwiseAbs().maxCoeff());
    EXPECT_NEAR(p.radiated_power_w, power, 1e-13 * power);
    EXPECT_NEAR(p.summary.radiated_power_w, power, 1e-13 * power);

    double peak = 0;
    std::size_t peak_i = 0;
    for (std::size_t i = 0; i < n; ++i) {
      const double u = (std::norm(f.e_theta[i]) + std::norm(f.e_phi[i])) / (2 * kEta0_ohm);
      const double umax = scale * scale / (2 * kEta0_ohm);
      EXPECT_NEAR(p.intensity_w_sr[i], u, 1e-12 * umax);
      EXPECT_NEAR(p.directivity[i], 4 * kPi * u / power, 1e-12 * 4 * kPi * umax / power);
      if (p.directivity[i] > peak) peak = p.directivity[i], peak_i = i;
      const Polarization pol = PolarizationOf(p.field.e_theta[i], p.field.e_phi[i]);
      EXPECT_EQ(p.sense[i], pol.sense) << "direction " << i;
      if (std::isfinite(pol.axial_ratio_db)) {
        EXPECT_NEAR(p.axial_ratio_db[i], pol.axial_ratio_db, 1e-9) << "direction " << i;
      }
      if (std::isfinite(pol.tilt_deg)) {
        EXPECT_NEAR(p.tilt_deg[i], pol.tilt_deg, 1e-9) << "direction " << i;
      }
    }
    EXPECT_DOUBLE_EQ(p.summary.peak_directivity, peak);
    EXPECT_EQ(p.summary.peak_theta_deg, grid.theta_deg[peak_i / grid.phi_deg.size()]);
    EXPECT_EQ(p.summary.peak_phi_deg, grid.phi_deg[peak_i % grid.phi_deg.size()]);
    EXPECT_EQ(p.summary.num_dipoles, a.size());
    EXPECT_EQ(p.summary.num_sources, g == Ground::kPec ? 2 * a.size() : a.size());
    EXPECT_EQ(p.summary.num_directions, n);
    EXPECT_GE(p.summary.threads_used, 1);
  }
}

TEST(Pattern, ActiveResistancesSumToThePower) {
  // sum_m 1/2 |I_m|^2 Ract_m = P (CONVENTIONS §1, active resistance definition).
  TestRng rng(82);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const testing::TestArray a = testing::RandomArray(rng, 14, g);
    const PatternResult p =
        ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 180, 10}, {0, 350, 10}));
    ASSERT_EQ(p.active_resistance_ohm.size(), 14);
    double sum = 0;
    for (int m = 0; m < 14; ++m) sum += 0.5 * std::norm(a.currents[m]) * p.active_resistance_ohm[m];
    EXPECT_NEAR(sum, p.radiated_power_w, 1e-12 * p.radiated_power_w);
  }
}

TEST(Pattern, OneGeometryServesManyExcitations) {
  // Synthesis and tolerance studies change the currents many times on one geometry:
  // one FieldPlan and one resistance matrix of the geometry, reused for several
  // current vectors, give what a separate ComputePattern gives for each. (FieldPlan
  // alone, with fresh plans and linearity: FarField.PlanReuseEqualsFreshPlansAndIsLinear.)
  TestRng rng(86);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const Array geometry = testing::RandomArray(rng, 10, g);  // geometry only
    const AngularGrid grid = AngularGrid::FromRanges({0, 180, 6}, {0, 354, 6});
    PatternOptions o;
    o.field = testing::DirectMethod();
    const FieldPlan plan(geometry, Directions::FromGrid(grid), o.field);
    const Eigen::MatrixXd r = ResistanceMatrix(geometry);
    FarField previous;
    for (int k = 0; k < 3; ++k) {
      const Eigen::VectorXcd currents = testing::RandomCurrents(rng, 10);
      const PatternResult p = ComputePattern(geometry, currents, grid, o);
      const FarField f = plan.Execute(currents);
      const double scale = testing::Magnitude(p.field).maxCoeff();
      EXPECT_LE(testing::MaxFieldDifference(f, p.field), 1e-14 * scale) << ToString(g) << " " << k;
      EXPECT_NEAR(RadiatedPower(r, currents), p.radiated_power_w, 1e-14 * p.radiated_power_w);
      // Each excitation is its own: the reused plan does not keep an earlier one.
      if (k > 0) {
        EXPECT_GT(testing::MaxFieldDifference(f, previous), 1e-3 * scale);
      }
      previous = f;
    }
  }
}

TEST(Pattern, ThreadCountDoesNotChangeTheResult) {
  TestRng rng(83);
  const testing::TestArray a = testing::RandomArray(rng, 20, Ground::kNone);
  const AngularGrid grid = AngularGrid::FromRanges({0, 180, 3}, {0, 357, 3});
  PatternOptions one, two;
  one.field.num_threads = 1;
  two.field.num_threads = 2;
  const PatternResult p1 = ComputePattern(a, a.currents, grid, one);
  const PatternResult p2 = ComputePattern(a, a.currents, grid, two);
  EXPECT_LE(testing::MaxFieldDifference(p1.field, p2.field),
            1e-13 * testing::Magnitude(p1.field).maxCoeff());
  EXPECT_LE((p1.directivity - p2.directivity).cwiseAbs().maxCoeff(),
            1e-13 * p1.directivity.maxCoeff());
  EXPECT_EQ(p1.summary.threads_used, 1);
}

TEST(Pattern, ProgressIsMonotoneWithinZeroToOne) {
  TestRng rng(84);
  const testing::TestArray a = testing::RandomArray(rng, 5, Ground::kNone);
  std::vector<double> seen;
  PatternOptions o;
  o.progress = [&](double x) { seen.push_back(x); };
  ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 180, 0.5}, {0, 359.5, 0.5}), o);
  for (std::size_t i = 0; i < seen.size(); ++i) {
    EXPECT_GE(seen[i], 0.0);
    EXPECT_LE(seen[i], 1.0);
    if (i > 0) {
      EXPECT_GE(seen[i], seen[i - 1]);
    }
  }
}

TEST(Pattern, PowerStageReportsProgress) {
  // The O(N^2) power of a large array ran before the first progress call: the bar
  // stalled at 0. Streamed rows (no matrix) report between slabs of 64 rows.
  TestRng rng(86);
  const testing::TestArray a = testing::RandomArray(rng, 300, Ground::kNone);
  std::vector<double> seen;
  PatternOptions o;
  o.resistance_matrix_max_dipoles = 0;  // the streamed route
  o.progress = [&](double x) { seen.push_back(x); };
  const PatternResult r =
      ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 180, 10}, {0, 350, 10}), o);
  ASSERT_EQ(r.summary.power_route, PowerRoute::kStreamed);
  // 300 rows in slabs of 64: 5 calls, then the power's end, then the field's.
  ASSERT_GE(seen.size(), 7u);
  EXPECT_GT(seen[0], 0.0);
  for (std::size_t i = 1; i < 5; ++i) EXPECT_GT(seen[i], seen[i - 1]);
  EXPECT_LT(seen[4], 1.0);
  EXPECT_EQ(seen.back(), 1.0);
}

TEST(Pattern, RejectsArraysThatRadiateNothing) {
  TestRng rng(85);
  testing::TestArray a = testing::RandomArray(rng, 3, Ground::kNone);
  a.currents.setZero();
  EXPECT_THROW(ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 180, 10}, {0, 350, 10})),
               InvalidArgument);
}

}  // namespace
}  // namespace lobecast
