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
  const BatchFunction one = [&](const std::vector<BatchPoint>& points) {
    std::vector<double> v;
    for (const BatchPoint& p : points) v.push_back(f(p.x));
    return v;
  };
  return MinimizeOnIntervals(one, {{lo, hi}}, tolerance)[0];
}

std::vector<LineMinimum> MinimizeOnIntervals(const BatchFunction& f,
                                             const std::vector<std::pair<double, double>>& brackets,
                                             double tolerance) {
  const double inv_phi = 0.5 * (std::sqrt(5.0) - 1.0);  // 1/golden ratio
  struct Search {
    double a, b, x1, x2, f1 = 0, f2 = 0;
  };
  const std::size_t n = brackets.size();
  std::vector<Search> s;
  std::vector<BatchPoint> points;
  for (std::size_t i = 0; i < n; ++i) {
    const auto [a, b] = brackets[i];
    s.push_back({a, b, b - inv_phi * (b - a), a + inv_phi * (b - a)});
    points.push_back({i, s.back().x1});
    points.push_back({i, s.back().x2});
  }
  std::vector<double> v = f(points);
  for (std::size_t i = 0; i < n; ++i) {
    s[i].f1 = v[2 * i];
    s[i].f2 = v[2 * i + 1];
  }
  // Every search narrows its bracket by the same factor per round, but their widths
  // may differ: each stops on its own test.
  for (int iter = 0; iter < 200; ++iter) {
    points.clear();
    std::vector<bool> lower;  // the new point replaces x1 (the bracket kept its lower part)
    for (std::size_t i = 0; i < n; ++i) {
      Search& q = s[i];
      if (!(q.b - q.a > tolerance)) continue;
      if (q.f1 <= q.f2) {
        q.b = q.x2;
        q.x2 = q.x1;
        q.f2 = q.f1;
        q.x1 = q.b - inv_phi * (q.b - q.a);
        points.push_back({i, q.x1});
        lower.push_back(true);
      } else {
        q.a = q.x1;
        q.x1 = q.x2;
        q.f1 = q.f2;
        q.x2 = q.a + inv_phi * (q.b - q.a);
        points.push_back({i, q.x2});
        lower.push_back(false);
      }
    }
    if (points.empty()) break;
    v = f(points);
    for (std::size_t k = 0; k < points.size(); ++k)
      (lower[k] ? s[points[k].search].f1 : s[points[k].search].f2) = v[k];
  }
  std::vector<LineMinimum> out;
  points.clear();
  for (std::size_t i = 0; i < n; ++i) {
    const Search& q = s[i];
    out.push_back(q.f1 <= q.f2 ? LineMinimum{q.x1, q.f1} : LineMinimum{q.x2, q.f2});
    // The end points are candidates too (a minimum at the edge of the interval).
    points.push_back({i, brackets[i].first});
    points.push_back({i, brackets[i].second});
  }
  v = f(points);
  for (std::size_t k = 0; k < points.size(); ++k)
    if (v[k] < out[points[k].search].value) out[points[k].search] = {points[k].x, v[k]};
  return out;
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
