// The inlined exp (engine/field/exp.h) against long double expl: relative error below
// 4e-16 over its whole range, and exact where exp is exact. It feeds the NUFFT
// kernel weights exp(beta (sqrt(1 - z^2) - 1)), arguments -37 to 0.
#include "engine/field/exp.h"

#include <cmath>
#include <vector>

#include <gtest/gtest.h>

#include "tests/test_util.h"

namespace lobecast {
namespace {

double MaxRelativeError(double lo, double hi, int n, unsigned seed) {
  testing::TestRng rng(seed);
  std::vector<double> x(static_cast<std::size_t>(n)), y(x.size());
  for (double& v : x) v = rng.Uniform(lo, hi);
  for (std::size_t i = 0; i < x.size(); ++i) y[i] = Exp(x[i]);
  double worst = 0;
  for (std::size_t i = 0; i < x.size(); ++i) {
    const long double ref = expl(static_cast<long double>(x[i]));
    worst = std::max(worst, static_cast<double>(std::fabs((y[i] - ref) / ref)));
  }
  return worst;
}

TEST(Exp, MatchesLongDoubleOverTheKernelRange) {
  EXPECT_LT(MaxRelativeError(-40.0, 0.0, 200000, 1), 4e-16);
}

TEST(Exp, MatchesLongDoubleOverItsWholeRange) {
  EXPECT_LT(MaxRelativeError(-708.0, 708.0, 200000, 2), 4e-16);
  EXPECT_LT(MaxRelativeError(-1e-3, 1e-3, 100000, 3), 4e-16);
}

TEST(Exp, ExactValues) {
  EXPECT_EQ(Exp(0.0), 1.0);
  EXPECT_EQ(Exp(-0.0), 1.0);
  EXPECT_NEAR(Exp(1.0), 2.718281828459045, 4e-16 * 2.72);
  // Powers of two come out of the reduction with r = 0 (the argument's own
  // rounding aside): compare with expl of the same double.
  const double x = std::log(2.0) * -30;
  EXPECT_NEAR(Exp(x), static_cast<double>(expl(static_cast<long double>(x))), 4e-16 * 1e-9);
}

}  // namespace
}  // namespace lobecast
