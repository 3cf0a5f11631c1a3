// Small derivative-free searches that refine pattern features off the grid: a root
// of a bracketed scalar function, the minimum of a scalar function on an interval,
// and a local minimum of a function of two variables. Generic numerics only; the
// pattern-specific objectives live in beam.cpp, side_lobes.cpp and nulls.cpp.
#pragma once

#include <cstddef>
#include <functional>
#include <utility>
#include <vector>

namespace lobecast {

// A root of f in [lo, hi], given f_lo = f(lo) and f_hi = f(hi) of opposite signs (or
// one of them zero), by Brent's method: inverse quadratic or secant steps guarded by
// bisection (R. P. Brent, Algorithms for Minimization without Derivatives, 1973,
// ch. 4). The bracket always holds a sign change, so a discontinuity (the edge of the
// ground's no-field region) is found like a root. Stops once the bracket is narrower
// than about tolerance. Without a sign change it throws InternalError (the callers
// bracket one first, so that is a bug).
double FindRoot(const std::function<double(double)>& f, double lo, double hi, double f_lo,
                double f_hi, double tolerance);

struct LineMinimum {
  double x = 0.0;
  double value = 0.0;
};

// A minimum of f on [lo, hi] by golden-section search (J. Kiefer, "Sequential minimax
// search for a maximum", Proc. AMS 4, 1953): robust for any unimodal f, including
// quartic minima and minima at an endpoint. Stops once the bracket is narrower than
// tolerance. Only comparisons of f are used, so a zero at the minimum (an exact null)
// is located to far below tolerance when the values around it are well above rounding.
LineMinimum MinimizeOnInterval(const std::function<double(double)>& f, double lo, double hi,
                               double tolerance);

// A point of a batch: which interval (or search) and where.
struct BatchPoint {
  std::size_t search = 0;
  double x = 0.0;
};
// f's values at a batch of points, one per point, in order.
using BatchFunction = std::function<std::vector<double>(const std::vector<BatchPoint>&)>;

// MinimizeOnInterval on many intervals in lockstep (f(search, x) the search's function):
// each round evaluates the next point of every search still running as one batch, so a
// costly f (exact field sums) runs over many directions at once. Each search evaluates
// the same points and returns the same minimum as MinimizeOnInterval alone.
std::vector<LineMinimum> MinimizeOnIntervals(const BatchFunction& f,
                                             const std::vector<std::pair<double, double>>& brackets,
                                             double tolerance);

// A value known within bounds: lo <= the exact value <= hi.
struct BoundedValue {
  double lo = 0.0, value = 0.0, hi = 0.0;
};
using BoundedBatchFunction =
    std::function<std::vector<BoundedValue>(const std::vector<BatchPoint>&)>;

// MinimizeOnIntervals on values known within bounds (f; cheaper than the exact ones),
// with the exact values (exact) asked for only where two points' bounds overlap, so
// that the bounds do not settle which is lower: every comparison goes as it would on
// the exact values, and each search evaluates the same points and ends where
// MinimizeOnIntervals(exact) does. The minimum's value is exact where it was asked
// for, f's value otherwise.
std::vector<LineMinimum> MinimizeOnIntervals(const BoundedBatchFunction& f,
                                             const BatchFunction& exact,
                                             const std::vector<std::pair<double, double>>& brackets,
                                             double tolerance);

struct PlaneSearchOptions {
  // Size of the starting simplex; about the spacing of the grid the start came from,
  // so the first moves explore the cell around it.
  double initial_step = 1e-2;
  // Stop when every vertex is within this distance of the best one.
  double tolerance = 1e-9;
  // Hard stop, counted in evaluations of f.
  int max_evaluations = 2000;
  // For f >= 0: stop at the first vertex where f is exactly 0 (a null below the
  // numerical floor; on a null curve the simplex would otherwise wander along it to
  // max_evaluations).
  bool stop_at_zero = false;
};

struct PlaneMinimum {
  double a = 0.0;
  double b = 0.0;
  double value = 0.0;
  int evaluations = 0;
  bool converged = false;  // the simplex shrank below tolerance before max_evaluations
};

// A local minimum of f(a, b) near (a0, b0) by the Nelder-Mead simplex method with
// the usual coefficients (reflection 1, expansion 2, contraction 1/2, shrink 1/2;
// J. A. Nelder and R. Mead, "A simplex method for function minimization", Computer
// Journal 7, 1965). f may return +inf for points that are not allowed.
PlaneMinimum MinimizeOnPlane(const std::function<double(double, double)>& f, double a0, double b0,
                             const PlaneSearchOptions& options);

// A point of a plane search's batch: which search and where.
struct PlaneBatchPoint {
  std::size_t search = 0;
  double a = 0.0;
  double b = 0.0;
};
using PlaneBatchFunction = std::function<std::vector<double>(const std::vector<PlaneBatchPoint>&)>;

// MinimizeOnPlane from each start in lockstep (f(search, a, b) the search's function):
// each round evaluates the next point or points of every search still running as one
// batch. Each search evaluates the same points and returns the same minimum as
// MinimizeOnPlane alone.
std::vector<PlaneMinimum> MinimizeOnPlanes(const PlaneBatchFunction& f,
                                           const std::vector<std::pair<double, double>>& starts,
                                           const PlaneSearchOptions& options);

}  // namespace lobecast
