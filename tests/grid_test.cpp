// Angular grids and direction lists (engine/grid.h).
#include "engine/grid.h"

#include <cmath>
#include <limits>
#include <vector>

#include <gtest/gtest.h>
#include <Eigen/Geometry>

#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {
namespace {

TEST(AngleRange, StopIsInclusive) {
  const std::vector<double> t = AngleRange{0, 180, 1}.Values();
  ASSERT_EQ(t.size(), 181u);
  EXPECT_EQ(t.front(), 0.0);
  EXPECT_NEAR(t.back(), 180.0, 1e-12);
  const std::vector<double> p = AngleRange{0, 360, 0.25}.Values();
  ASSERT_EQ(p.size(), 1441u);
  EXPECT_NEAR(p.back(), 360.0, 1e-12);
  for (std::size_t i = 0; i < p.size(); ++i) EXPECT_NEAR(p[i], 0.25 * i, 1e-12);
  // Steps that are not exact in binary still reach the stop.
  EXPECT_EQ(AngleRange({0, 10, 0.1}).Values().size(), 101u);
  EXPECT_EQ(AngleRange({-90, 90, 0.3}).Values().size(), 601u);
  EXPECT_EQ(AngleRange({0, 1, 0.01}).Values().size(), 101u);
}

TEST(AngleRange, StopNotOnTheStepIsNotPassed) {
  const std::vector<double> v = AngleRange{0, 10, 3}.Values();
  ASSERT_EQ(v.size(), 4u);
  EXPECT_NEAR(v.back(), 9.0, 1e-12);
  const std::vector<double> one = AngleRange{45, 45, 1}.Values();
  ASSERT_EQ(one.size(), 1u);
  EXPECT_EQ(one[0], 45.0);
}

TEST(AngleRange, InvalidRangesThrow) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  EXPECT_THROW(AngleRange({0, 180, 0}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({0, 180, -1}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({0, 180, nan}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({0, 180, inf}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({nan, 180, 1}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({0, inf, 1}).Values(), InvalidArgument);
  EXPECT_THROW(AngleRange({10, 0, 1}).Values(), InvalidArgument);
  EXPECT_THROW(AngularGrid::FromRanges({0, 180, 0}, {0, 360, 1}), InvalidArgument);
}

TEST(AngularGrid, FlattenedIndexIsThetaMajor) {
  const AngularGrid g = AngularGrid::FromRanges({0, 180, 30}, {0, 350, 10});
  ASSERT_EQ(g.theta_deg.size(), 7u);
  ASSERT_EQ(g.phi_deg.size(), 36u);
  EXPECT_EQ(g.size(), 7u * 36u);
  const Directions d = Directions::FromGrid(g);
  ASSERT_EQ(d.size(), g.size());
  for (std::size_t i = 0; i < g.theta_deg.size(); ++i)
    for (std::size_t j = 0; j < g.phi_deg.size(); ++j) {
      const std::size_t k = i * g.phi_deg.size() + j;
      EXPECT_NEAR(d.theta_rad(k), g.theta_deg[i] * kDegree, 1e-15);
      EXPECT_NEAR(d.phi_rad(k), g.phi_deg[j] * kDegree, 1e-15);
    }
}

TEST(Directions, UnitVectorsAreARightHandedTriad) {
  // r_hat = (sin th cos ph, sin th sin ph, cos th), theta_hat x phi_hat = r_hat
  // (CONVENTIONS §1).
  std::vector<double> th, ph;
  for (double t = 0; t <= 180; t += 15)
    for (double p = -180; p < 360; p += 20) {
      th.push_back(t * kDegree);
      ph.push_back(p * kDegree);
    }
  const Directions d = Directions::FromAngles(th, ph);
  ASSERT_EQ(d.size(), th.size());
  for (std::size_t i = 0; i < d.size(); ++i) {
    const Vec3 r = d.r_hat(i), t = d.theta_hat(i), p = d.phi_hat(i);
    const Vec3 r_expected(std::sin(th[i]) * std::cos(ph[i]), std::sin(th[i]) * std::sin(ph[i]),
                          std::cos(th[i]));
    EXPECT_LE((r - r_expected).norm(), 1e-15);
    EXPECT_LE((t.cross(p) - r).norm(), 1e-15);
    EXPECT_NEAR(t.dot(r), 0.0, 1e-15);
    EXPECT_NEAR(p.dot(r), 0.0, 1e-15);
    EXPECT_NEAR(t.norm(), 1.0, 1e-15);
    EXPECT_NEAR(p.norm(), 1.0, 1e-15);
    // theta_hat points toward increasing theta: -z component at the equator.
    EXPECT_NEAR(t.z(), -std::sin(th[i]), 1e-15);
    EXPECT_NEAR(p.x(), -std::sin(ph[i]), 1e-15);
  }
}

}  // namespace
}  // namespace lobecast
