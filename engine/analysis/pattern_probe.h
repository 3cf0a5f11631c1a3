// Exact pattern values in arbitrary directions, for the off-grid refinement of the
// pattern analysis. Directions are unit vectors here, not (theta, phi): searches
// move in a local chart around a point, so the poles and the phi seam need no
// special cases. Evaluations run the direct (exact) sum on one FieldPlan of the
// sources, built once (FieldPlan::ExecuteAt); large batches of large arrays get a plan
// of their own with the auto method (the fast path where cheaper, pattern_probe.cpp).
// The searches' inner rounds of large arrays read a fast transform of the currents
// instead (AtSearch), and evaluate exactly only what they report.
#pragma once

#include <cstddef>
#include <memory>
#include <mutex>
#include <vector>

#include "engine/field/far_field.h"
#include "engine/polarization.h"
#include "engine/types.h"

namespace lobecast {

struct SphericalAngles {
  double theta_rad = 0.0;  // [0, pi], from atan2 (accurate near the poles)
  double phi_rad = 0.0;    // [0, 2 pi); 0 on the poles, where phi is degenerate
};
SphericalAngles AnglesOf(const Vec3& r_hat);

// Angle between two unit vectors (rad), accurate for small and near-pi angles.
double AngleBetween(const Vec3& a, const Vec3& b);

// cos(angle) from + sin(angle) tangent: the point reached from a unit vector `from`
// after angle_rad along the great circle whose unit tangent at `from` is `tangent`
// (tangent . from = 0), unit up to rounding. GreatCirclePoint(tangent, -from, angle)
// is the circle's direction of travel there.
Vec3 GreatCirclePoint(const Vec3& from, const Vec3& tangent, double angle_rad);
// The same point normalized.
Vec3 AlongGreatCircle(const Vec3& from, const Vec3& tangent, double angle_rad);

// Normal coordinates about a point: (a, b) -> exp_origin(a e1 + b e2), with e1 and e2
// the theta_hat and phi_hat of the origin (phi = 0 on a pole). Distances from the
// origin are exact: |(a, b)| is the angle from the origin.
class LocalChart {
 public:
  explicit LocalChart(const Vec3& origin);
  Vec3 At(double a, double b) const;
  const Vec3& origin() const { return origin_; }
  const Vec3& e1() const { return e1_; }
  const Vec3& e2() const { return e2_; }

 private:
  Vec3 origin_, e1_, e2_;
};

struct ProbeSample {
  double theta_rad = 0.0;
  double phi_rad = 0.0;
  Complex e_theta = 0.0;  // rE_theta, V
  Complex e_phi = 0.0;    // rE_phi, V
  double directivity = 0.0;
  bool no_field = false;  // below a PEC ground: the field is zero by construction
  // The numerical floor of the sum (FieldFloor_v): e_theta and e_phi are floored
  // already; CoCrossFor floors the co and cross parts too.
  double floor_v = 0.0;

  // rE as a Cartesian complex vector (V): smooth across the poles, unlike its
  // theta and phi components.
  Eigen::Vector3cd FieldVector_v() const;
  CoCross CoCrossFor(PolarizationReference reference) const;
};

class PatternProbe {
 public:
  // currents_a: one terminal current per dipole (A peak); radiated_power_w: the
  // closed-form P of these currents (PatternResult).
  PatternProbe(const Array& array, const Eigen::VectorXcd& currents_a, double radiated_power_w);

  std::vector<ProbeSample> At(const std::vector<Vec3>& r_hat) const;
  ProbeSample At(const Vec3& r_hat) const;
  // The exact (direct) sums whatever the batch's size (At may take the fast path for a
  // large batch of a large array), threaded from kParallelBatchDirections on: for
  // refinements run in lockstep, whose batches gather the rounds of many searches and
  // must give each direction the value it would get alone.
  std::vector<ProbeSample> AtExact(const std::vector<Vec3>& r_hat) const;
  double DirectivityAt(const Vec3& r_hat) const { return At(r_hat).directivity; }
  // Values for the inner rounds of the searches, never reported: on arrays of at
  // least kSearchFastSources sources (images counted), the fast transform's at 1e-14 of
  // sum |I Le| (FieldPlan::ExecuteAtFast: the currents' grid made once, then O(kernel
  // points) a direction instead of O(sources)): the lattice transform on a lattice,
  // type 3 elsewhere where the cost model prices it well below the exact sums;
  // otherwise AtExact's. A direction gets the same value in any batch. Counted apart from the
  // exact evaluations (search_evaluations).
  std::vector<ProbeSample> AtSearch(const std::vector<Vec3>& r_hat) const;
  // The memory AtSearch's transform keeps for `array` (bytes; 0 where the searches run
  // on exact sums): the run estimate's analysis term. O(sources), nothing summed.
  static double SearchBytes(const Array& array);
  // AtSearch gives the exact sums (no transform here).
  bool search_is_exact() const { return !Search().plan; }
  // A bound on |rE - exact rE| (V) of every AtSearch value; 0 when they are exact.
  double search_error_v() const { return Search().error_v; }

  // Directivity of a field component c (V): 4 pi |c|^2 / (2 eta0 P).
  double DirectivityOf(Complex component_v) const { return per_v2_ * std::norm(component_v); }
  // The numerical floor of these currents (FieldFloor_v, engine/rounding_floor.h), V.
  double floor_v() const { return floor_v_; }
  bool NoFieldAt(const Vec3& r_hat) const;
  const Array& array() const { return array_; }
  // Directions evaluated so far (all calls). At and AtExact may be called from several
  // threads at once; read this outside them.
  std::size_t evaluations() const { return evaluations_; }
  // Directions AtSearch evaluated by the lattice transform (not counted above).
  std::size_t search_evaluations() const { return search_evaluations_; }

 private:
  std::vector<ProbeSample> Evaluate(const std::vector<Vec3>& r_hat, bool allow_fast) const;
  static void AnglesOfAll(const std::vector<Vec3>& r_hat, std::vector<double>* theta,
                          std::vector<double>* phi);
  // The samples of a field at these angles, floored as the grid is.
  std::vector<ProbeSample> Samples(const FarField& f, const std::vector<double>& theta,
                                   const std::vector<double>& phi) const;

  Array array_;
  Eigen::VectorXcd currents_;
  std::shared_ptr<const FieldPlan> plan_;  // the sources, built once
  // AtSearch's lattice transform, made on first use (probes that never search, as the
  // tolerance trials' and the plots', pay nothing for it); copies share it.
  struct SearchPlan {
    std::once_flag once;
    std::shared_ptr<const FieldPlan> plan;  // null: AtSearch is AtExact
    double error_v = 0.0;
  };
  const SearchPlan& Search() const;
  // The plan AtSearch reads for `array` (null: the exact sums).
  static std::shared_ptr<const FieldPlan> SearchPlanFor(const Array& array);
  std::shared_ptr<SearchPlan> search_ = std::make_shared<SearchPlan>();
  mutable std::size_t search_evaluations_ = 0;
  double per_v2_ = 0.0;  // 4 pi / (2 eta0 P), 1/V^2
  double floor_v_ = 0.0;
  mutable std::size_t evaluations_ = 0;
};

}  // namespace lobecast
