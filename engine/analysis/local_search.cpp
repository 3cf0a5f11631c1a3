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
  // Exact values: lo = value = hi, so no comparison ever asks for more.
  const BoundedBatchFunction exactly = [&](const std::vector<BatchPoint>& points) {
    std::vector<BoundedValue> b;
    for (const double v : f(points)) b.push_back({v, v, v});
    return b;
  };
  return MinimizeOnIntervals(exactly, f, brackets, tolerance);
}

std::vector<LineMinimum> MinimizeOnIntervals(const BoundedBatchFunction& f,
                                             const BatchFunction& exact,
                                             const std::vector<std::pair<double, double>>& brackets,
                                             double tolerance) {
  const double inv_phi = 0.5 * (std::sqrt(5.0) - 1.0);  // 1/golden ratio
  // A point's value: bounded, made exact (lo = value = hi) once asked for.
  struct Point {
    double x = 0.0;
    BoundedValue v;
  };
  struct Search {
    double a, b;
    Point p1, p2;
  };
  // Which of two values is lower or equal (a <= b), for many pairs at once: the bounds
  // where they settle it, the exact values of both points otherwise (one batch).
  auto at_most = [&](const std::vector<std::size_t>& search, std::vector<Point*> a,
                     std::vector<Point*> b) {
    std::vector<BatchPoint> ask;
    std::vector<Point*> asked;
    for (std::size_t k = 0; k < a.size(); ++k) {
      if (a[k]->v.hi <= b[k]->v.lo || a[k]->v.lo > b[k]->v.hi) continue;
      for (Point* p : {a[k], b[k]}) {
        if (p->v.lo == p->v.hi) continue;  // exact already
        ask.push_back({search[k], p->x});
        asked.push_back(p);
      }
    }
    if (!ask.empty()) {
      const std::vector<double> e = exact(ask);
      for (std::size_t k = 0; k < asked.size(); ++k) asked[k]->v = {e[k], e[k], e[k]};
    }
    std::vector<bool> out;
    for (std::size_t k = 0; k < a.size(); ++k) {
      const BoundedValue &va = a[k]->v, &vb = b[k]->v;
      out.push_back(va.hi <= vb.lo ? true : va.lo > vb.hi ? false : va.value <= vb.value);
    }
    return out;
  };
  const std::size_t n = brackets.size();
  std::vector<Search> s;
  std::vector<BatchPoint> points;
  for (std::size_t i = 0; i < n; ++i) {
    const auto [a, b] = brackets[i];
    s.push_back({a, b, {b - inv_phi * (b - a), {}}, {a + inv_phi * (b - a), {}}});
    points.push_back({i, s.back().p1.x});
    points.push_back({i, s.back().p2.x});
  }
  std::vector<BoundedValue> v = f(points);
  for (std::size_t i = 0; i < n; ++i) {
    s[i].p1.v = v[2 * i];
    s[i].p2.v = v[2 * i + 1];
  }
  // Every search narrows its bracket by the same factor per round, but their widths
  // may differ: each stops on its own test.
  for (int iter = 0; iter < 200; ++iter) {
    std::vector<std::size_t> running;
    std::vector<Point*> p1, p2;
    for (std::size_t i = 0; i < n; ++i) {
      if (!(s[i].b - s[i].a > tolerance)) continue;
      running.push_back(i);
      p1.push_back(&s[i].p1);
      p2.push_back(&s[i].p2);
    }
    if (running.empty()) break;
    const std::vector<bool> lower = at_most(running, p1, p2);  // the bracket keeps its lower part
    points.clear();
    for (std::size_t k = 0; k < running.size(); ++k) {
      Search& q = s[running[k]];
      if (lower[k]) {
        q.b = q.p2.x;
        q.p2 = q.p1;
        q.p1 = {q.b - inv_phi * (q.b - q.a), {}};
        points.push_back({running[k], q.p1.x});
      } else {
        q.a = q.p1.x;
        q.p1 = q.p2;
        q.p2 = {q.a + inv_phi * (q.b - q.a), {}};
        points.push_back({running[k], q.p2.x});
      }
    }
    v = f(points);
    for (std::size_t k = 0; k < points.size(); ++k)
      (lower[k] ? s[points[k].search].p1 : s[points[k].search].p2).v = v[k];
  }
  std::vector<Point> best(n), ends;
  {
    std::vector<std::size_t> all(n);
    std::vector<Point*> p1, p2;
    for (std::size_t i = 0; i < n; ++i) {
      all[i] = i;
      p1.push_back(&s[i].p1);
      p2.push_back(&s[i].p2);
    }
    const std::vector<bool> first = at_most(all, p1, p2);
    for (std::size_t i = 0; i < n; ++i) best[i] = first[i] ? s[i].p1 : s[i].p2;
  }
  // The end points are candidates too (a minimum at the edge of the interval).
  points.clear();
  for (std::size_t i = 0; i < n; ++i) {
    points.push_back({i, brackets[i].first});
    points.push_back({i, brackets[i].second});
  }
  v = f(points);
  for (std::size_t k = 0; k < points.size(); ++k) ends.push_back({points[k].x, v[k]});
  for (const std::size_t end : {0, 1}) {
    std::vector<std::size_t> all(n);
    std::vector<Point*> e, b;
    for (std::size_t i = 0; i < n; ++i) {
      all[i] = i;
      e.push_back(&ends[2 * i + end]);
      b.push_back(&best[i]);
    }
    // The end replaces the best when it is strictly lower: not (best <= end).
    const std::vector<bool> keep = at_most(all, b, e);
    for (std::size_t i = 0; i < n; ++i)
      if (!keep[i]) best[i] = ends[2 * i + end];
  }
  std::vector<LineMinimum> out;
  for (const Point& p : best) out.push_back({p.x, p.v.value});
  return out;
}

PlaneMinimum MinimizeOnPlane(const std::function<double(double, double)>& f, double a0, double b0,
                             const PlaneSearchOptions& options) {
  const PlaneBatchFunction one = [&](const std::vector<PlaneBatchPoint>& points) {
    std::vector<double> v;
    for (const PlaneBatchPoint& p : points) v.push_back(f(p.a, p.b));
    return v;
  };
  return MinimizeOnPlanes(one, {{a0, b0}}, options)[0];
}

std::vector<PlaneMinimum> MinimizeOnPlanes(const PlaneBatchFunction& f,
                                           const std::vector<std::pair<double, double>>& starts,
                                           const PlaneSearchOptions& options) {
  struct Vertex {
    double a, b, v;
  };
  // Where a search stands between batches: the simplex, and the points it waits for.
  enum class Wait { kStart, kReflected, kExpanded, kContracted, kShrunk, kDone };
  struct Search {
    std::array<Vertex, 3> s{};
    int evaluations = 0;
    bool converged = false;
    Wait wait = Wait::kStart;
    double ca = 0, cb = 0;  // centroid of the best two
    Vertex r{}, far{};      // the reflected point; the vertex a contraction moves toward
    std::vector<Vertex> asked;
  };
  auto by_value = [](const Vertex& x, const Vertex& y) { return x.v < y.v; };
  const double h = options.initial_step;
  std::vector<Search> q(starts.size());
  for (std::size_t i = 0; i < q.size(); ++i) {
    const auto [a0, b0] = starts[i];
    q[i].asked = {{a0, b0, 0}, {a0 + h, b0, 0}, {a0, b0 + h, 0}};
  }
  // The top of MinimizeOnPlane's loop: the next reflection, or the end.
  auto next = [&](Search& x) {
    if (x.evaluations >= options.max_evaluations) {
      x.wait = Wait::kDone;
      return;
    }
    std::sort(x.s.begin(), x.s.end(), by_value);
    const double size = std::max(std::hypot(x.s[1].a - x.s[0].a, x.s[1].b - x.s[0].b),
                                 std::hypot(x.s[2].a - x.s[0].a, x.s[2].b - x.s[0].b));
    // Converged, or f >= 0 (a level) reached 0: nothing lies deeper, the search is over.
    if (size < options.tolerance || (options.stop_at_zero && x.s[0].v == 0.0)) {
      x.converged = true;
      x.wait = Wait::kDone;
      return;
    }
    x.ca = 0.5 * (x.s[0].a + x.s[1].a);
    x.cb = 0.5 * (x.s[0].b + x.s[1].b);
    x.asked = {{2.0 * x.ca - x.s[2].a, 2.0 * x.cb - x.s[2].b, 0}};
    x.wait = Wait::kReflected;
  };
  while (true) {
    std::vector<PlaneBatchPoint> points;
    for (std::size_t i = 0; i < q.size(); ++i)
      for (const Vertex& p : q[i].asked) points.push_back({i, p.a, p.b});
    if (points.empty()) break;
    const std::vector<double> v = f(points);
    std::size_t k = 0;
    for (Search& x : q) {
      for (Vertex& p : x.asked) p.v = v[k++];
      x.evaluations += static_cast<int>(x.asked.size());
      const std::vector<Vertex> got = std::move(x.asked);
      x.asked.clear();
      switch (x.wait) {
        case Wait::kStart:
          x.s = {got[0], got[1], got[2]};
          next(x);
          break;
        case Wait::kReflected:
          x.r = got[0];
          if (x.r.v < x.s[0].v) {
            x.asked = {{3.0 * x.ca - 2.0 * x.s[2].a, 3.0 * x.cb - 2.0 * x.s[2].b, 0}};
            x.wait = Wait::kExpanded;
          } else if (x.r.v < x.s[1].v) {
            x.s[2] = x.r;
            next(x);
          } else {
            // Contract toward the better of the reflected and the worst vertex.
            x.far = x.r.v < x.s[2].v ? x.r : x.s[2];
            x.asked = {{0.5 * (x.ca + x.far.a), 0.5 * (x.cb + x.far.b), 0}};
            x.wait = Wait::kContracted;
          }
          break;
        case Wait::kExpanded:
          x.s[2] = got[0].v < x.r.v ? got[0] : x.r;
          next(x);
          break;
        case Wait::kContracted:
          if (got[0].v < x.far.v) {
            x.s[2] = got[0];
            next(x);
          } else {
            x.asked = {{0.5 * (x.s[0].a + x.s[1].a), 0.5 * (x.s[0].b + x.s[1].b), 0},
                       {0.5 * (x.s[0].a + x.s[2].a), 0.5 * (x.s[0].b + x.s[2].b), 0}};
            x.wait = Wait::kShrunk;
          }
          break;
        case Wait::kShrunk:
          x.s[1] = got[0];
          x.s[2] = got[1];
          next(x);
          break;
        case Wait::kDone:
          break;
      }
    }
  }
  std::vector<PlaneMinimum> out;
  for (Search& x : q) {
    std::sort(x.s.begin(), x.s.end(), by_value);
    out.push_back({x.s[0].a, x.s[0].b, x.s[0].v, x.evaluations, x.converged});
  }
  return out;
}

}  // namespace lobecast
