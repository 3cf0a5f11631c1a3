// Nulls of the total or co-polar field (nulls.h).
#include "engine/analysis/nulls.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <Eigen/SVD>

#include "engine/analysis/beam.h"
#include "engine/analysis/local_search.h"
#include "engine/decibels.h"

namespace lobecast {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// Grid local minima up to this far above the threshold are refined too: a point null
// between grid points can sample well above its true depth (a dipole's axis 2.5 deg
// off the nearest grid point samples at -27 dB).
constexpr double kScreenMargin_db = 20.0;

// Refined nulls closer than this are the same null, rad.
constexpr double kSameNull_rad = 1e-4;

// Central-difference step of the Gauss-Newton Jacobian, rad: the residual is linear in
// the offset near a simple null, so only rounding (~eps |E| / h) limits the Jacobian.
constexpr double kJacobianStep_rad = 1e-7;

// The null field as real residuals, scaled so that |residual|^2 = D_null / D_peak.
// Total field: the Cartesian rE (smooth across the poles); co-polar: the co component.
Eigen::VectorXd Residual(const ProbeSample& s, const AnalysisOptions& options, double scale) {
  if (options.null_field == NullField::kCoPolar) {
    const Complex co = s.CoCrossFor(options.reference).co * scale;
    return Eigen::Vector2d(co.real(), co.imag());
  }
  const Eigen::Vector3cd e = s.FieldVector_v() * scale;
  Eigen::VectorXd r(6);
  r << e.real(), e.imag();
  return r;
}

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
  if (neighbours.num_nodes() == 0) return out;
  const std::size_t np = grid_result.grid.phi_deg.size();
  // The null-field level relative to the peak, computed from the stored grid field
  // where it is needed (no per-direction copy).
  const GridNeighbours::GridValue grid_level = [&](std::size_t g) {
    ProbeSample s;
    s.phi_rad = grid_result.grid.phi_deg[g % np] * kDegree;
    s.e_theta = grid_result.field.e_theta[static_cast<Eigen::Index>(g)];
    s.e_phi = grid_result.field.e_phi[static_cast<Eigen::Index>(g)];
    s.floor_v = grid_result.field_floor_v;
    s.directivity = grid_result.directivity[static_cast<Eigen::Index>(g)];
    return NullFieldDirectivity(probe, s, options) / peak_directivity;
  };
  const double threshold = FromDb(options.null_threshold_db);
  const double screen = std::min(0.5, FromDb(options.null_threshold_db + kScreenMargin_db));
  const auto components =
      neighbours.Components(neighbours.LocalMinima(grid_level, 1e-9 * threshold));
  struct Candidate {
    std::size_t node;
    double value;
  };
  std::vector<Candidate> cands;
  for (const auto& comp : components) {
    std::size_t best = comp[0];
    double best_level = grid_level(neighbours.representative(best));
    for (std::size_t n : comp) {
      const double l = grid_level(neighbours.representative(n));
      if (l < best_level) {
        best = n;
        best_level = l;
      }
    }
    if (best_level < screen) cands.push_back({best, best_level});
  }
  std::sort(cands.begin(), cands.end(),
            [](const Candidate& a, const Candidate& b) { return a.value < b.value; });

  const double scale = std::sqrt(probe.DirectivityOf(1.0) / peak_directivity);
  auto objective = [&](const Vec3& r) {
    const ProbeSample s = probe.At(r);
    return s.no_field ? kInf : NullFieldDirectivity(probe, s, options) / peak_directivity;
  };
  struct Found {
    Vec3 r_hat;
    double level;
    DirectionDeg reported;  // the grid angles when the search stayed at its start
  };
  const double tol = options.refine_tolerance_deg * kDegree;
  std::vector<Found> found;
  const std::size_t max_refined = 4 * options.max_nulls + 8;
  std::size_t refined = 0;
  for (const Candidate& c : cands) {
    if (found.size() == options.max_nulls || refined == max_refined) {
      out.truncated = true;
      break;
    }
    ++refined;
    const LocalChart chart(neighbours.direction(c.node));
    const PlaneMinimum m =
        MinimizeOnPlane([&](double a, double b) { return objective(chart.At(a, b)); }, 0.0, 0.0,
                        {0.5 * neighbours.spacing_rad(), options.refine_tolerance_deg * kDegree,
                         options.max_evaluations_per_search});
    Vec3 r = chart.At(m.a, m.b);
    double v = m.value;
    // Gauss-Newton on the field: the least-squares (minimum-norm) step toward a zero,
    // which for a null curve lands on the curve.
    for (int iter = 0; iter < 8 && v > 0.0; ++iter) {
      const LocalChart lc(r);
      const double h = kJacobianStep_rad;
      const std::vector<ProbeSample> s =
          probe.At(std::vector<Vec3>{r, lc.At(h, 0), lc.At(-h, 0), lc.At(0, h), lc.At(0, -h)});
      if (std::any_of(s.begin(), s.end(), [](const ProbeSample& p) { return p.no_field; })) break;
      const Eigen::VectorXd r0 = Residual(s[0], options, scale);
      Eigen::MatrixXd jac(r0.size(), 2);
      jac.col(0) = (Residual(s[1], options, scale) - Residual(s[2], options, scale)) / (2 * h);
      jac.col(1) = (Residual(s[3], options, scale) - Residual(s[4], options, scale)) / (2 * h);
      Eigen::JacobiSVD<Eigen::MatrixXd> svd(jac, Eigen::ComputeThinU | Eigen::ComputeThinV);
      svd.setThreshold(1e-8);
      const Eigen::Vector2d step = -svd.solve(r0);
      if (!(step.norm() > 0.0) || step.norm() > 10.0 * neighbours.spacing_rad()) break;
      const Vec3 cand = lc.At(step[0], step[1]);
      const double vc = objective(cand);
      if (!(vc < v)) break;
      r = cand;
      v = vc;
      if (step.norm() < 1e-15) break;
    }
    if (!(v < threshold)) continue;
    const DirectionDeg reported = ReportedDirection(r, neighbours.direction_deg(c.node), tol);
    auto same = std::find_if(found.begin(), found.end(), [&](const Found& f) {
      return AngleBetween(f.r_hat, r) < kSameNull_rad;
    });
    if (same != found.end()) {
      if (v < same->level) *same = {r, v, reported};
      continue;
    }
    found.push_back({r, v, reported});
  }
  for (const auto& [r, v, reported] : found) {
    Null n;
    n.direction = reported;
    n.directivity = v * peak_directivity;
    n.level_db = ToDb(v);
    n.exact = v == 0.0;  // the null field is below the floor: floored to exact zeros
    out.nulls.push_back(n);
  }
  std::sort(out.nulls.begin(), out.nulls.end(),
            [](const Null& a, const Null& b) { return a.directivity < b.directivity; });
  return out;
}

}  // namespace lobecast
