// The generic searches of engine/analysis/local_search.h: Brent's root finder,
// golden-section line minimum and the Nelder-Mead plane minimum, on functions whose
// answers are known in closed form; their lockstep forms against one search at a time.
#include "engine/analysis/local_search.h"

#include <cmath>
#include <limits>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine/check.h"
#include "engine/constants.h"

namespace lobecast {
namespace {

TEST(FindRoot, FindsClosedFormRoots) {
  // cos x = x has its root at 0.7390851332151607 (the Dottie number, from memory;
  // the check below confirms it as a root to rounding instead of trusting the digits).
  auto g = [](double x) { return std::cos(x) - x; };
  const double r = FindRoot(g, 0.0, 1.0, g(0.0), g(1.0), 1e-14);
  EXPECT_NEAR(r, 0.7390851332151607, 1e-13);
  EXPECT_LE(std::abs(g(r)), 1e-13);
  // sqrt(2) from x^2 - 2, bracket in either order of signs.
  auto h = [](double x) { return x * x - 2.0; };
  EXPECT_NEAR(FindRoot(h, 1.0, 2.0, h(1.0), h(2.0), 1e-15), std::sqrt(2.0), 4e-15);
  auto neg = [&](double x) { return -h(x); };
  EXPECT_NEAR(FindRoot(neg, 1.0, 2.0, neg(1.0), neg(2.0), 1e-15), std::sqrt(2.0), 4e-15);
}

TEST(FindRoot, ZeroAtAnEndIsTheRootAndAJumpIsFoundLikeOne) {
  auto f = [](double x) { return x - 3.0; };
  EXPECT_EQ(FindRoot(f, 3.0, 5.0, 0.0, 2.0, 1e-12), 3.0);
  EXPECT_EQ(FindRoot(f, 1.0, 3.0, -2.0, 0.0, 1e-12), 3.0);
  // A step from -1 to +1 at 0.3 (like the edge of the no-field region over ground):
  // the bracket closes on the jump to within the tolerance.
  auto step = [](double x) { return x < 0.3 ? -1.0 : 1.0; };
  EXPECT_NEAR(FindRoot(step, 0.0, 1.0, -1.0, 1.0, 1e-10), 0.3, 2e-10);
}

TEST(FindRoot, NoSignChangeIsAnInternalError) {
  auto f = [](double x) { return x * x + 1.0; };
  EXPECT_THROW(FindRoot(f, -1.0, 1.0, f(-1.0), f(1.0), 1e-9), InternalError);
}

TEST(MinimizeOnInterval, QuadraticQuarticAndEndpointMinima) {
  const LineMinimum q =
      MinimizeOnInterval([](double x) { return (x - 0.4) * (x - 0.4); }, 0.0, 1.0, 1e-10);
  EXPECT_NEAR(q.x, 0.4, 1e-9);
  EXPECT_NEAR(q.value, 0.0, 1e-18);
  // A quartic minimum (flat to fourth order) is located by comparisons alone, to the
  // tolerance when its value is 0 ...
  const LineMinimum k =
      MinimizeOnInterval([](double x) { return std::pow(x + 0.25, 4); }, -1.0, 1.0, 1e-8);
  EXPECT_NEAR(k.x, -0.25, 1e-8);
  // ... and only to where dx^4 drops below the rounding of its value when that is 1:
  // dx ~ eps^(1/4) ~ 1.2e-4.
  const LineMinimum k1 =
      MinimizeOnInterval([](double x) { return std::pow(x + 0.25, 4) + 1.0; }, -1.0, 1.0, 1e-8);
  EXPECT_NEAR(k1.x, -0.25, 2.5e-4);
  // Monotonic: the minimum is the endpoint.
  const LineMinimum e = MinimizeOnInterval([](double x) { return x; }, 2.0, 3.0, 1e-9);
  EXPECT_NEAR(e.x, 2.0, 1e-8);
  // An exact null |sin| at pi, bracket not centred on it.
  const LineMinimum n =
      MinimizeOnInterval([](double x) { return std::abs(std::sin(x)); }, 2.5, 3.5, 1e-12);
  EXPECT_NEAR(n.x, kPi, 1e-11);
}

TEST(MinimizeOnPlane, RosenbrockValleyAndForbiddenRegion) {
  // Rosenbrock's function, minimum 0 at (1, 1) (H. H. Rosenbrock, Computer Journal 3,
  // 1960): a curved valley that a simplex must follow.
  auto rosen = [](double a, double b) {
    return 100.0 * (b - a * a) * (b - a * a) + (1.0 - a) * (1.0 - a);
  };
  PlaneSearchOptions o;
  o.initial_step = 0.1;
  o.tolerance = 1e-10;
  o.max_evaluations = 5000;
  const PlaneMinimum m = MinimizeOnPlane(rosen, -1.2, 1.0, o);
  EXPECT_TRUE(m.converged);
  EXPECT_NEAR(m.a, 1.0, 1e-6);
  EXPECT_NEAR(m.b, 1.0, 1e-6);
  EXPECT_LE(m.evaluations, o.max_evaluations);

  // +inf marks points that are not allowed: the minimum of (a-1)^2 + b^2 with a <= 0.5
  // lies on the boundary a = 0.5.
  auto walled = [](double a, double b) {
    return a > 0.5 ? std::numeric_limits<double>::infinity() : (a - 1) * (a - 1) + b * b;
  };
  o.initial_step = 0.05;
  const PlaneMinimum w = MinimizeOnPlane(walled, 0.0, 0.3, o);
  EXPECT_NEAR(w.a, 0.5, 1e-6);
  EXPECT_NEAR(w.b, 0.0, 1e-6);
}

TEST(MinimizeOnPlane, StopsAtTheEvaluationLimit) {
  PlaneSearchOptions o;
  o.tolerance = 1e-300;  // never reached
  o.max_evaluations = 50;
  const PlaneMinimum m =
      MinimizeOnPlane([](double a, double b) { return a * a + b * b; }, 1.0, 1.0, o);
  EXPECT_FALSE(m.converged);
  EXPECT_LE(m.evaluations, 50 + 2);  // a step may finish the simplex it started
}

TEST(MinimizeOnPlane, StopsAtAnExactZeroWhenAsked) {
  // A valley of exact zeros along the line b = 2 a (a null curve): a level >= 0 cannot
  // go deeper than 0, so the search asked to stop there ends on the line at once
  // instead of wandering along it to the evaluation limit.
  auto valley = [](double a, double b) {
    const double d = b - 2.0 * a;
    return std::abs(d) < 1e-3 ? 0.0 : d * d;
  };
  PlaneSearchOptions o;
  o.initial_step = 0.05;
  o.tolerance = 1e-12;
  o.max_evaluations = 2000;
  const PlaneMinimum plain = MinimizeOnPlane(valley, 0.3, 0.0, o);
  o.stop_at_zero = true;
  const PlaneMinimum stopped = MinimizeOnPlane(valley, 0.3, 0.0, o);
  EXPECT_EQ(stopped.value, 0.0);
  EXPECT_TRUE(stopped.converged);
  EXPECT_LT(std::abs(stopped.b - 2.0 * stopped.a), 1e-3);
  EXPECT_LT(stopped.evaluations, plain.evaluations);
  EXPECT_LT(stopped.evaluations, 100);
}

// The lockstep forms run many searches as one batch a round: each search must end where
// it ends alone, with the same evaluations, whatever the others do (they stop at other
// rounds and wait for other kinds of step).
TEST(MinimizeOnPlanes, EachSearchEndsWhereItEndsAlone) {
  // Search i minimizes a shifted, scaled Rosenbrock function (different valleys, so the
  // simplexes reflect, expand, contract and shrink at different rounds).
  auto f = [](std::size_t i, double a, double b) {
    const double s = 1.0 + 0.5 * static_cast<double>(i), c = 0.3 * static_cast<double>(i);
    const double u = a - c, v = b + c;
    return s * 100.0 * (v - u * u) * (v - u * u) + (1.0 - u) * (1.0 - u);
  };
  const std::vector<std::pair<double, double>> starts = {
      {-1.2, 1.0}, {0.5, 0.5}, {2.0, -1.0}, {0.0, 0.0}, {-0.4, 3.0}};
  PlaneSearchOptions o;
  o.initial_step = 0.1;
  o.tolerance = 1e-10;
  o.max_evaluations = 300;  // some searches stop at the limit, others converge
  std::vector<int> asked(starts.size(), 0);
  const std::vector<PlaneMinimum> all = MinimizeOnPlanes(
      [&](const std::vector<PlaneBatchPoint>& points) {
        std::vector<double> v;
        for (const PlaneBatchPoint& p : points) {
          ++asked[p.search];
          v.push_back(f(p.search, p.a, p.b));
        }
        return v;
      },
      starts, o);
  ASSERT_EQ(all.size(), starts.size());
  bool converged = false, limited = false;
  for (std::size_t i = 0; i < starts.size(); ++i) {
    const PlaneMinimum one = MinimizeOnPlane([&](double a, double b) { return f(i, a, b); },
                                             starts[i].first, starts[i].second, o);
    EXPECT_EQ(all[i].a, one.a) << i;
    EXPECT_EQ(all[i].b, one.b) << i;
    EXPECT_EQ(all[i].value, one.value) << i;
    EXPECT_EQ(all[i].evaluations, one.evaluations) << i;
    EXPECT_EQ(all[i].converged, one.converged) << i;
    EXPECT_EQ(asked[i], one.evaluations) << i;
    (one.converged ? converged : limited) = true;
  }
  EXPECT_TRUE(converged);
  EXPECT_TRUE(limited);
}

TEST(MinimizeOnIntervals, EachSearchEndsWhereItEndsAlone) {
  // Brackets of different widths stop at different rounds; one holds its minimum at an
  // end point.
  auto f = [](std::size_t i, double x) {
    return i == 2 ? x : std::abs(std::sin(x + 0.1 * static_cast<double>(i)));
  };
  const std::vector<std::pair<double, double>> brackets = {
      {2.5, 3.5}, {2.0, 4.0}, {2.0, 3.0}, {3.0, 3.2}};
  std::vector<int> asked(brackets.size(), 0);
  const std::vector<LineMinimum> all = MinimizeOnIntervals(
      [&](const std::vector<BatchPoint>& points) {
        std::vector<double> v;
        for (const BatchPoint& p : points) {
          ++asked[p.search];
          v.push_back(f(p.search, p.x));
        }
        return v;
      },
      brackets, 1e-12);
  ASSERT_EQ(all.size(), brackets.size());
  for (std::size_t i = 0; i < brackets.size(); ++i) {
    int calls = 0;
    const LineMinimum one = MinimizeOnInterval(
        [&](double x) {
          ++calls;
          return f(i, x);
        },
        brackets[i].first, brackets[i].second, 1e-12);
    EXPECT_EQ(all[i].x, one.x) << i;
    EXPECT_EQ(all[i].value, one.value) << i;
    EXPECT_EQ(asked[i], calls) << i;
  }
  EXPECT_EQ(all[2].x, 2.0);       // the end point
  EXPECT_NE(asked[0], asked[3]);  // different widths, different numbers of rounds
}

}  // namespace
}  // namespace lobecast
