// Power and R x by band-limited quadrature (engine/power/power_quadrature.h) against
// the closed form (engine/power/radiated_power.h, power_large.h: the mutual
// resistance matrix of CONVENTIONS §1, an independent route with no quadrature),
// within the bound the quadrature reports; the tail bound of the spherical Bessel
// functions against std::sph_bessel (the C++17 special functions, ISO/IEC 14882:2017
// [sf.cmath.sph_bessel]); the route choice of power_cost.h.
#include "engine/power/power_quadrature.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "engine/pattern.h"
#include "engine/power/power_cost.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "engine/quadrature.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

using testing::RandomArray;
using testing::TestArray;
using testing::TestRng;
using testing::ZLattice;

constexpr double kEps = std::numeric_limits<double>::epsilon();

// tail[d] = sum_{l > d} (2l + 1) max over x' in [0, x] of |j_l(x')|, the maximum
// over a fine grid of x' (j_l rises monotonically there for the l that matter), by
// std::sph_bessel, for d < x + 200.
std::vector<double> ReferenceTails(double x) {
  const int top = static_cast<int>(x) + 200;
  std::vector<double> term(static_cast<std::size_t>(top) + 1, 0.0), tail(term.size(), 0.0);
  for (int l = 0; l <= top; ++l) {
    double peak = 0;
    for (int i = 0; i <= 200; ++i) {
      peak = std::max(peak, std::abs(std::sph_bessel(static_cast<unsigned>(l), x * i / 200.0)));
    }
    term[static_cast<std::size_t>(l)] = (2.0 * l + 1.0) * peak;
  }
  for (int d = top - 1; d >= 0; --d) {
    tail[static_cast<std::size_t>(d)] =
        tail[static_cast<std::size_t>(d) + 1] + term[static_cast<std::size_t>(d) + 1];
  }
  return tail;
}

TEST(BesselTail, BoundsTheTrueTailAndIsSharp) {
  for (double x : {0.5, 3.0, 20.0, 80.0}) {
    const std::vector<double> reference = ReferenceTails(x);
    for (double tail : {1e-10, 1e-17}) {
      const int degree = BandLimitDegree(x, tail);
      const auto at = static_cast<std::size_t>(degree);
      ASSERT_LT(at + 1, reference.size());
      const double bound = SphericalBesselTailBound(degree, x);
      EXPECT_LE(bound, tail) << "x " << x;
      // The bound holds at the degree chosen and one below.
      EXPECT_GE(bound * (1 + 1e-9), reference[at]) << "x " << x;
      EXPECT_GE(SphericalBesselTailBound(degree - 1, x) * (1 + 1e-9), reference[at - 1])
          << "x " << x;
      // Sharp: the true tail needs at most 2 x^(1/3) + 2 fewer degrees (the bound's
      // start |j_l| <= 1 costs that much).
      int true_degree = degree;
      while (true_degree > 0 && reference[static_cast<std::size_t>(true_degree) - 1] <= tail)
        --true_degree;
      EXPECT_LE(degree - true_degree, 2.0 * std::cbrt(x) + 2.0) << "x " << x;
      EXPECT_GE(degree, static_cast<int>(x) - 1) << "x " << x;
    }
  }
  EXPECT_EQ(SphericalBesselTailBound(0, 0.0), 0.0);
  EXPECT_EQ(BandLimitDegree(0.0, 1e-16), 0);
  EXPECT_TRUE(std::isinf(SphericalBesselTailBound(5, 100.0)));  // below the turning point
  // Degree 2 k a + O((k a)^(1/3)) for large x (power_quadrature.h).
  const double x = 4439.0;
  const int d = BandLimitDegree(x, 1e-20);
  EXPECT_GT(d, x);
  EXPECT_LT(d, x + 30.0 * std::cbrt(x));
}

TEST(BesselTail, LargeGaussRulesStayExact) {
  // The rules the quadrature takes for a 1000-wavelength array: weights sum to 2
  // and integrate x^2 and x^(2n-2) (Abramowitz and Stegun 25.4.29).
  for (int n : {2, 301, 2400}) {
    const QuadratureRule q = GaussLegendre(n);
    double w = 0, x2 = 0, top = 0;
    for (int i = 0; i < n; ++i) {
      const double xi = q.nodes[static_cast<std::size_t>(i)],
                   wi = q.weights[static_cast<std::size_t>(i)];
      w += wi;
      x2 += wi * xi * xi;
      top += wi * std::pow(xi, 2 * n - 2);
    }
    EXPECT_NEAR(w, 2.0, 1e-13) << n;
    EXPECT_NEAR(x2, 2.0 / 3.0, 1e-13) << n;
    EXPECT_NEAR(top, 2.0 / (2 * n - 1), 1e-13) << n;
  }
}

// |P_quadrature - P_closed| within the reported bound plus the closed form's own
// rounding (eps S, S the sum of its terms' magnitudes, radiated_power.h).
void ExpectWithinBound(const TestArray& a, const PowerQuadratureOptions& o, const std::string& name,
                       double bound_below) {
  const QuadraturePower q = RadiatedPowerByQuadrature(a, a.currents, o);
  const StreamedPower c = RadiatedPowerStreamed(a, a.currents);
  const double slack =
      q.error_bound_relative * q.radiated_power_w + 10 * kEps * c.term_magnitudes_w;
  EXPECT_LE(std::abs(q.radiated_power_w - c.radiated_power_w), slack)
      << name << ": quadrature " << q.radiated_power_w << ", closed " << c.radiated_power_w
      << ", bound " << q.error_bound_relative;
  EXPECT_LT(q.error_bound_relative, bound_below) << name;
  EXPECT_GT(q.error_bound_relative, 0.0) << name;
  EXPECT_EQ(q.truncation_bound_relative + q.field_bound_relative, q.error_bound_relative);
}

TEST(PowerQuadrature, MatchesTheClosedFormOnRandomArrays) {
  TestRng rng(71);
  const PowerQuadratureOptions o;  // the default target, 1e-10
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    // Dipoles and box sides (wavelengths): from one dipole to 10^4, up to 100
    // wavelengths across.
    for (const auto& [n, extent] : {std::pair{1, 0.5},
                                    {2, 3.0},
                                    {30, 0.2},
                                    {30, 100.0},
                                    {300, 10.0},
                                    {3000, 5.0},
                                    {10000, 8.0}}) {
      const TestArray a = RandomArray(rng, n, g, extent);
      ExpectWithinBound(a, o,
                        std::to_string(n) + " dipoles, " + std::to_string(extent) +
                            " wavelengths, " + std::string(ToString(g)),
                        1e-10);
    }
  }
}

TEST(PowerQuadrature, MeetsALooserTargetWithAFewerNodes) {
  TestRng rng(72);
  const TestArray a = RandomArray(rng, 200, Ground::kNone, 12.0);
  PowerQuadratureOptions loose;
  loose.target_relative = 1e-4;
  const SphereRule tight_rule = PowerQuadratureRule(a);
  const SphereRule loose_rule = PowerQuadratureRule(a, loose);
  EXPECT_LT(loose_rule.band_degree, tight_rule.band_degree);
  ExpectWithinBound(a, loose, "loose target", 1e-4);
}

TEST(PowerQuadrature, LatticesTakeTheFastPathAndTheSymmetricHalf) {
  TestRng rng(73);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    const TestArray a = ZLattice(rng, 64, g);  // 4096 z dipoles at half a wavelength
    PowerQuadratureOptions o;
    o.block_directions = 20000;  // several blocks
    const QuadraturePower q = RadiatedPowerByQuadrature(a, a.currents, o);
    // Planar with vertical moments in free space, images over PEC: mirror symmetric.
    EXPECT_TRUE(q.rule.upper_half) << ToString(g);
    EXPECT_EQ(q.rule.upper_weight, g == Ground::kPec ? 1.0 : 2.0);
    EXPECT_GT(q.blocks, 1u);
    EXPECT_GT(q.fast_blocks, 0u) << ToString(g);
    ExpectWithinBound(a, o, "lattice " + std::string(ToString(g)), 1e-10);
  }
  // Mixed vertical and horizontal moments in one plane are not symmetric.
  TestArray mixed = ZLattice(rng, 4, Ground::kNone);
  mixed.dipoles[3].orientation = Vec3::UnitX();
  EXPECT_FALSE(PowerQuadratureRule(mixed).upper_half);
  ExpectWithinBound(mixed, {}, "mixed plane", 1e-10);
}

TEST(PowerQuadrature, DoesNotDependOnThreadsOrBlocks) {
  TestRng rng(74);
  const TestArray a = ZLattice(rng, 40, Ground::kPec);
  PowerQuadratureOptions o;
  o.num_threads = 1;
  const QuadraturePower one = RadiatedPowerByQuadrature(a, a.currents, o);
  o.num_threads = 2;
  EXPECT_EQ(RadiatedPowerByQuadrature(a, a.currents, o).radiated_power_w, one.radiated_power_w);
  // Other blocks: other plans (each block's fast pass is its own), within the bound.
  o.block_directions = 5000;
  const QuadraturePower blocked = RadiatedPowerByQuadrature(a, a.currents, o);
  EXPECT_GT(blocked.blocks, one.blocks);
  EXPECT_NEAR(blocked.radiated_power_w, one.radiated_power_w,
              (blocked.error_bound_relative + one.error_bound_relative) * one.radiated_power_w);
}

TEST(PowerQuadrature, ResistanceProductMatchesTheMatrix) {
  TestRng rng(75);
  for (Ground g : {Ground::kNone, Ground::kPec}) {
    for (const TestArray& a : {RandomArray(rng, 150, g, 6.0), ZLattice(rng, 20, g)}) {
      const Eigen::MatrixXd r = ResistanceMatrix(a);
      const Eigen::VectorXcd expected = r * a.currents;
      const QuadratureResistanceProduct q = ResistanceProductByQuadrature(a, a.currents);
      EXPECT_LT(q.error_bound_relative, 1e-9) << ToString(g);
      const double peak = expected.cwiseAbs().maxCoeff();
      // The closed form's rounding per row: eps sum_n |R_mn x_n|.
      const Eigen::VectorXd scale = r.cwiseAbs() * a.currents.cwiseAbs();
      for (Eigen::Index m = 0; m < expected.size(); ++m) {
        EXPECT_LE(std::abs(q.values[m] - expected[m]),
                  q.error_bound_relative * peak + 10 * kEps * scale[m])
            << ToString(g) << " row " << m;
      }
      // 1/2 x^H R x is the power.
      EXPECT_NEAR(0.5 * a.currents.dot(q.values).real(), RadiatedPower(r, a.currents),
                  1e-9 * RadiatedPower(r, a.currents));
    }
  }
}

TEST(PowerQuadrature, RejectsBadOptions) {
  TestRng rng(76);
  const TestArray a = RandomArray(rng, 3, Ground::kNone);
  PowerQuadratureOptions o;
  o.target_relative = 0.5;
  EXPECT_THROW(RadiatedPowerByQuadrature(a, a.currents, o), InvalidArgument);
  o = {};
  o.block_directions = 0;
  EXPECT_THROW(PowerQuadratureRule(a, o), InvalidArgument);
  EXPECT_THROW(RadiatedPowerByQuadrature(a, Eigen::VectorXcd::Ones(2)), InvalidArgument);
}

TEST(PowerRoute, NamesRoundTrip) {
  for (PowerMethod m : {PowerMethod::kClosed, PowerMethod::kQuadrature, PowerMethod::kAuto})
    EXPECT_EQ(PowerMethodFromString(std::string(ToString(m))), m);
  EXPECT_EQ(PowerMethodFromString("Quadrature"), PowerMethod::kQuadrature);
  EXPECT_FALSE(PowerMethodFromString("quad").has_value());
  for (PowerRoute r : {PowerRoute::kMatrix, PowerRoute::kStreamed, PowerRoute::kQuadrature})
    EXPECT_EQ(PowerRouteFromString(std::string(ToString(r))), r);
}

TEST(PowerRoute, AutoKeepsTheClosedFormUnlessItIsSlow) {
  TestRng rng(77);
  // Small: the closed form is milliseconds, so auto keeps it without costing the
  // quadrature.
  const TestArray small = ZLattice(rng, 20, Ground::kNone);
  const PowerChoice s = ChoosePowerRoute(small, PowerMethod::kAuto, true, false);
  EXPECT_EQ(s.route, PowerRoute::kMatrix);
  EXPECT_FALSE(s.quadrature_costed);
  EXPECT_TRUE(s.why.empty());
  // 200 x 200 at half a wavelength: 1.6e9 streamed pairs, against a lattice
  // transform on ~2e5 nodes.
  const TestArray large = ZLattice(rng, 200, Ground::kNone);
  const PowerChoice l = ChoosePowerRoute(large, PowerMethod::kAuto, false, false);
  EXPECT_GT(l.closed.seconds, kAutoClosedUpToSeconds);
  EXPECT_TRUE(l.quadrature_costed);
  EXPECT_LT(l.quadrature.seconds, 0.5 * l.closed.seconds);
  EXPECT_EQ(l.route, PowerRoute::kQuadrature);
  EXPECT_FALSE(l.why.empty());
  // Asking for the matrix keeps the closed form; the quadrature with it is refused.
  EXPECT_EQ(ChoosePowerRoute(large, PowerMethod::kAuto, true, true).route, PowerRoute::kMatrix);
  EXPECT_THROW(ChoosePowerRoute(small, PowerMethod::kQuadrature, true, true), InvalidArgument);
  EXPECT_EQ(ChoosePowerRoute(small, PowerMethod::kQuadrature, true, false).route,
            PowerRoute::kQuadrature);
  EXPECT_EQ(ChoosePowerRoute(large, PowerMethod::kClosed, false, false).route,
            PowerRoute::kStreamed);
  // The costs grow as they should: the closed form as N^2, the matrix's bytes 8 N^2.
  const PowerCost c1 = ClosedPowerCost(PowerRoute::kStreamed, 1000, Ground::kNone, 1);
  const PowerCost c2 = ClosedPowerCost(PowerRoute::kStreamed, 2000, Ground::kNone, 1);
  EXPECT_NEAR(c2.seconds / c1.seconds, 4.0, 1e-12);
  EXPECT_GE(ClosedPowerCost(PowerRoute::kMatrix, 1000, Ground::kNone, 1).bytes, 8e6);
}

TEST(PowerRoute, PatternJobTakesTheQuadratureWhenAsked) {
  TestRng rng(78);
  const TestArray a = RandomArray(rng, 40, Ground::kPec, 4.0);
  const AngularGrid grid = AngularGrid::FromRanges({0, 90, 5}, {0, 355, 5});
  PatternOptions closed;
  closed.power_method = PowerMethod::kClosed;
  PatternOptions quadrature;
  quadrature.power_method = PowerMethod::kQuadrature;
  const PatternResult rc = ComputePattern(a, a.currents, grid, closed);
  const PatternResult rq = ComputePattern(a, a.currents, grid, quadrature);
  const PatternResult ra = ComputePattern(a, a.currents, grid);  // auto: the closed form here
  EXPECT_EQ(ra.radiated_power_w, rc.radiated_power_w);
  EXPECT_EQ(ra.summary.power_route, PowerRoute::kMatrix);
  EXPECT_EQ(rq.summary.power_route, PowerRoute::kQuadrature);
  EXPECT_GT(rq.summary.power_quadrature_nodes, 0u);
  EXPECT_GT(rq.summary.power_quadrature_degree, 0);
  EXPECT_LE(
      std::abs(rq.radiated_power_w - rc.radiated_power_w),
      rq.summary.power_error_bound_relative * rq.radiated_power_w + 1e-14 * rc.radiated_power_w);
  EXPECT_EQ(rq.resistance_ohm.size(), 0);
  ASSERT_EQ(rq.active_resistance_ohm.size(), 40);
  EXPECT_TRUE(rq.active_resistance_ohm.array().isNaN().all());
  EXPECT_GE(rq.summary.power_significant_digits, 9.0);
  EXPECT_NE(rq.summary.message.find("active resistances not computed"), std::string::npos);
  EXPECT_NE(rq.summary.BriefReport().find("power quadrature (degree"), std::string::npos);
  PatternOptions both = quadrature;
  both.store_resistance_matrix = true;
  EXPECT_THROW(ComputePattern(a, a.currents, grid, both), InvalidArgument);
}

}  // namespace
}  // namespace lobecast
