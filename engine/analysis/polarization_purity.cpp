// Co/cross-polarization, XPD and axial-ratio coverage (polarization_purity.h).
#include "engine/analysis/polarization_purity.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <Eigen/Geometry>

#include "engine/analysis/beam.h"
#include "engine/decibels.h"

namespace lobecast {
namespace {

// A step to a direction whose directivity exceeds the one it comes from by more than
// rounding goes uphill, into another lobe (the main beam's walks stop there).
constexpr double kUphill = 1 + 1e-9;

// The axial-ratio edges are located to this bracket in theta, rad: their share of the
// solid angle is then known to ~1e-12 sr each, far below the 6 digits printed.
constexpr double kEdgeTolerance_rad = 1e-12;

// XPD in dB of a co/cross pair (floored by CoCrossOf): +inf for a co-polar field whose
// cross part is below the floor, -inf for the opposite, NaN for no field.
double XpdDb(const CoCross& c) { return PowerRatioDb(std::norm(c.co), std::norm(c.cross)); }

bool WithinAxialRatio(const ProbeSample& s, const AnalysisOptions& options) {
  if (s.no_field) return false;
  const Polarization p = PolarizationOf(s.e_theta, s.e_phi, s.floor_v);
  if (!(p.axial_ratio_db <= options.axial_ratio_limit_db)) return false;  // NaN: no field
  if (options.reference == PolarizationReference::kRightCircular) return p.sense == 1;
  if (options.reference == PolarizationReference::kLeftCircular) return p.sense == -1;
  return true;
}

// True when every source, images included, lies along one axis: rE is then a complex
// scalar times the real vector r x (r x u) in every direction, linear (AR = +inf)
// wherever it is not zero, so no direction is within any finite axial-ratio limit.
// A PEC image of a dipole along u runs along (-ux, -uy, uz): on the same axis only
// for vertical and horizontal u.
bool LinearEverywhere(const Array& array) {
  if (array.dipoles.empty()) return false;
  const Vec3& u = array.dipoles.front().orientation;
  if (array.ground == Ground::kPec && u.z() != 0.0 && (u.x() != 0.0 || u.y() != 0.0)) return false;
  return std::all_of(array.dipoles.begin(), array.dipoles.end(),
                     [&](const Dipole& d) { return d.orientation == u || d.orientation == -u; });
}

}  // namespace

PolarizationPurity AnalyzePolarization(const PatternProbe& probe, const GridNeighbours& neighbours,
                                       const PatternResult& grid_result, const Vec3& peak,
                                       const DirectionDeg& peak_deg, const Vec3& first_tangent,
                                       double peak_directivity, const AnalysisOptions& options) {
  PolarizationPurity out;
  out.reference = options.reference;
  out.axial_ratio_limit_db = options.axial_ratio_limit_db;
  const ProbeSample at_peak = probe.At(peak);
  const CoCross cc = at_peak.CoCrossFor(options.reference);
  out.co_polar_dbi_at_peak = ToDb(probe.DirectivityOf(cc.co));
  out.cross_polar_dbi_at_peak = ToDb(probe.DirectivityOf(cc.cross));
  out.xpd_at_peak_db = XpdDb(cc);
  const Polarization pol = PolarizationOf(at_peak.e_theta, at_peak.e_phi, at_peak.floor_v);
  out.axial_ratio_at_peak_db = pol.axial_ratio_db;
  out.tilt_at_peak_deg = pol.tilt_deg;
  out.sense_at_peak = pol.sense;

  // The worst direction as reported: the peak's and the grid's exact angles, a ray
  // sample's from its vector.
  const double tol = options.refine_tolerance_deg * kDegree;
  double worst = out.xpd_at_peak_db;
  DirectionDeg worst_deg = peak_deg;
  auto consider = [&](double xpd, auto&& direction) {
    if (xpd < worst) {
      worst = xpd;
      worst_deg = direction();
    }
  };

  const double half = 0.5 * peak_directivity * (1 - 1e-9);
  auto ray_step = [&](const Vec3& t) {
    return 4.0 * CutStepRad(probe, peak, t, peak_directivity, options);
  };

  const Vec3 e1 = first_tangent;
  const Vec3 e2 = peak.cross(first_tangent).normalized();

  // (a) grid directions of the main beam: a breadth-first walk from the grid maximum
  // over neighbouring grid directions at or above half power, stepping from one to the
  // next only downhill (not above the one it comes from: the main lobe, not another
  // lobe that a saddle at half power joins to it, as the turnstile's horizon joins its
  // two hemispheres) and when the great-circle segment between them stays at or above
  // half power too (sampled at `step`), so lobes the grid alone would join across a dip
  // between its nodes stay apart. Edges are checked a frontier at a time, in bounded
  // batches.
  if (neighbours.num_nodes() > 0) {
    const std::size_t np = grid_result.grid.phi_deg.size();
    const auto& d = grid_result.directivity;
    const std::size_t top =
        neighbours.MaxNode([&](std::size_t g) { return d[static_cast<Eigen::Index>(g)]; });
    const std::vector<bool> member = neighbours.NodesWhere(
        [&](std::size_t g) { return d[static_cast<Eigen::Index>(g)] >= 0.5 * peak_directivity; });
    const double step = std::min(ray_step(e1), ray_step(e2));
    auto visit = [&](std::size_t n) {
      const std::size_t g = neighbours.representative(n);
      const CoCross c = CoCrossOf(grid_result.field.e_theta[static_cast<Eigen::Index>(g)],
                                  grid_result.field.e_phi[static_cast<Eigen::Index>(g)],
                                  grid_result.grid.phi_deg[g % np] * kDegree, options.reference,
                                  grid_result.field_floor_v);
      consider(XpdDb(c), [&] { return neighbours.direction_deg(n); });
    };
    std::vector<bool> reached(neighbours.num_nodes(), false);
    std::vector<std::size_t> frontier, next;
    if (member[top]) {
      reached[top] = true;
      frontier.push_back(top);
      visit(top);
    }
    struct Edge {
      std::size_t to, first, count;  // target node, its samples in `pts`
    };
    std::vector<Edge> edges;
    std::vector<Vec3> pts;
    auto check = [&] {
      const std::vector<ProbeSample> s = probe.At(pts);
      for (const Edge& e : edges) {
        if (reached[e.to]) continue;
        bool inside = true;
        for (std::size_t i = e.first; i < e.first + e.count && inside; ++i)
          inside = !s[i].no_field && s[i].directivity >= half;
        if (!inside) continue;
        reached[e.to] = true;
        next.push_back(e.to);
        visit(e.to);
      }
      edges.clear();
      pts.clear();
    };
    while (!frontier.empty()) {
      for (const std::size_t n : frontier) {
        const Vec3 a = neighbours.direction(n);
        const double dn = d[static_cast<Eigen::Index>(neighbours.representative(n))];
        for (const std::size_t m : neighbours.neighbours(n)) {
          if (!member[m] || reached[m]) continue;
          if (d[static_cast<Eigen::Index>(neighbours.representative(m))] > dn * kUphill) continue;
          const Vec3 b = neighbours.direction(m);
          const double len = AngleBetween(a, b);
          Edge e{m, pts.size(), 0};
          if (len > 0.0 && len < kPi - 1e-9) {
            const Vec3 t = (b - b.dot(a) * a).normalized();
            const int k = static_cast<int>(std::ceil(len / step));
            for (int i = 1; i < k; ++i) pts.push_back(AlongGreatCircle(a, t, len * i / k));
          }
          e.count = pts.size() - e.first;
          edges.push_back(e);
          // Small batches: the analysis must not grow with the grid (grid_neighbours_test).
          if (pts.size() >= 4096 || edges.size() >= 4096) check();
        }
      }
      check();
      frontier.swap(next);
      next.clear();
    }
  }

  // (b) rays from the peak out to the half-power contour.
  std::vector<Vec3> pts;
  for (int k = 0; k < options.beam_rays; ++k) {
    const double psi = 2.0 * kPi * k / options.beam_rays;
    const Vec3 t = std::cos(psi) * e1 + std::sin(psi) * e2;
    const BeamRay ray = WalkBeamRay(probe, peak, t, peak_directivity, ray_step(t), tol, false);
    // Stop short of a ground edge by the search tolerance, so the samples stay above it.
    const double edge = ray.clipped_by_ground ? ray.half_power_rad - 4 * tol : ray.half_power_rad;
    for (int i = 1; i <= options.beam_ray_samples; ++i)
      pts.push_back(AlongGreatCircle(peak, t, edge * i / options.beam_ray_samples));
  }
  // Along each ray only up to where it turns uphill: beyond a minimum is another lobe
  // (a ray that never falls to half power runs on to the antipode).
  const std::vector<ProbeSample> s = probe.At(pts);
  const std::size_t per_ray = static_cast<std::size_t>(options.beam_ray_samples);
  for (std::size_t i = 0; i < s.size(); ++i) {
    const std::size_t along = i % per_ray;
    if (along > 0 && !s[i - 1].no_field && !s[i].no_field &&
        s[i].directivity > s[i - 1].directivity * kUphill) {
      i += per_ray - 1 - along;  // the rest of this ray
      continue;
    }
    if (s[i].no_field || s[i].directivity < 0.5 * peak_directivity * (1 - 1e-9)) continue;
    consider(XpdDb(s[i].CoCrossFor(options.reference)),
             [&] { return ToDirectionDeg(pts[i], tol); });
  }
  out.worst_xpd_in_beam_db = worst;
  out.worst_xpd_direction = worst_deg;
  out.axial_ratio_solid_angle_sr = AxialRatioSolidAngle(probe, options);
  return out;
}

double AxialRatioSolidAngle(const PatternProbe& probe, const AnalysisOptions& options) {
  if (LinearEverywhere(probe.array())) return 0.0;  // no sampling needed
  const int nphi = options.axial_ratio_phi_planes;
  const double theta_max = probe.array().ground == Ground::kPec ? 0.5 * kPi : kPi;
  const int nt = std::max(
      2, static_cast<int>(std::ceil(theta_max / (options.axial_ratio_theta_step_deg * kDegree))));
  const double dt = theta_max / nt;
  std::vector<Vec3> pts;
  pts.reserve(static_cast<std::size_t>(nphi) * static_cast<std::size_t>(nt + 1));
  for (int k = 0; k < nphi; ++k)
    for (int i = 0; i <= nt; ++i) pts.push_back(UnitVectorAt(i * dt, 2.0 * kPi * k / nphi));
  const std::vector<ProbeSample> s = probe.At(pts);
  std::vector<bool> in(s.size());
  for (std::size_t i = 0; i < s.size(); ++i) in[i] = WithinAxialRatio(s[i], options);

  // Each edge's bracket [lo, hi] holds a change of the in/out predicate; it shrinks by
  // false position (the Illinois variant: G. Dahlquist and A. Bjorck, Numerical
  // Methods, 1974, sec. 6.2.3) on the smooth margin q - q_limit of the edge's
  // endpoints, with q = ||E_R| - |E_L|| / (|E_R| + |E_L|) = 1 / AR (in limit where
  // q >= q_limit), and by bisection wherever the margin does not agree with the
  // predicate (a zero field, the hand of a circular reference) or the bracket shrinks
  // too slowly. Every edge stops once its bracket is below kEdgeTolerance_rad; all
  // edges advance together, one engine call per round.
  struct Edge {
    int plane;
    double lo, hi;
    bool in_lo;
    double g_lo, g_hi;  // margins at lo and hi (NaN: none usable)
    int retained = 0;   // -1 / +1: lo / hi kept by the last step (Illinois halving)
    bool bisect = false;
  };
  const double q_limit = FromDb(-0.5 * options.axial_ratio_limit_db);  // an amplitude ratio
  auto margin = [&](const ProbeSample& p) {
    if (p.no_field) return std::numeric_limits<double>::quiet_NaN();
    const Polarization pol = PolarizationOf(p.e_theta, p.e_phi, p.floor_v);
    const double r = std::abs(pol.e_right), l = std::abs(pol.e_left);
    if (!(r + l > 0.0)) return std::numeric_limits<double>::quiet_NaN();
    return std::abs(r - l) / (r + l) - q_limit;
  };
  std::vector<Edge> edges;
  for (int k = 0; k < nphi; ++k) {
    for (int i = 0; i < nt; ++i) {
      const std::size_t a = static_cast<std::size_t>(k) * static_cast<std::size_t>(nt + 1) +
                            static_cast<std::size_t>(i);
      if (in[a] != in[a + 1])
        edges.push_back(
            {k, i * dt, (i + 1) * dt, static_cast<bool>(in[a]), margin(s[a]), margin(s[a + 1])});
    }
  }
  std::vector<std::size_t> open(edges.size());
  for (std::size_t e = 0; e < edges.size(); ++e) open[e] = e;
  for (int iter = 0; iter < 200 && !open.empty(); ++iter) {
    std::vector<Vec3> mid(open.size());
    std::vector<double> at(open.size());
    for (std::size_t o = 0; o < open.size(); ++o) {
      Edge& e = edges[open[o]];
      // The margin must say "in" (>= 0) on the inside end and "out" on the other.
      const double g_in = e.in_lo ? e.g_lo : e.g_hi, g_out = e.in_lo ? e.g_hi : e.g_lo;
      const bool usable = !e.bisect && g_in >= 0.0 && g_out < 0.0;
      double x = 0.5 * (e.lo + e.hi);
      if (usable) {
        x = e.lo + (e.hi - e.lo) * e.g_lo / (e.g_lo - e.g_hi);
        // Keep clear of the ends by a tenth of the tolerance, so the bracket shrinks.
        const double guard = 0.1 * kEdgeTolerance_rad;
        x = std::clamp(x, e.lo + guard, e.hi - guard);
      }
      at[o] = x;
      mid[o] = UnitVectorAt(x, 2.0 * kPi * e.plane / nphi);
    }
    const std::vector<ProbeSample> m = probe.At(mid);
    std::vector<std::size_t> still;
    for (std::size_t o = 0; o < open.size(); ++o) {
      Edge& e = edges[open[o]];
      const double x = at[o], g = margin(m[o]);
      const double width = e.hi - e.lo;
      if (WithinAxialRatio(m[o], options) == e.in_lo) {
        e.lo = x;
        e.g_lo = g;
        if (e.retained == 1) e.g_hi *= 0.5;  // the same end kept twice: Illinois
        e.retained = 1;
      } else {
        e.hi = x;
        e.g_hi = g;
        if (e.retained == -1) e.g_lo *= 0.5;
        e.retained = -1;
      }
      // A step that kept more than half of the bracket: the next one bisects.
      e.bisect = e.hi - e.lo > 0.5 * width;
      if (e.hi - e.lo > kEdgeTolerance_rad) still.push_back(open[o]);
    }
    open.swap(still);
  }
  // Per plane: int sin(theta) dtheta over the in-limit intervals = sum (cos a - cos b).
  std::vector<double> plane(static_cast<std::size_t>(nphi), 0.0);
  std::vector<double> open_at(static_cast<std::size_t>(nphi), -1.0);
  for (int k = 0; k < nphi; ++k)
    if (in[static_cast<std::size_t>(k) * static_cast<std::size_t>(nt + 1)])
      open_at[static_cast<std::size_t>(k)] = 0.0;
  for (const Edge& e : edges) {  // edges are in theta order within each plane
    const auto k = static_cast<std::size_t>(e.plane);
    const double x = 0.5 * (e.lo + e.hi);
    if (e.in_lo) {
      plane[k] += std::cos(open_at[k]) - std::cos(x);
      open_at[k] = -1.0;
    } else {
      open_at[k] = x;
    }
  }
  double sum = 0.0;
  for (int k = 0; k < nphi; ++k) {
    const auto kk = static_cast<std::size_t>(k);
    if (open_at[kk] >= 0.0) plane[kk] += std::cos(open_at[kk]) - std::cos(theta_max);
    sum += plane[kk];
  }
  return sum * 2.0 * kPi / nphi;
}

}  // namespace lobecast
