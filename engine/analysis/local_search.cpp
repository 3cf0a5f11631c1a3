// Bracketed root, interval minimum and simplex search (local_search.h).
#include "engine/analysis/local_search.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

#include "engine/check.h"

namespace lobecast {

double FindRoot(const std::function<double(double)>& f, double lo, double hi, double f_lo,
                double f_hi, double tolerance) {
  if (f_lo == 0.0) return lo;
  if (f_hi == 0.0) return hi;
  // The callers bracket a sign change before they ask for the root.
  LOBECAST_CHECK_SHOWING((f_lo > 0.0) != (f_hi > 0.0), f_lo, f_hi);
  constexpr double kEps = std::numeric_limits<double>::epsilon();
  // b: best estimate, a: previous b, c: the end of the bracket opposite to b.
  double a = lo, b = hi, fa = f_lo, fb = f_hi;
  double c = a, fc = fa, d = b - a, e = d;
  for (int iter = 0; iter < 300; ++iter) {
    if ((fb > 0.0) == (fc > 0.0)) {
      c = a;
      fc = fa;
      d = e = b - a;
    }
    if (std::abs(fc) < std::abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const double tol1 = 2.0 * kEps * std::abs(b) + 0.5 * tolerance;
    const double m = 0.5 * (c - b);
    if (std::abs(m) <= tol1 || fb == 0.0) return b;
    if (std::abs(e) >= tol1 && std::abs(fa) > std::abs(fb)) {
      const double s = fb / fa;
      double p, q;
      if (a == c) {  // secant
        p = 2.0 * m * s;
        q = 1.0 - s;
      } else {  // inverse quadratic interpolation
        const double qa = fa / fc, r = fb / fc;
        p = s * (2.0 * m * qa * (qa - r) - (b - a) * (r - 1.0));
        q = (qa - 1.0) * (r - 1.0) * (s - 1.0);
      }
      if (p > 0.0)
        q = -q;
      else
        p = -p;
      if (2.0 * p < std::min(3.0 * m * q - std::abs(tol1 * q), std::abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = e = m;
      }
    } else {
      d = e = m;
    }
    a = b;
    fa = fb;
    b += std::abs(d) > tol1 ? d : (m > 0.0 ? tol1 : -tol1);
    fb = f(b);
  }
  return b;
}

LineMinimum MinimizeOnInterval(const std::function<double(double)>& f, double lo, double hi,
                               double tolerance) {
  const double inv_phi = 0.5 * (std::sqrt(5.0) - 1.0);  // 1/golden ratio
  double a = lo, b = hi;
  double x1 = b - inv_phi * (b - a), x2 = a + inv_phi * (b - a);
  double f1 = f(x1), f2 = f(x2);
  for (int iter = 0; iter < 200 && b - a > tolerance; ++iter) {
    if (f1 <= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - inv_phi * (b - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + inv_phi * (b - a);
      f2 = f(x2);
    }
  }
  LineMinimum m = f1 <= f2 ? LineMinimum{x1, f1} : LineMinimum{x2, f2};
  // The end points are candidates too (a minimum at the edge of the interval).
  for (double x : {lo, hi}) {
    const double v = f(x);
    if (v < m.value) m = {x, v};
  }
  return m;
}

PlaneMinimum MinimizeOnPlane(const std::function<double(double, double)>& f, double a0, double b0,
                             const PlaneSearchOptions& options) {
  struct Vertex {
    double a, b, v;
  };
  int evaluations = 0;
  auto eval = [&](double a, double b) {
    ++evaluations;
    return Vertex{a, b, f(a, b)};
  };
  const double h = options.initial_step;
  std::array<Vertex, 3> s = {eval(a0, b0), eval(a0 + h, b0), eval(a0, b0 + h)};
  auto by_value = [](const Vertex& x, const Vertex& y) { return x.v < y.v; };
  bool converged = false;
  while (evaluations < options.max_evaluations) {
    std::sort(s.begin(), s.end(), by_value);
    const double size = std::max(std::hypot(s[1].a - s[0].a, s[1].b - s[0].b),
                                 std::hypot(s[2].a - s[0].a, s[2].b - s[0].b));
    if (size < options.tolerance) {
      converged = true;
      break;
    }
    // f >= 0 (a level) reached 0: nothing lies deeper, the search is over.
    if (options.stop_at_zero && s[0].v == 0.0) {
      converged = true;
      break;
    }
    const double ca = 0.5 * (s[0].a + s[1].a), cb = 0.5 * (s[0].b + s[1].b);  // centroid
    const Vertex r = eval(2.0 * ca - s[2].a, 2.0 * cb - s[2].b);
    if (r.v < s[0].v) {
      const Vertex e = eval(3.0 * ca - 2.0 * s[2].a, 3.0 * cb - 2.0 * s[2].b);
      s[2] = e.v < r.v ? e : r;
    } else if (r.v < s[1].v) {
      s[2] = r;
    } else {
      // Contract toward the better of the reflected and the worst vertex.
      const Vertex& far = r.v < s[2].v ? r : s[2];
      const Vertex c = eval(0.5 * (ca + far.a), 0.5 * (cb + far.b));
      if (c.v < far.v) {
        s[2] = c;
      } else {
        s[1] = eval(0.5 * (s[0].a + s[1].a), 0.5 * (s[0].b + s[1].b));
        s[2] = eval(0.5 * (s[0].a + s[2].a), 0.5 * (s[0].b + s[2].b));
      }
    }
  }
  std::sort(s.begin(), s.end(), by_value);
  return {s[0].a, s[0].b, s[0].v, evaluations, converged};
}

}  // namespace lobecast
