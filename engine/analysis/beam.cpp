// Main beam: peak, principal-plane beamwidths, front-to-back (beam.h).
#include "engine/analysis/beam.h"

#include "engine/pattern.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <Eigen/Eigenvalues>

#include "engine/analysis/local_search.h"
#include "engine/decibels.h"

namespace lobecast {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// Finite-difference step for the Newton polish, rad. Central differences of D: the
// gradient error is ~h^2 D'''/6 (position error ~1e-10 rad for beams wider than
// 0.1 deg) and the Hessian's rounding error ~eps D / h^2 ~ 2e-6 D.
constexpr double kNewtonStep_rad = 1e-5;

// The simplex hands its best vertex to the Newton polish once it has shrunk to this
// (rad): well inside the polish's quadratic zone (100 kNewtonStep_rad), where a Newton
// step lands within ~1e-10 rad, while the simplex, converging linearly, would spend
// half its evaluations on the way down to the refinement tolerance (1e-6 deg).
constexpr double kSimplexHandOff_rad = 1e-5;

// A balance pass that moves the peak less than this fraction of the refinement
// tolerance leaves it where a second pass would (BalancePeak).
constexpr double kBalancedMove = 1e-3;

// The first batch of samples a walk along a great circle evaluates (WalkBeamRay); each
// later batch doubles the samples. A beam edge is a few samples out (CutStepRad: a
// tenth of the half-power half-width or less, four tenths on the polarization rays), so
// a first batch of 64 evaluated mostly unread samples:
// the polarization purity's 72 rays of a 400 x 400 lattice, 3249 exact evaluations
// against 7281. The batches from 64 samples on are the same as from 64.
constexpr std::size_t kFirstWalkBatch = 8;

// D on the 3 x 3 stencil of step h about r (in LocalChart(r), index (ia + 1) * 3 + ib + 1
// for the offsets ia h, ib h); empty when a point of it has no field.
std::vector<double> StencilDirectivity(const PatternProbe& probe, const Vec3& r, double h) {
  const LocalChart c(r);
  std::vector<Vec3> pts;
  for (int ia = -1; ia <= 1; ++ia)
    for (int ib = -1; ib <= 1; ++ib) pts.push_back(c.At(ia * h, ib * h));
  std::vector<double> d;
  for (const ProbeSample& p : probe.At(pts)) {
    if (p.no_field) return {};
    d.push_back(p.directivity);
  }
  return d;
}

// Along each principal direction v of the peak, moves to where D(s + h) = D(s - h),
// with h wide enough that D falls by ~1e-6 relative over it. Near a quadratic peak this
// is a Newton step free of rounding; near a flat (quartic) one, where function values
// cannot resolve the top to better than ~1e-4 rad, the balance point is still exact for
// a symmetric beam. Directions in which D does not fall by 1e-6 within 0.1 rad (a ring
// of maxima) are left alone, and no move that lowers D beyond rounding is taken.
void BalancePeak(const PatternProbe& probe, RefinedMaximum& r, double tolerance_rad) {
  const double h = kNewtonStep_rad;
  for (int pass = 0; pass < 2; ++pass) {
    const std::vector<double> d = StencilDirectivity(probe, r.r_hat, h);
    if (d.empty()) return;
    const Vec3 before = r.r_hat;
    auto F = [&](int ia, int ib) { return d[static_cast<std::size_t>((ia + 1) * 3 + ib + 1)]; };
    Eigen::Matrix2d hess;
    hess(0, 0) = F(1, 0) - 2 * F(0, 0) + F(-1, 0);
    hess(1, 1) = F(0, 1) - 2 * F(0, 0) + F(0, -1);
    hess(0, 1) = hess(1, 0) = 0.25 * (F(1, 1) - F(1, -1) - F(-1, 1) + F(-1, -1));
    const Eigen::SelfAdjointEigenSolver<Eigen::Matrix2d> es(hess);
    for (int k = 0; k < 2; ++k) {
      const LocalChart here(r.r_hat);
      const Eigen::Vector2d v = es.eigenvectors().col(k);
      auto at = [&](double t) { return here.At(t * v[0], t * v[1]); };
      double w = 1e-4;
      double lo = 0, hi = 0;
      for (; w <= 0.1; w *= 2) {
        const std::vector<ProbeSample> e = probe.At(std::vector<Vec3>{at(w), at(-w)});
        if (e[0].no_field || e[1].no_field) {
          w = 1.0;
          break;
        }
        lo = e[1].directivity;
        hi = e[0].directivity;
        if (r.directivity - 0.5 * (lo + hi) > 1e-6 * r.directivity) break;
      }
      if (w > 0.1) continue;
      // Secant on G(t) = D(t + w) - D(t - w), from t = 0 and t = w / 16.
      double t0 = 0, g0 = hi - lo, t1 = w / 16;
      auto G = [&](double t) {
        const std::vector<ProbeSample> e = probe.At(std::vector<Vec3>{at(t + w), at(t - w)});
        return e[0].directivity - e[1].directivity;
      };
      double g1 = G(t1);
      for (int it = 0; it < 8 && g1 != g0; ++it) {
        const double t2 = t1 - g1 * (t1 - t0) / (g1 - g0);
        t0 = t1;
        g0 = g1;
        t1 = t2;
        if (std::abs(t1) > w) break;
        g1 = G(t1);
        if (std::abs(t1 - t0) < 1e-13) break;
      }
      if (!(std::abs(t1) <= w)) continue;
      const Vec3 cand = at(t1);
      const ProbeSample pc = probe.At(cand);
      constexpr double kEps = std::numeric_limits<double>::epsilon();
      if (!pc.no_field && pc.directivity >= r.directivity * (1 - 8 * kEps)) {
        r.r_hat = cand;
        r.directivity = pc.directivity;
      }
    }
    // A pass that left the point where it was (a peak the Newton polish had already
    // balanced) would be repeated from the same stencil to the same end.
    if (AngleBetween(before, r.r_hat) < kBalancedMove * tolerance_rad) break;
  }
}

// RefineMaximum's end: the Newton polish and BalancePeak from the simplex's best vertex.
RefinedMaximum PolishMaximum(const PatternProbe& probe, RefinedMaximum r, double tolerance_rad) {
  // Newton polish on the 3x3 stencil, only along directions of clearly negative
  // curvature (a ring of maxima has a flat direction that must be left alone).
  const double h = kNewtonStep_rad;
  for (int iter = 0; iter < 4; ++iter) {
    const LocalChart c(r.r_hat);
    const std::vector<double> d = StencilDirectivity(probe, r.r_hat, h);
    if (d.empty()) break;
    auto F = [&](int ia, int ib) { return d[static_cast<std::size_t>((ia + 1) * 3 + ib + 1)]; };
    const Eigen::Vector2d g((F(1, 0) - F(-1, 0)) / (2 * h), (F(0, 1) - F(0, -1)) / (2 * h));
    Eigen::Matrix2d hess;
    hess(0, 0) = (F(1, 0) - 2 * F(0, 0) + F(-1, 0)) / (h * h);
    hess(1, 1) = (F(0, 1) - 2 * F(0, 0) + F(0, -1)) / (h * h);
    hess(0, 1) = hess(1, 0) = (F(1, 1) - F(1, -1) - F(-1, 1) + F(-1, -1)) / (4 * h * h);
    const Eigen::SelfAdjointEigenSolver<Eigen::Matrix2d> es(hess);
    const double scale = es.eigenvalues().cwiseAbs().maxCoeff();
    Eigen::Vector2d step = Eigen::Vector2d::Zero();
    for (int k = 0; k < 2; ++k) {
      const double lam = es.eigenvalues()[k];
      if (lam < -1e-5 * scale)
        step -= (es.eigenvectors().col(k).dot(g) / lam) * es.eigenvectors().col(k);
    }
    const double len = step.norm();
    if (!(len > 0.0) || len > 100 * h) break;  // nothing to do, or not in the quadratic zone
    const Vec3 cand = c.At(step[0], step[1]);
    const double dc = probe.DirectivityAt(cand);
    if (!(dc >= r.directivity)) break;
    r.r_hat = cand;
    r.directivity = dc;
    if (len < 1e-12) break;
  }
  BalancePeak(probe, r, tolerance_rad);
  return r;
}

}  // namespace

DirectionDeg AnglesDeg(const Vec3& v) {
  const SphericalAngles s = AnglesOf(v);
  DirectionDeg d{s.theta_rad / kDegree, s.phi_rad / kDegree};
  // Rounding can leave phi a hair below 360; 1e-9 deg is far below any refinement
  // tolerance, so call it 0 rather than print 360.0000.
  if (d.phi_deg >= 360.0 - 1e-9) d.phi_deg = 0.0;
  return d;
}

DirectionDeg ToDirectionDeg(const Vec3& r_hat, double axis_tolerance_rad) {
  const DirectionDeg d = AnglesDeg(r_hat);
  // On the z axis (to the search's own tolerance) phi names nothing: undefined.
  if (d.theta_deg * kDegree <= axis_tolerance_rad || d.theta_deg == 0.0)
    return {0.0, std::numeric_limits<double>::quiet_NaN()};
  if (kPi - d.theta_deg * kDegree <= axis_tolerance_rad || d.theta_deg == 180.0)
    return {180.0, std::numeric_limits<double>::quiet_NaN()};
  return d;
}

DirectionDeg ReportedDirection(const Vec3& r_hat, const DirectionDeg& start_deg,
                               double tolerance_rad) {
  DirectionDeg d = ToDirectionDeg(r_hat, tolerance_rad);
  if (std::isnan(d.phi_deg) || std::isnan(start_deg.phi_deg)) return d;  // the z axis
  // Coordinate by coordinate: a side lobe of a line found by moving along phi keeps the
  // grid's theta = 90 exactly.
  const double tol_deg = tolerance_rad / kDegree;
  if (std::abs(d.theta_deg - start_deg.theta_deg) <= tol_deg) d.theta_deg = start_deg.theta_deg;
  double dphi = std::abs(d.phi_deg - start_deg.phi_deg);
  dphi = std::min(dphi, 360.0 - dphi);
  if (dphi * std::sin(d.theta_deg * kDegree) <= tol_deg) d.phi_deg = start_deg.phi_deg;
  if (d.phi_deg >= 360.0) d.phi_deg -= 360.0;  // a grid ending at 360: phi is in [0, 360)
  return d;
}

RefinedMaximum RefineMaximum(const PatternProbe& probe, const Vec3& start, double initial_step_rad,
                             double tolerance_rad, int max_evaluations) {
  return RefineMaxima(probe, {start}, initial_step_rad, tolerance_rad, max_evaluations)[0];
}

std::vector<RefinedMaximum> RefineMaxima(const PatternProbe& probe, const std::vector<Vec3>& starts,
                                         double initial_step_rad, double tolerance_rad,
                                         int max_evaluations) {
  std::vector<LocalChart> charts;
  for (const Vec3& s : starts) charts.emplace_back(s);
  const std::vector<PlaneMinimum> minima = MinimizeOnPlanes(
      [&](const std::vector<PlaneBatchPoint>& points) {
        std::vector<Vec3> r;
        for (const PlaneBatchPoint& p : points) r.push_back(charts[p.search].At(p.a, p.b));
        std::vector<double> v;
        for (const ProbeSample& s : probe.AtSearch(r)) v.push_back(-s.directivity);
        return v;
      },
      std::vector<std::pair<double, double>>(starts.size(), {0.0, 0.0}),
      {initial_step_rad, std::max(tolerance_rad, kSimplexHandOff_rad), max_evaluations});
  // The simplex's best vertices, exact (AtSearch's values are not: the polish below
  // compares exact values with them).
  std::vector<Vec3> best;
  std::vector<double> best_d;
  for (std::size_t i = 0; i < starts.size(); ++i) {
    best.push_back(charts[i].At(minima[i].a, minima[i].b));
    best_d.push_back(-minima[i].value);
  }
  if (!probe.search_is_exact()) {
    const std::vector<ProbeSample> e = probe.AtExact(best);
    for (std::size_t i = 0; i < e.size(); ++i) best_d[i] = e[i].directivity;
  }
  // The polish of each maximum evaluates a few directions at a time (one thread each):
  // the maxima are spread over the threads instead, each polished as it would be alone.
  std::vector<RefinedMaximum> out(starts.size());
  const auto n = static_cast<std::ptrdiff_t>(starts.size());
#pragma omp parallel for schedule(dynamic, 1) if (n > 1)
  for (std::ptrdiff_t i = 0; i < n; ++i) {
    const auto u = static_cast<std::size_t>(i);
    out[u] = PolishMaximum(probe, {best[u], best_d[u], minima[u].converged}, tolerance_rad);
  }
  return out;
}

MainBeamPeak RefinePeak(const PatternProbe& probe, const AngularGrid& grid,
                        const Eigen::VectorXd& grid_directivity, const AnalysisOptions& options,
                        Vec3* peak_r_hat) {
  const Eigen::Index best = PeakIndex(grid_directivity);
  const double grid_max = grid_directivity[best];
  const std::size_t np = grid.phi_deg.size();
  const double t0 = grid.theta_deg[static_cast<std::size_t>(best) / np];
  const double p0 = grid.phi_deg[static_cast<std::size_t>(best) % np];
  const Vec3 start = UnitVectorAt(t0 * kDegree, p0 * kDegree);

  double spacing = kDegree;
  if (grid.theta_deg.size() >= 2)
    spacing = std::abs(grid.theta_deg[1] - grid.theta_deg[0]) * kDegree;
  else if (np >= 2)
    spacing = std::abs(grid.phi_deg[1] - grid.phi_deg[0]) * kDegree;

  const RefinedMaximum m =
      RefineMaximum(probe, start, 0.5 * spacing, options.refine_tolerance_deg * kDegree,
                    options.max_evaluations_per_search);
  MainBeamPeak p;
  p.grid_direction = {t0, p0};
  p.grid_directivity = grid_max;
  // A coordinate of the refined peak within the search tolerance of the grid's is the
  // grid's (ReportedDirection: a broadside beam at theta 90, not 89.99999999999999), and
  // the peak is then evaluated at the direction reported, so everything said about it
  // (polarization, cuts, F/B) belongs to that direction: a y dipole's beam reported at
  // phi = 0 has E_theta exactly 0 there, not the 1e-13 of a phi a hair off 0.
  const double tol = options.refine_tolerance_deg * kDegree;
  p.direction = ReportedDirection(m.r_hat, {t0, p0}, tol);
  const double phi_rad = std::isnan(p.direction.phi_deg) ? 0.0 : p.direction.phi_deg * kDegree;
  const Vec3 r_hat = UnitVectorAt(p.direction.theta_deg * kDegree, phi_rad);
  const double d = probe.DirectivityAt(r_hat);
  p.directivity = d;
  p.directivity_dbi = ToDb(d);
  p.refined = m.converged;
  *peak_r_hat = r_hat;
  return p;
}

BeamRay WalkBeamRay(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                    double peak_directivity, double step_rad, double tolerance_rad,
                    bool find_null) {
  const int n = std::max(4, static_cast<int>(std::ceil(kPi / step_rad)));
  const double step = kPi / n;
  // A great circle within the search tolerance of a PEC ground plane (the orthogonal
  // cut through a peak on the horizon) is the horizon itself: rounding would otherwise
  // tilt it a hair into the no-field half space and read that grazing exit as a beam
  // edge. Its points are taken on the horizon.
  const Vec3 normal = peak.cross(tangent);
  const bool on_horizon =
      probe.array().ground == Ground::kPec &&
      std::hypot(normal.x(), normal.y()) <= std::max(tolerance_rad, 1e-12) * normal.norm();
  auto point = [&](double alpha) {
    const Vec3 p = AlongGreatCircle(peak, tangent, alpha);
    if (!on_horizon) return p;
    const Vec3 h(p.x(), p.y(), 0.0);
    return Vec3(h / h.norm());
  };
  // Samples 0..n reach the antipode; one more lets a minimum sitting there be bracketed.
  // They are evaluated a batch at a time, each batch twice the last, as far as the walk
  // reads them: a narrow beam's edge and first null come long before the antipode.
  std::vector<ProbeSample> s;
  // By value: a later batch may move the samples.
  auto at = [&](int k) -> ProbeSample {
    const auto want = static_cast<std::size_t>(k);
    if (want >= s.size()) {
      const std::size_t total = static_cast<std::size_t>(n) + 2;
      const std::size_t end =
          std::min(total, std::max(want + 1, std::max<std::size_t>(kFirstWalkBatch, 2 * s.size())));
      std::vector<Vec3> pts;
      pts.reserve(end - s.size());
      for (std::size_t j = s.size(); j < end; ++j)
        pts.push_back(point(static_cast<double>(j) * step));
      const std::vector<ProbeSample> more = probe.At(pts);
      s.insert(s.end(), more.begin(), more.end());
    }
    return s[want];
  };
  const double half = 0.5 * peak_directivity;
  auto excess = [&](double alpha) {
    const ProbeSample p = probe.At(point(alpha));
    return p.no_field ? -half : p.directivity - half;
  };

  BeamRay r;
  r.half_power_rad = kPi;
  int k = 1;
  while (k <= n && !at(k).no_field && at(k).directivity >= half) ++k;
  if (k > n) return r;
  const double g_lo = at(k - 1).directivity - half;
  const double g_hi = at(k).no_field ? -half : at(k).directivity - half;
  r.half_power_rad = FindRoot(excess, (k - 1) * step, k * step, g_lo, g_hi, tolerance_rad);
  r.half_power_found = true;
  if (probe.NoFieldAt(point(r.half_power_rad + 4 * tolerance_rad))) {
    r.clipped_by_ground = true;
    return r;
  }
  if (!find_null) return r;
  for (int j = k; j <= n; ++j) {
    if (at(j + 1).no_field) {
      r.clipped_by_ground = true;
      return r;
    }
    if (at(j + 1).directivity > at(j).directivity) {
      auto level = [&](double alpha) {
        const ProbeSample p = probe.At(point(alpha));
        return p.no_field ? kInf : p.directivity;
      };
      const LineMinimum m =
          MinimizeOnInterval(level, (j - 1) * step, (j + 1) * step, tolerance_rad);
      r.null_found = true;
      r.null_rad = m.x;
      return r;
    }
  }
  return r;
}

double CutStepRad(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                  double peak_directivity, const AnalysisOptions& options) {
  const double h = 1e-3;
  const std::vector<ProbeSample> s = probe.At(
      std::vector<Vec3>{AlongGreatCircle(peak, tangent, h), AlongGreatCircle(peak, tangent, -h)});
  double step = options.cut_step_deg * kDegree;
  if (s[0].no_field || s[1].no_field) return step;
  // D ~ Dp (1 - c a^2) near the peak, half power near a = 1/sqrt(2c).
  const double c =
      (peak_directivity - 0.5 * (s[0].directivity + s[1].directivity)) / (peak_directivity * h * h);
  if (c > 0.0) step = std::min(step, 0.1 / std::sqrt(2.0 * c));
  return std::max(step, 1e-7);
}

BeamCut AnalyzeCut(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                   double peak_directivity, const AnalysisOptions& options) {
  const double step = CutStepRad(probe, peak, tangent, peak_directivity, options);
  const double tol = options.refine_tolerance_deg * kDegree;
  const BeamRay up = WalkBeamRay(probe, peak, tangent, peak_directivity, step, tol, true);
  const BeamRay down = WalkBeamRay(probe, peak, -tangent, peak_directivity, step, tol, true);
  BeamCut c;
  c.clipped_by_ground = up.clipped_by_ground || down.clipped_by_ground;
  if (up.half_power_found && down.half_power_found) {
    c.half_power_found = true;
    c.half_power_upper_deg = up.half_power_rad / kDegree;
    c.half_power_lower_deg = -down.half_power_rad / kDegree;
    c.half_power_width_deg = c.half_power_upper_deg - c.half_power_lower_deg;
  }
  if (up.null_found && down.null_found) {
    c.first_nulls_found = true;
    c.first_null_upper_deg = up.null_rad / kDegree;
    c.first_null_lower_deg = -down.null_rad / kDegree;
    c.first_null_width_deg = c.first_null_upper_deg - c.first_null_lower_deg;
  }
  return c;
}

bool OnAxis(const Vec3& peak) {
  return std::atan2(std::hypot(peak.x(), peak.y()), std::abs(peak.z())) < kOnAxisDeg * kDegree;
}

std::pair<PrincipalPlane, PrincipalPlane> PrincipalPlanesAt(const PatternProbe& probe,
                                                            const Vec3& peak,
                                                            const DirectionDeg& peak_deg) {
  if (!OnAxis(peak)) {
    const LocalChart chart(peak);
    return {{CutPlane::kElevation, peak_deg.phi_deg, chart.e1()},
            {CutPlane::kOrthogonal, std::numeric_limits<double>::quiet_NaN(), chart.e2()}};
  }
  // The tangent toward phi = phi_deg: (cos phi, sin phi, 0) projected onto the tangent
  // plane of the peak (exact on the axis itself; the peak may sit up to kOnAxisDeg off).
  auto toward = [&](double phi_deg) {
    const Vec3 u(std::cos(phi_deg * kDegree), std::sin(phi_deg * kDegree), 0.0);
    return Vec3((u - u.dot(peak) * peak).normalized());
  };
  auto plane = [&](CutPlane p, double phi_deg) {
    return PrincipalPlane{p, phi_deg, toward(phi_deg)};
  };
  const ProbeSample s = probe.At(peak);
  const Polarization pol = PolarizationOf(s.e_theta, s.e_phi, s.floor_v);
  if (!(pol.axial_ratio_db >= kEPlaneMinAxialRatioDb))  // also NaN: no field
    return {plane(CutPlane::kXZ, 0.0), plane(CutPlane::kYZ, 90.0)};
  // The major axis of the polarization ellipse, from the Cartesian field (smooth across
  // the pole, unlike E_theta and E_phi): the real unit vector t in the xy plane that
  // maximizes |E . t|^2 = A cos^2 a + B sin^2 a + 2 C sin a cos a, at
  // a = atan2(2 C, A - B) / 2 (the same formula as the tilt, IEEE Std 145-2013).
  const Eigen::Vector3cd e = s.FieldVector_v();
  const double a = std::norm(e.x()), b = std::norm(e.y());
  const double c = (e.x() * std::conj(e.y())).real();
  double phi = 0.5 * std::atan2(2.0 * c, a - b) / kDegree;
  // The plane holds both t and -t: name it by the phi in [0, 180).
  phi = std::fmod(phi + 360.0, 180.0);
  if (phi >= 180.0 - 1e-9) phi = 0.0;
  const double h = phi < 90.0 ? phi + 90.0 : phi - 90.0;
  return {plane(CutPlane::kE, phi), plane(CutPlane::kH, h)};
}

BeamCut AnalyzePlane(const PatternProbe& probe, const Vec3& peak, const PrincipalPlane& plane,
                     double peak_directivity, const AnalysisOptions& options) {
  BeamCut c = AnalyzeCut(probe, peak, plane.tangent, peak_directivity, options);
  c.plane = plane.plane;
  c.plane_phi_deg = plane.phi_deg;
  c.tangent = AnglesDeg(plane.tangent);  // a vector to rebuild, not a reported direction
  return c;
}

FrontToBack FrontToBackOf(const PatternProbe& probe, const Vec3& peak, const DirectionDeg& peak_deg,
                          double peak_directivity, double tolerance_rad) {
  FrontToBack f;
  const bool pec = probe.array().ground == Ground::kPec;
  auto grazing_onto_horizon = [&](Vec3 r) {
    if (pec && r.z() < 0.0 && r.z() >= -std::max(tolerance_rad, 1e-12) &&
        std::hypot(r.x(), r.y()) > 0.0) {
      r.z() = 0.0;
      r.normalize();
    }
    return r;
  };
  const Vec3 behind = grazing_onto_horizon(Vec3(-peak.x(), -peak.y(), peak.z()));
  const Vec3 back = pec ? behind : grazing_onto_horizon(-peak);
  const std::vector<ProbeSample> s = probe.At(std::vector<Vec3>{back, behind});
  // phi + 180 in [0, 360); NaN (on the z axis) stays NaN.
  const double opposite_phi =
      peak_deg.phi_deg >= 180.0 ? peak_deg.phi_deg - 180.0 : peak_deg.phi_deg + 180.0;
  f.same_elevation_back_direction = behind.z() != peak.z() || std::isnan(opposite_phi)
                                        ? ToDirectionDeg(behind, tolerance_rad)
                                        : DirectionDeg{peak_deg.theta_deg, opposite_phi};
  // In free space nothing grazes: the back direction is the exact antipode.
  f.back_direction = pec ? f.same_elevation_back_direction
                         : DirectionDeg{180.0 - peak_deg.theta_deg, opposite_phi};
  // The peak is > 0, so a zero (or rounding-level) back field gives +inf.
  f.ratio_db = PowerRatioDb(peak_directivity, s[0].directivity);
  f.same_elevation_ratio_db = PowerRatioDb(peak_directivity, s[1].directivity);
  if (OnAxis(peak)) {
    // "Behind at the same theta" of a peak on the axis is the peak itself.
    constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    f.same_elevation_ratio_db = kNaN;
    f.same_elevation_back_direction = {kNaN, kNaN};
    if (pec) {
      f.ratio_db = kNaN;
      f.back_direction = {kNaN, kNaN};
    }
  }
  return f;
}

}  // namespace lobecast
