// The reference for the NUFFT and lattice tests: the exponential sum
// f_k = sum_j c_j exp(+i s_k . x_j), evaluated in long double, and the
// dot-product test of their adjoints.
#pragma once

#include <algorithm>
#include <cmath>
#include <complex>

#include <Eigen/Core>

namespace lobecast::testing {

// Max over targets k and columns a of |f(k, a) - exact| / sum_j |c(j, a)|.
inline double SumRelativeError(const Eigen::Matrix3Xd& x, const Eigen::Matrix3Xd& s,
                               const Eigen::MatrixXcd& c, const Eigen::MatrixXcd& f) {
  using LComplex = std::complex<long double>;
  double worst = 0;
  for (Eigen::Index a = 0; a < c.cols(); ++a) {
    const double l1 = c.col(a).cwiseAbs().sum();
    for (Eigen::Index k = 0; k < s.cols(); ++k) {
      LComplex sum = 0;
      for (Eigen::Index j = 0; j < x.cols(); ++j) {
        const long double p = static_cast<long double>(s(0, k)) * x(0, j) +
                              static_cast<long double>(s(1, k)) * x(1, j) +
                              static_cast<long double>(s(2, k)) * x(2, j);
        sum += LComplex(c(j, a).real(), c(j, a).imag()) * LComplex(cosl(p), sinl(p));
      }
      const LComplex d = LComplex(f(k, a).real(), f(k, a).imag()) - sum;
      worst = std::max(worst, static_cast<double>(std::abs(d)) / l1);
    }
  }
  return worst;
}

// The dot-product test of an adjoint: with f = A c and g = A^H v,
// |<f, v> - <c, g>| / (|f| |v|) (2-norms, all columns at once; <a, b> = a^H b).
// Zero up to rounding when g is the exact adjoint of the map that made f.
inline double AdjointMismatch(const Eigen::MatrixXcd& c, const Eigen::MatrixXcd& f,
                              const Eigen::MatrixXcd& v, const Eigen::MatrixXcd& g) {
  const std::complex<double> fv = (f.conjugate().cwiseProduct(v)).sum();
  const std::complex<double> cg = (c.conjugate().cwiseProduct(g)).sum();
  return std::abs(fv - cg) / (f.norm() * v.norm());
}

}  // namespace lobecast::testing
