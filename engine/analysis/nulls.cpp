// Null loci of the total or co-polar field (nulls.h).
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
#include "engine/analysis/null_problem.h"
#include "engine/decibels.h"
#include "engine/ground.h"

namespace lobecast {
namespace {

using namespace null_detail;

struct RefinedZero {
  Vec3 r;
  double value;
};

}  // namespace

double NullFieldDirectivity(const PatternProbe& probe, const ProbeSample& s,
                            const AnalysisOptions& options) {
  if (options.null_field == NullField::kCoPolar)
    return probe.DirectivityOf(s.CoCrossFor(options.reference).co);
  return s.directivity;
}

NullSearch FindNulls(const PatternProbe& probe, const GridNeighbours& neighbours,
                     const PatternResult& grid_result, double peak_directivity,
                     const AnalysisOptions& options) {
  NullSearch out;
  out.spacing_rad = neighbours.spacing_rad();
  const double tol = options.refine_tolerance_deg * kDegree;  // reported directions
  if (neighbours.num_nodes() == 0) return out;
  const AngularGrid& grid = grid_result.grid;
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  const bool pec = probe.array().ground == Ground::kPec;
  // The null-field level relative to the peak, computed from the stored grid field
  // where it is needed (no per-direction copy).
  auto grid_level = [&](std::size_t it, std::size_t ip) {
    const std::size_t g = it * np + ip;
    ProbeSample s;
    s.phi_rad = grid.phi_deg[ip] * kDegree;
    s.e_theta = grid_result.field.e_theta[static_cast<Eigen::Index>(g)];
    s.e_phi = grid_result.field.e_phi[static_cast<Eigen::Index>(g)];
    s.floor_v = grid_result.field_floor_v;
    s.directivity = grid_result.directivity[static_cast<Eigen::Index>(g)];
    return NullFieldDirectivity(probe, s, options) / peak_directivity;
  };
  const double threshold = FromDb(options.null_threshold_db);
  const double screen = std::min(0.5, FromDb(options.null_threshold_db + kScreenMargin_db));
  const NullProblem problem{probe, options, peak_directivity,
                            std::sqrt(probe.DirectivityOf(1.0) / peak_directivity)};

  // Grid directions on a null: a minimum along their theta column or phi row.
  const bool dup_seam =
      np > 2 && std::abs(grid.phi_deg.back() - grid.phi_deg.front() - 360.0) < 1e-9;
  const std::size_t columns = dup_seam ? np - 1 : np;
  const bool periodic =
      dup_seam || (np > 2 && std::abs(grid.phi_deg.back() - grid.phi_deg.front() +
                                      (grid.phi_deg[1] - grid.phi_deg[0]) - 360.0) < 1e-9);
  auto pole = [&](std::size_t it) { return std::sin(grid.theta_deg[it] * kDegree) < 1e-12; };
  auto visible = [&](std::size_t it) {
    return !BelowGround(probe.array().ground, grid.theta_deg[it] * kDegree);
  };
  const std::vector<bool> on_null = neighbours.NodesWhere([&](std::size_t g) {
    const std::size_t it = g / np, ip = g % np;
    const double l = grid_level(it, ip);
    if (!(l < screen)) return false;
    if (pole(it)) {  // below every direction of the next row(s)
      bool any = false;
      for (std::size_t jt : {it - 1, it + 1}) {
        if (jt >= nt || !visible(jt)) continue;
        any = true;
        for (std::size_t jp = 0; jp < np; ++jp)
          if (!(l < grid_level(jt, jp))) return false;
      }
      return any;
    }
    const bool theta_min = it > 0 && it + 1 < nt && visible(it + 1) && visible(it - 1) &&
                           l < grid_level(it - 1, ip) && l < grid_level(it + 1, ip);
    if (theta_min) return true;
    if (columns < 3) return false;
    const std::size_t c = ip % columns;
    if (!periodic && (c == 0 || c + 1 == columns)) return false;
    const std::size_t left = (c + columns - 1) % columns, right = (c + 1) % columns;
    return l < grid_level(it, left) && l < grid_level(it, right);
  });
  std::vector<std::vector<std::size_t>> sets = neighbours.Components(on_null);
  auto node_level = [&](std::size_t node) {
    const std::size_t g = neighbours.representative(node);
    return grid_level(g / np, g % np);
  };
  std::vector<std::pair<double, std::size_t>> order;  // deepest node level, set
  for (std::size_t i = 0; i < sets.size(); ++i) {
    double best = kInf;
    for (std::size_t n : sets[i]) best = std::min(best, node_level(n));
    order.emplace_back(best, i);
  }
  std::sort(order.begin(), order.end());
  const std::size_t max_sets = 4 * options.max_nulls + 8;
  if (order.size() > max_sets) {
    order.resize(max_sets);
    out.truncated = true;
  }

  // Seeds spread along each set, refined onto the null. Each seed's search is kept:
  // the second pass below starts from the same grid directions with a larger bound on
  // the step, and a search that never met the smaller one ends where it did.
  const double spacing = neighbours.spacing_rad();
  struct Polished {
    Vec3 r;
    double v;
  };
  std::unordered_map<std::size_t, Polished> polished;  // by node, searches bound by nothing
  std::vector<RefinedZero> zeros;
  {
    // Every set's seeds, polished together (one batch per round of all the searches).
    std::vector<std::size_t> seed_nodes;
    for (const auto& [lvl, i] : order) {
      const std::vector<std::size_t>& set = sets[i];
      const std::size_t stride = std::max<std::size_t>(1, set.size() / kSeedsPerSet);
      for (std::size_t k = 0; k < set.size(); k += stride) seed_nodes.push_back(set[k]);
    }
    const std::vector<NullProblem::PolishTask> seeds =
        PolishFromNodes(problem, neighbours, seed_nodes, 2.0 * spacing);
    for (std::size_t j = 0; j < seeds.size(); ++j) {
      if (seeds[j].refused == 0.0) polished[seed_nodes[j]] = {seeds[j].r, seeds[j].v};
      if (IsZero(seeds[j].v)) zeros.push_back({seeds[j].r, seeds[j].v});
    }
  }

  // Cones through the refined zeros, verified all round.
  struct Cone {
    Vec3 axis;
    double cos_half;
    Vec3 point;
  };
  std::vector<Cone> cones;
  for (const Vec3& a : CandidateAxes(probe.array())) {
    std::vector<std::pair<double, std::size_t>> c;
    for (std::size_t i = 0; i < zeros.size(); ++i) c.emplace_back(a.dot(zeros[i].r), i);
    std::sort(c.begin(), c.end());
    const auto uv = PerpendicularPair(a);
    const std::size_t first_of_axis = cones.size();
    // A cone about a (cosine cos_half) already kept, about this axis or its opposite.
    auto known = [&](const Vec3& axis, double cos_half) {
      return std::any_of(cones.begin(), cones.end(), [&](const Cone& k) {
        return std::abs(std::abs(k.axis.dot(axis)) - 1.0) < 1e-12 &&
               std::abs(k.cos_half - k.axis.dot(axis) * cos_half) < kSameConeCos;
      });
    };
    struct Candidate {
      double cos_half;
      Vec3 point;
      std::vector<Vec3> first_checks, other_checks;
    };
    std::vector<Candidate> candidates;
    for (std::size_t b = 0; b < c.size();) {
      std::size_t e = b + 1;
      while (e < c.size() && c[e].first - c[e - 1].first < kSameConeCos) ++e;
      const std::size_t count = e - b;
      const double cos_half = c[b + count / 2].first;
      const Vec3 first = zeros[c[b].second].r;
      double spread = 0.0;
      for (std::size_t k = b; k < e; ++k)
        spread = std::max(spread, AngleBetween(first, zeros[c[k].second].r));
      b = e;
      const double alpha = std::acos(std::clamp(cos_half, -1.0, 1.0));
      if (count < 2 || spread < 0.5 * spacing || alpha < kPointCone_rad ||
          alpha > kPi - kPointCone_rad)
        continue;
      std::vector<Vec3> checks;
      for (int k = 0; k < kConeChecks; ++k) {
        const Vec3 r = OnCone(a, uv, alpha, 2 * kPi * (k + 0.5) / kConeChecks);
        if (!probe.NoFieldAt(r)) checks.push_back(r);
      }
      if (checks.size() < kConeChecks / 8) continue;  // hardly visible: not a cone to report
      // Every check must be a zero: a few spread round the circle first, the rest only
      // when those are (most candidates, zeros that merely share a cosine about an axis
      // by symmetry, fail at once).
      Candidate cand{cos_half, first, {}, {}};
      for (std::size_t k = 0; k < checks.size(); ++k)
        (k % kConeFirstCheckStride == 0 ? cand.first_checks : cand.other_checks)
            .push_back(checks[k]);
      if (!known(a, cos_half)) candidates.push_back(std::move(cand));
    }
    // The candidates' checks, the first of every candidate in one batch, then the rest
    // of those still zero in another; then accepted in order, each unless a cone kept
    // before it is the same (as when they were checked one by one: the same cones, at
    // most a few more checks).
    std::vector<double> worst(candidates.size(), 0.0);
    for (const bool first_round : {true, false}) {
      std::vector<Vec3> batch;
      std::vector<std::size_t> owner;
      for (std::size_t i = 0; i < candidates.size(); ++i) {
        if (!IsZero(worst[i])) continue;
        const Candidate& k = candidates[i];
        for (const Vec3& r : first_round ? k.first_checks : k.other_checks) {
          batch.push_back(r);
          owner.push_back(i);
        }
      }
      const std::vector<double> s = problem.ZeroScreenedLevels(batch);
      for (std::size_t j = 0; j < s.size(); ++j) worst[owner[j]] = std::max(worst[owner[j]], s[j]);
    }
    for (std::size_t i = 0; i < candidates.size(); ++i)
      if (IsZero(worst[i]) && !known(a, candidates[i].cos_half))
        cones.push_back({a, candidates[i].cos_half, candidates[i].point});
    // About each axis, the narrowest cone first.
    std::sort(cones.begin() + static_cast<std::ptrdiff_t>(first_of_axis), cones.end(),
              [](const Cone& x, const Cone& y) { return x.cos_half > y.cos_half; });
  }

  auto cone_distance = [](const Cone& k, const Vec3& r) {
    return std::abs(std::acos(std::clamp(k.axis.dot(r), -1.0, 1.0)) -
                    std::acos(std::clamp(k.cos_half, -1.0, 1.0)));
  };
  std::vector<std::pair<NullLocus, LocusShape>> found;
  for (const Cone& k : cones) {
    NullLocus l;
    l.cone = true;
    l.axis = AnglesDeg(k.axis);  // a vector the map rebuilds
    const double alpha = std::acos(std::clamp(k.cos_half, -1.0, 1.0));
    l.half_angle_deg = alpha / kDegree;
    l.direction = ToDirectionDeg(k.point, tol);
    const auto uv = PerpendicularPair(k.axis);
    std::vector<Vec3> circle;
    for (int i = 0; i < kExtentSamples; ++i) {
      const Vec3 r = OnCone(k.axis, uv, alpha, 2 * kPi * i / kExtentSamples);
      if (!(pec && r.z() < 0.0)) circle.push_back(r);
    }
    SetExtent(circle, &l);
    // Zero all round (kZeroRelative): a locus of zeros, whose depth is rounding.
    l.exact = true;
    l.directivity = 0.0;
    l.level_db = -kInf;
    LocusShape shape;
    shape.cone = true;
    shape.axis = k.axis;
    shape.half_angle_rad = alpha;
    found.emplace_back(l, shape);
  }

  // What no cone explains: grouped again, each refined to its deepest point.
  std::vector<bool> rest(neighbours.num_nodes(), false);
  for (const auto& [lvl, i] : order) {
    for (std::size_t n : sets[i]) {
      const Vec3 r = neighbours.direction(n);
      rest[n] = std::none_of(cones.begin(), cones.end(), [&](const Cone& k) {
        return cone_distance(k, r) < kExplainedSpacings * spacing;
      });
    }
  }
  std::vector<std::pair<NullLocus, LocusShape>> others;
  // The list keeps the cones, then the deepest of the rest; exact zeros (depth 0) tie
  // and keep the order they were found in. Once more exact zeros are found than the
  // list has room for after the cones, nothing found later can enter it (a later point
  // merged into an exact one leaves it as it is), and the list is known to be
  // truncated: the remaining sets are not refined.
  const std::size_t room = options.max_nulls - std::min(options.max_nulls, cones.size());
  for (const std::vector<std::size_t>& set : neighbours.Components(rest)) {
    const auto exact_others = static_cast<std::size_t>(
        std::count_if(others.begin(), others.end(), [](const auto& o) { return o.first.exact; }));
    if (cones.size() > options.max_nulls || exact_others > room) {
      out.truncated = true;
      break;
    }
    std::size_t best = set[0];
    double best_level = node_level(best);
    for (std::size_t n : set) {
      const double l = node_level(n);
      if (l < best_level) {
        best = n;
        best_level = l;
      }
    }
    const LocalChart chart(neighbours.direction(best));
    const PlaneMinimum m =
        MinimizeOnPlane([&](double a, double b) { return problem.Level(chart.At(a, b)); }, 0.0, 0.0,
                        {0.5 * spacing, options.refine_tolerance_deg * kDegree,
                         options.max_evaluations_per_search, true});
    Vec3 r = chart.At(m.a, m.b);
    double v = m.value;
    problem.Polish(&r, &v, 10.0 * spacing);
    if (!(v < threshold)) continue;
    if (std::any_of(cones.begin(), cones.end(),
                    [&](const Cone& k) { return cone_distance(k, r) < kOnCone_rad; }))
      continue;  // a stray of a cone's neighbourhood that refined onto it
    // What of the set is a null: its refined deepest point, seeds spread over it and
    // refined until they settle (a seed near a point null runs into it) that end below
    // the threshold, and the grid directions below it. A set screened at a higher level
    // may join separate nulls (a dipole's axis and an array-factor curve) through a
    // trough that is no null: the members are grouped again by proximity, one locus each.
    struct Member {
      Vec3 r;
      double v;
      bool refined;
    };
    std::vector<Member> below = {{r, v, true}};
    const std::size_t stride = std::max<std::size_t>(1, set.size() / kSeedsPerSet);
    std::vector<std::size_t> again;  // seeds whose first search refused a step
    for (std::size_t k = 0; k < set.size(); k += stride)
      if (!polished.count(set[k])) again.push_back(set[k]);
    const std::vector<NullProblem::PolishTask> repolished =
        PolishFromNodes(problem, neighbours, again, 10.0 * spacing);
    for (std::size_t k = 0, j = 0; k < set.size(); k += stride) {
      Vec3 q;
      double vq;
      if (const auto it = polished.find(set[k]); it != polished.end()) {
        q = it->second.r;
        vq = it->second.v;
      } else {
        q = repolished[j].r;
        vq = repolished[j].v;
        ++j;
      }
      const bool on_cone = std::any_of(cones.begin(), cones.end(), [&](const Cone& c) {
        return cone_distance(c, q) < kOnCone_rad;
      });
      if (vq < threshold && !on_cone) below.push_back({q, vq, true});
    }
    for (std::size_t n : set) {
      const double l = node_level(n);
      if (l < threshold) below.push_back({neighbours.direction(n), l, false});
    }
    std::vector<Vec3> below_r;
    for (const Member& m : below) below_r.push_back(m.r);
    int groups = 0;
    const std::vector<int> group = GroupByProximity(below_r, kLinkSpacings * spacing, &groups);
    std::vector<std::vector<std::size_t>> group_members(static_cast<std::size_t>(groups));
    for (std::size_t i = 0; i < below.size(); ++i)
      group_members[static_cast<std::size_t>(group[i])].push_back(i);
    for (int g = 0; g < groups; ++g) {
      std::size_t deepest = below.size();
      std::vector<Vec3> members;
      std::vector<Member> refined;
      for (const std::size_t i : group_members[static_cast<std::size_t>(g)]) {
        members.push_back(below[i].r);
        if (below[i].refined) refined.push_back(below[i]);
        if (deepest == below.size() || below[i].v < below[deepest].v) deepest = i;
      }
      Member d = below[deepest];
      // A seed searched on the lattice transform is polished on exact sums from where it
      // ended: its depth is reported.
      if (!d.refined || !probe.search_is_exact()) problem.Polish(&d.r, &d.v, 10.0 * spacing);
      if (!(d.v < threshold)) continue;
      if (std::any_of(cones.begin(), cones.end(),
                      [&](const Cone& k) { return cone_distance(k, d.r) < kOnCone_rad; }))
        continue;
      // A curve: refined nulls away from the deepest, zeros as it is when it is one
      // (grid directions below the threshold around a point null, or a search that
      // stalled in its shoulder, do not make it one).
      const bool zero = IsZero(d.v);
      double reach = 0.0;
      for (const Member& m : refined)
        if (!zero || IsZero(m.v)) reach = std::max(reach, AngleBetween(m.r, d.r));
      NullLocus l;
      l.direction = ToDirectionDeg(d.r, tol);
      l.point = reach <= kExplainedSpacings * spacing;
      // Refined point nulls closer than the grid spacing are the same null.
      const bool merged =
          l.point && std::any_of(others.begin(), others.end(), [&](auto& o) {
            if (!o.first.point || AngleBetween(o.second.points[0], d.r) > spacing) return false;
            if (d.v < o.first.directivity / peak_directivity) {
              o.first.direction = l.direction;
              o.second.points[0] = d.r;
              problem.SetDepth(d.v, &o.first.directivity, &o.first.level_db, &o.first.exact);
            }
            return true;
          });
      if (merged) continue;
      SetExtent(l.point ? std::vector<Vec3>{d.r} : members, &l);
      problem.SetDepth(d.v, &l.directivity, &l.level_db, &l.exact);
      LocusShape shape;
      shape.points = {d.r};
      shape.points.insert(shape.points.end(), members.begin(), members.end());
      others.emplace_back(l, std::move(shape));
    }
  }
  std::stable_sort(others.begin(), others.end(), [](const auto& a, const auto& b) {
    return a.first.directivity < b.first.directivity;
  });
  for (auto& o : others) found.push_back(std::move(o));
  if (found.size() > options.max_nulls) {
    found.resize(options.max_nulls);
    out.truncated = true;
  }
  for (auto& [l, s] : found) {
    out.loci.push_back(l);
    out.shapes.push_back(std::move(s));
  }
  return out;
}

std::vector<NullCrossing> FindNullCrossings(const PatternProbe& probe, const NullSearch& search,
                                            const Vec3& peak, const Vec3& tangent,
                                            bool orthogonal_plane, double peak_directivity,
                                            const AnalysisOptions& options) {
  const double tol = options.refine_tolerance_deg * kDegree;  // reported directions
  const NullProblem problem{probe, options, peak_directivity,
                            std::sqrt(probe.DirectivityOf(1.0) / peak_directivity)};
  const double threshold = FromDb(options.null_threshold_db);
  const double screen = std::min(0.5, FromDb(options.null_threshold_db + kScreenMargin_db));
  const double step =
      std::min(options.cut_step_deg * kDegree, search.spacing_rad > 0 ? search.spacing_rad : kInf);
  const int n = static_cast<int>(std::ceil(2 * kPi / step));
  const double h = 2 * kPi / n;
  std::vector<Vec3> dirs(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i)
    dirs[static_cast<std::size_t>(i)] = AlongGreatCircle(peak, tangent, -kPi + h * i);
  std::vector<double> level(dirs.size());
  {
    const std::vector<ProbeSample> s =
        probe.search_is_exact() ? probe.At(dirs) : probe.AtSearch(dirs);
    for (std::size_t i = 0; i < s.size(); ++i)
      level[i] =
          s[i].no_field ? kInf : NullFieldDirectivity(probe, s[i], options) / peak_directivity;
  }
  // Every minimum of the circle refined together: the golden-section searches, then the
  // Gauss-Newton polish, each round of all of them one batch.
  std::vector<std::pair<double, double>> brackets;
  const std::size_t m = level.size();
  for (std::size_t i = 0; i < m; ++i) {
    const double l = level[i], prev = level[(i + m - 1) % m], next = level[(i + 1) % m];
    if (!(l < screen && l < prev && l <= next)) continue;
    const double s0 = -kPi + h * static_cast<double>(i);
    brackets.emplace_back(s0 - h, s0 + h);
  }
  // The golden sections on the search values within their bounds, exact sums where the
  // bounds leave a comparison open (PatternProbe::AtSearch): the same steps as on exact
  // sums, so a zero in a band of floored exact zeros (a point null) is located where
  // the exact search's ties take it.
  auto circle = [&](const std::vector<BatchPoint>& points) {
    std::vector<Vec3> r;
    for (const BatchPoint& p : points) r.push_back(AlongGreatCircle(peak, tangent, p.x));
    return r;
  };
  const std::vector<LineMinimum> minima = MinimizeOnIntervals(
      [&](const std::vector<BatchPoint>& points) { return problem.BoundedLevels(circle(points)); },
      [&](const std::vector<BatchPoint>& points) { return problem.Levels(circle(points)); },
      brackets, options.refine_tolerance_deg * kDegree);
  std::vector<NullProblem::AlongTask> tasks;
  for (const LineMinimum& lm : minima) tasks.push_back({lm.x, lm.value, std::nullopt});
  if (!probe.search_is_exact()) {
    // Gauss-Newton from the exact level at each minimum (an exact zero stays where it
    // is), on the search values, then on exact sums from where those end: a round or two.
    problem.Exact<NullProblem::AlongTask>(&tasks, [&](const NullProblem::AlongTask& t) {
      return AlongGreatCircle(peak, tangent, t.s_rad);
    });
    problem.PolishAlongAll(peak, tangent, &tasks, true);
  }
  problem.PolishAlongAll(peak, tangent, &tasks);
  std::vector<NullCrossing> out;
  for (const NullProblem::AlongTask& t : tasks) {
    double s = t.s_rad;
    const double v = t.v;
    if (!(v < threshold)) continue;
    NullCrossing c;
    c.orthogonal_plane = orthogonal_plane;
    const Vec3 r = AlongGreatCircle(peak, tangent, s);
    c.offset_deg = std::remainder(s, 2 * kPi) / kDegree;
    if (c.offset_deg <= -180.0) c.offset_deg += 360.0;
    c.direction = ToDirectionDeg(r, tol);
    problem.SetDepth(v, &c.directivity, &c.level_db, &c.exact);
    double best = kInf;
    for (std::size_t k = 0; k < search.shapes.size(); ++k) {
      const LocusShape& sh = search.shapes[k];
      double d = kInf;
      if (sh.cone) {
        d = std::abs(std::acos(std::clamp(sh.axis.dot(r), -1.0, 1.0)) - sh.half_angle_rad);
        if (!(d < kOnCone_rad)) continue;
      } else {
        for (const Vec3& p : sh.points) d = std::min(d, AngleBetween(p, r));
        if (!(d < kExplainedSpacings * search.spacing_rad)) continue;
      }
      if (d < best) {
        best = d;
        c.locus = static_cast<double>(k);
      }
    }
    // On a verified cone the field is zero: what remains of v is rounding. The search
    // stops anywhere in the band where the field is floored to zero (wide at a double
    // zero such as the horizon over a ground), so the crossing is put on the cone
    // itself: along the cut a . r(s) = A cos s + B sin s = cos(half-angle).
    if (c.locus >= 0 && search.shapes[static_cast<std::size_t>(c.locus)].cone) {
      const LocusShape& sh = search.shapes[static_cast<std::size_t>(c.locus)];
      const double a = sh.axis.dot(peak), b = sh.axis.dot(tangent), rr = std::hypot(a, b);
      const double ca = std::cos(sh.half_angle_rad);
      if (rr > 0 && std::abs(ca) <= rr) {
        const double base = std::atan2(b, a), delta = std::acos(ca / rr);
        const auto gap = [&](double t) { return std::abs(std::remainder(t - s, 2 * kPi)); };
        const double on = gap(base + delta) <= gap(base - delta) ? base + delta : base - delta;
        if (gap(on) < kOnCone_rad) {
          s = on;
          const Vec3 r_on = AlongGreatCircle(peak, tangent, s);
          c.offset_deg = std::remainder(s, 2 * kPi) / kDegree;
          if (c.offset_deg <= -180.0) c.offset_deg += 360.0;
          c.direction = ToDirectionDeg(r_on, tol);
        }
      }
      c.exact = true;
      c.directivity = 0.0;
      c.level_db = -kInf;
    }
    out.push_back(c);
  }
  std::sort(out.begin(), out.end(), [](const NullCrossing& a, const NullCrossing& b) {
    return a.offset_deg < b.offset_deg;
  });
  return out;
}

}  // namespace lobecast
