// Gauss-Legendre quadrature on [-1, 1]: n nodes integrate polynomials of degree
// up to 2n - 1 exactly (Abramowitz and Stegun, 1964, 25.4.29). Nodes by Newton's
// iteration on P_n from the Chebyshev-like first guess cos(pi (i - 1/4) / (n + 1/2)).
#pragma once

#include <vector>

namespace lobecast {

struct QuadratureRule {
  std::vector<double> nodes;    // ascending, in (-1, 1)
  std::vector<double> weights;  // sum to 2
};

// n >= 1.
QuadratureRule GaussLegendre(int n);

}  // namespace lobecast
