#include "engine/quadrature.h"

#include <cmath>

#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {

QuadratureRule GaussLegendre(int n) {
  if (n < 1) throw InvalidArgument("Gauss-Legendre rule: expected at least one node");
  QuadratureRule q;
  q.nodes.resize(n);
  q.weights.resize(n);
  for (int i = 0; i < (n + 1) / 2; ++i) {
    double x = std::cos(kPi * (i + 0.75) / (n + 0.5));
    double dp = 0;
    for (int iter = 0; iter < 100; ++iter) {
      // P_n(x) and P_n'(x) by the three-term recurrence.
      double p0 = 1, p1 = x;
      for (int k = 2; k <= n; ++k) {
        const double p2 = ((2 * k - 1) * x * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = n * (x * p1 - p0) / (x * x - 1);
      const double dx = p1 / dp;
      x -= dx;
      if (std::abs(dx) < 1e-16) break;
    }
    const double w = 2 / ((1 - x * x) * dp * dp);
    q.nodes[n - 1 - i] = x;
    q.nodes[i] = -x;
    q.weights[i] = q.weights[n - 1 - i] = w;
  }
  return q;
}

}  // namespace lobecast
