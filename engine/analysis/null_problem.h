// The machinery the null searches share (nulls.cpp: FindNulls, FindNullCrossings):
// the tolerances of the fit, the null field as Gauss-Newton residuals, and
// NullProblem, the lockstep polish of many searches on one probe. Internal to
// engine/analysis.
#pragma once

#include "engine/analysis/nulls.h"

#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <optional>
#include <unordered_map>

#include <Eigen/Eigenvalues>
#include <Eigen/SVD>

#include "engine/analysis/beam.h"
#include "engine/analysis/local_search.h"
#include "engine/analysis/null_geometry.h"
#include "engine/decibels.h"
#include "engine/ground.h"

namespace lobecast::null_detail {

inline constexpr double kInf = std::numeric_limits<double>::infinity();
inline constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Grid minima up to this far above the threshold are refined too: a point null between
// grid points can sample well above its true depth (a dipole's axis 2.5 deg off the
// nearest grid point samples at -27 dB).
inline constexpr double kScreenMargin_db = 20.0;

// Central-difference step of the Gauss-Newton Jacobian, rad: the residual is linear in
// the offset near a simple null, so only rounding (~eps |E| / h) limits the Jacobian.
inline constexpr double kJacobianStep_rad = 1e-7;

// Seeds refined per connected set of grid null directions (spread along it).
inline constexpr std::size_t kSeedsPerSet = 24;

// A refined point is a zero, fit for a cone, below this fraction of the peak intensity
// (a field 1e-10 of the peak's: far below any designed null, ~-100 dB). A cone is kept
// when every check around it is too. This is a tolerance of the fit, not the numerical
// floor: the fitted circle is known only as well as the refined zeros it averages, so
// checks on it sit at or just above the floor (measured: the horizon cone of
// planar-4x4-ground fails a floor test and falls apart into points and curves).
inline constexpr double kZeroRelative = 1e-20;
inline bool IsZero(double level) { return level < kZeroRelative; }

// The depth of a null is exact (rounding, -inf) when its null field is below the
// numerical floor (engine/rounding_floor.h: the probe floors it to exact zeros, level 0).
inline bool BelowFloor(double level) { return level == 0.0; }
// Checks around a candidate cone (evenly in the angle about its axis).
inline constexpr int kConeChecks = 72;
// Of those, every this many are evaluated first (3 of 72).
inline constexpr std::size_t kConeFirstCheckStride = 24;
// Refined zeros whose cos(angle from the axis) agree this well are on one cone.
inline constexpr double kSameConeCos = 1e-7;
// A cone narrower than this (rad) is a point.
inline constexpr double kPointCone_rad = 1e-5;
// Grid directions within this many spacings of a kept cone are explained by it.
inline constexpr double kExplainedSpacings = 1.5;
// Samples of a cone's circle for its extent (pure geometry, no field evaluations).
inline constexpr int kExtentSamples = 7200;
// Null directions of one set closer than this many grid spacings are one locus.
inline constexpr double kLinkSpacings = 2.5;
// A crossing lies on a cone when its angle from the axis is this close (rad).
inline constexpr double kOnCone_rad = 1e-6;

// The null field as real residuals, scaled so that |residual|^2 = D_null / D_peak.
// Total field: the Cartesian rE (smooth across the poles); co-polar: the co component.
inline Eigen::VectorXd Residual(const ProbeSample& s, const AnalysisOptions& options,
                                double scale) {
  if (options.null_field == NullField::kCoPolar) {
    const Complex co = s.CoCrossFor(options.reference).co * scale;
    return Eigen::Vector2d(co.real(), co.imag());
  }
  const Eigen::Vector3cd e = s.FieldVector_v() * scale;
  Eigen::VectorXd r(6);
  r << e.real(), e.imag();
  return r;
}

// The `count` samples of one search in a lockstep round: its centre when kept from the
// round before, then its share of the round's batch from `first`; empty when any of
// them has no field (the ground's region), where the searches stop.
inline std::vector<ProbeSample> RoundSamples(const std::optional<ProbeSample>& kept,
                                             const std::vector<ProbeSample>& batch,
                                             std::size_t first, std::size_t count) {
  std::vector<ProbeSample> s;
  if (kept) s.push_back(*kept);
  const std::size_t end = first + count - s.size();
  s.insert(s.end(), batch.begin() + static_cast<std::ptrdiff_t>(first),
           batch.begin() + static_cast<std::ptrdiff_t>(end));
  if (std::any_of(s.begin(), s.end(), [](const ProbeSample& p) { return p.no_field; })) s.clear();
  return s;
}

// The searches of a lockstep polish that start: those not at a zero already.
template <class Task>
inline std::vector<std::size_t> Running(const std::vector<Task>& tasks) {
  std::vector<std::size_t> live;
  for (std::size_t i = 0; i < tasks.size(); ++i)
    if (tasks[i].v > 0.0) live.push_back(i);
  return live;
}

// What the searches share: the probe, the options, the level of a direction.
struct NullProblem {
  const PatternProbe& probe;
  const AnalysisOptions& options;
  double peak_directivity;
  double scale;  // field -> residual

  double LevelOf(const ProbeSample& s) const {
    return s.no_field ? kInf : NullFieldDirectivity(probe, s, options) / peak_directivity;
  }
  double Level(const Vec3& r) const { return LevelOf(probe.At(r)); }

  // One search of PolishAll: where it starts (r, its level v and, when evaluated
  // already, its sample at_r), the bound on a step, and what Polish returns.
  struct PolishTask {
    Vec3 r;
    double v = kInf;
    double max_step = 0.0;
    std::optional<ProbeSample> at_r;
    double refused = 0.0;  // the longest step refused for max_step, 0 when none
  };

  // Gauss-Newton on the field from r (level v): the least-squares (minimum-norm) step
  // toward a zero, which for a null curve lands on the curve. max_step bounds a step.
  // Returns the length of the longest step it refused for that bound, 0 when none: the
  // same search with a larger bound then ends exactly where this one did. `at_r`, when
  // given, is the sample at r already evaluated (v its level); each accepted step's
  // sample is the next iteration's centre, so no direction is evaluated twice.
  double Polish(Vec3* r, double* v, double max_step,
                std::optional<ProbeSample> at_r = std::nullopt) const {
    std::vector<PolishTask> task = {{*r, *v, max_step, std::move(at_r)}};
    PolishAll(&task);
    *r = task[0].r;
    *v = task[0].v;
    return task[0].refused;
  }

  // Polish for every task, in lockstep: each round's Jacobian samples of all the
  // searches still running go to the probe as one batch, then their candidate steps as
  // another. The sums are exact (PatternProbe::AtExact), so each search ends bit for
  // bit where it would alone, with the same evaluations; a batch of many searches runs
  // threaded and without the per-call overheads of a few directions. With `search`,
  // the rounds read PatternProbe::AtSearch (a direction's value is the same in any batch
  // there too) and each task's end point is evaluated exactly last (Exact).
  void PolishAll(std::vector<PolishTask>* tasks, bool search = false) const {
    const auto eval = [&](const std::vector<Vec3>& r) {
      return search ? probe.AtSearch(r) : probe.AtExact(r);
    };
    const double h = kJacobianStep_rad;
    std::vector<std::size_t> live = Running(*tasks);
    for (int iter = 0; iter < 8 && !live.empty(); ++iter) {
      std::vector<LocalChart> charts;
      std::vector<Vec3> dirs;
      std::vector<std::size_t> first;
      for (const std::size_t i : live) {
        const PolishTask& t = (*tasks)[i];
        charts.emplace_back(t.r);
        const LocalChart& lc = charts.back();
        first.push_back(dirs.size());
        if (!t.at_r) dirs.push_back(t.r);
        for (const Vec3& d : {lc.At(h, 0), lc.At(-h, 0), lc.At(0, h), lc.At(0, -h)})
          dirs.push_back(d);
      }
      const std::vector<ProbeSample> all = eval(dirs);
      std::vector<std::size_t> moving;
      std::vector<Vec3> cands;
      std::vector<double> norms;
      for (std::size_t k = 0; k < live.size(); ++k) {
        PolishTask& t = (*tasks)[live[k]];
        const std::vector<ProbeSample> s = RoundSamples(t.at_r, all, first[k], 5);
        if (s.empty()) continue;
        const Eigen::VectorXd r0 = Residual(s[0], options, scale);
        Eigen::MatrixXd jac(r0.size(), 2);
        jac.col(0) = (Residual(s[1], options, scale) - Residual(s[2], options, scale)) / (2 * h);
        jac.col(1) = (Residual(s[3], options, scale) - Residual(s[4], options, scale)) / (2 * h);
        Eigen::JacobiSVD<Eigen::MatrixXd> svd(jac, Eigen::ComputeThinU | Eigen::ComputeThinV);
        svd.setThreshold(1e-8);
        const Eigen::Vector2d step = -svd.solve(r0);
        if (step.norm() > t.max_step) {
          t.refused = step.norm();
          continue;
        }
        if (!(step.norm() > 0.0)) continue;
        moving.push_back(live[k]);
        cands.push_back(charts[k].At(step[0], step[1]));
        norms.push_back(step.norm());
      }
      const std::vector<ProbeSample> at_cands = eval(cands);
      live.clear();
      for (std::size_t m = 0; m < moving.size(); ++m) {
        PolishTask& t = (*tasks)[moving[m]];
        const double vc = LevelOf(at_cands[m]);
        if (!(vc < t.v)) continue;
        t.r = cands[m];
        t.v = vc;
        t.at_r = at_cands[m];
        if (norms[m] < 1e-15 || !(t.v > 0.0)) continue;
        live.push_back(moving[m]);
      }
    }
    if (search) Exact(tasks);
  }

  // The tasks' levels and samples at their points by exact sums, where the probe's
  // search values are not exact (what the searches report is exact).
  template <class Task>
  void Exact(std::vector<Task>* tasks, const std::function<Vec3(const Task&)>& where) const {
    if (probe.search_is_exact()) return;
    std::vector<Vec3> r;
    for (const Task& t : *tasks) r.push_back(where(t));
    const std::vector<ProbeSample> s = probe.AtExact(r);
    for (std::size_t i = 0; i < s.size(); ++i) {
      (*tasks)[i].v = LevelOf(s[i]);
      SetSample((*tasks)[i], s[i]);
    }
  }
  static void SetSample(PolishTask& t, const ProbeSample& s) { t.at_r = s; }
  void Exact(std::vector<PolishTask>* tasks) const {
    Exact<PolishTask>(tasks, [](const PolishTask& t) { return t.r; });
  }

  // Levels of many directions by the search values, with bounds on the exact levels
  // (the search error and the floors both are cut at; the same value three times when
  // the search values are exact).
  std::vector<BoundedValue> BoundedLevels(const std::vector<Vec3>& r) const {
    std::vector<BoundedValue> v;
    if (probe.search_is_exact()) {
      for (const double l : Levels(r)) v.push_back({l, l, l});
      return v;
    }
    const double b = probe.search_error_v() + 4.0 * probe.floor_v();
    const double per = probe.DirectivityOf(1.0) / peak_directivity;  // level per V^2
    for (const ProbeSample& s : probe.AtSearch(r)) {
      const double l = LevelOf(s);
      if (!std::isfinite(l)) {
        v.push_back({l, l, l});
        continue;
      }
      const double a = std::sqrt(l / per);
      v.push_back({per * std::pow(std::max(0.0, a - b), 2), l, per * std::pow(a + b, 2)});
    }
    return v;
  }

  // Levels of many directions whose zero (IsZero) is what counts, decided as exact sums
  // would decide it: the search values where their error bound settles it (plus the
  // floors both are cut at), exact sums for the rest.
  std::vector<double> ZeroScreenedLevels(const std::vector<Vec3>& r) const {
    if (probe.search_is_exact()) return Levels(r);
    std::vector<double> v;
    std::vector<std::size_t> unsure;
    std::vector<Vec3> again;
    for (const BoundedValue& l : BoundedLevels(r)) {
      if (IsZero(l.lo) != IsZero(l.hi)) {
        unsure.push_back(v.size());
        again.push_back(r[v.size()]);
      }
      v.push_back(l.value);
    }
    const std::vector<double> exact = Levels(again);
    for (std::size_t i = 0; i < unsure.size(); ++i) v[unsure[i]] = exact[i];
    return v;
  }

  // Levels of many directions, exact, in one batch.
  std::vector<double> Levels(const std::vector<Vec3>& r) const {
    std::vector<double> v;
    for (const ProbeSample& s : probe.AtExact(r)) v.push_back(LevelOf(s));
    return v;
  }

  // One search of PolishAlongAll: the offset s_rad along the circle and its level v.
  struct AlongTask {
    double s_rad = 0.0;
    double v = kInf;
    std::optional<ProbeSample> at_s;
  };

  // The same along a great circle (a 1-D Gauss-Newton on the offset s), for every task
  // in lockstep as PolishAll: exact sums, each task ending where it would alone.
  void PolishAlongAll(const Vec3& from, const Vec3& tangent, std::vector<AlongTask>* tasks,
                      bool search = false) const {
    const auto eval = [&](const std::vector<Vec3>& r) {
      return search ? probe.AtSearch(r) : probe.AtExact(r);
    };
    const double h = kJacobianStep_rad;
    std::vector<std::size_t> live = Running(*tasks);
    for (int iter = 0; iter < 8 && !live.empty(); ++iter) {
      std::vector<Vec3> dirs;
      std::vector<std::size_t> first;
      for (const std::size_t i : live) {
        const AlongTask& t = (*tasks)[i];
        first.push_back(dirs.size());
        if (!t.at_s) dirs.push_back(AlongGreatCircle(from, tangent, t.s_rad));
        dirs.push_back(AlongGreatCircle(from, tangent, t.s_rad + h));
        dirs.push_back(AlongGreatCircle(from, tangent, t.s_rad - h));
      }
      const std::vector<ProbeSample> all = eval(dirs);
      std::vector<std::size_t> moving;
      std::vector<double> steps;
      std::vector<Vec3> cands;
      for (std::size_t k = 0; k < live.size(); ++k) {
        const AlongTask& t = (*tasks)[live[k]];
        const std::vector<ProbeSample> s = RoundSamples(t.at_s, all, first[k], 3);
        if (s.empty()) continue;
        const Eigen::VectorXd r0 = Residual(s[0], options, scale);
        const Eigen::VectorXd j =
            (Residual(s[1], options, scale) - Residual(s[2], options, scale)) / (2 * h);
        if (!(j.squaredNorm() > 0.0)) continue;
        const double step = -j.dot(r0) / j.squaredNorm();
        if (!(std::abs(step) > 0.0) || std::abs(step) > 1e-3) continue;
        moving.push_back(live[k]);
        steps.push_back(step);
        cands.push_back(AlongGreatCircle(from, tangent, t.s_rad + step));
      }
      const std::vector<ProbeSample> at_cands = eval(cands);
      live.clear();
      for (std::size_t m = 0; m < moving.size(); ++m) {
        AlongTask& t = (*tasks)[moving[m]];
        const double vc = LevelOf(at_cands[m]);
        if (!(vc < t.v)) continue;
        t.s_rad += steps[m];
        t.v = vc;
        t.at_s = at_cands[m];
        if (t.v > 0.0) live.push_back(moving[m]);
      }
    }
    if (search)
      Exact<AlongTask>(
          tasks, [&](const AlongTask& t) { return AlongGreatCircle(from, tangent, t.s_rad); });
  }
  static void SetSample(AlongTask& t, const ProbeSample& s) { t.at_s = s; }

  // Depth fields of a null of relative level v: exact zeros carry no depth.
  void SetDepth(double v, double* directivity, double* level_db, bool* exact) const {
    *exact = BelowFloor(v);
    *directivity = *exact ? 0.0 : v * peak_directivity;
    *level_db = *exact ? -kInf : ToDb(v);
  }
};

// Polish from grid nodes (NullProblem::PolishAll): their samples in one batch, then
// the searches in lockstep.
inline std::vector<NullProblem::PolishTask> PolishFromNodes(const NullProblem& problem,
                                                            const GridNeighbours& neighbours,
                                                            const std::vector<std::size_t>& nodes,
                                                            double max_step) {
  std::vector<Vec3> dirs;
  for (const std::size_t n : nodes) dirs.push_back(neighbours.direction(n));
  const std::vector<ProbeSample> at = problem.probe.AtSearch(dirs);
  std::vector<NullProblem::PolishTask> tasks;
  for (std::size_t j = 0; j < nodes.size(); ++j)
    tasks.push_back({dirs[j], problem.LevelOf(at[j]), max_step, at[j]});
  problem.PolishAll(&tasks, true);
  return tasks;
}

}  // namespace lobecast::null_detail
