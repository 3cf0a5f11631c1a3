// Exact pattern values in arbitrary directions (pattern_probe.h).
#include "engine/analysis/pattern_probe.h"

#include <cmath>

#include <Eigen/Geometry>

#include "engine/ground.h"
#include "engine/intensity.h"
#include "engine/rounding_floor.h"

namespace lobecast {
namespace {

// Batches of at least this many directions, of arrays of at least this many sources
// (images counted), go through a FieldPlan of their own with the auto method: the
// fast path's error (1e-9 of the batch's largest |rE|) does not move what these
// batches decide (which samples bracket a beam edge, a null or an axial-ratio edge;
// the sequential refinements after them stay exact), and below these sizes the direct
// sum is the cheaper route anyway (engine/field/method_cost.cpp).
constexpr std::size_t kFastBatchDirections = 4096;
// Smaller batches run on one thread (PatternProbe::At).
constexpr std::size_t kParallelBatchDirections = 1024;
constexpr std::size_t kFastBatchSources = 8192;
// Arrays of at least this many sources (images counted) on a lattice run the searches'
// inner rounds on the lattice transform (AtSearch): its grid, made once, costs about
// as many FFT points as sources, after which a direction costs the kernel's points
// (w^2, about 300 at 1e-14) against an exact sum's O(sources); the searches evaluate
// tens of thousands of directions.
constexpr std::size_t kSearchFastSources = 8192;
// The directions an analysis evaluates in its searches, about (10^5: 155 000 on 10^6
// random dipoles, 55 000 on 1024): what type 3's grid is priced against.
constexpr double kSearchDirections = 1e5;
// AtSearch's transform tolerance, relative to sum |I Le| (the finest the NUFFT takes):
// its bound (10x, the error model) stays far below the 1e-20 of the peak intensity at
// which the null search calls a level zero.
constexpr double kSearchTolerance = 1e-14;

}  // namespace

SphericalAngles AnglesOf(const Vec3& r) {
  SphericalAngles s;
  const double rho = std::hypot(r.x(), r.y());
  s.theta_rad = std::atan2(rho, r.z());
  if (rho > 0.0) {
    s.phi_rad = std::atan2(r.y(), r.x());
    if (s.phi_rad < 0.0) s.phi_rad += 2.0 * kPi;
    if (s.phi_rad >= 2.0 * kPi) s.phi_rad = 0.0;
  }
  return s;
}

double AngleBetween(const Vec3& a, const Vec3& b) {
  return std::atan2(a.cross(b).norm(), a.dot(b));
}

Vec3 GreatCirclePoint(const Vec3& from, const Vec3& tangent, double angle_rad) {
  return std::cos(angle_rad) * from + std::sin(angle_rad) * tangent;
}

Vec3 AlongGreatCircle(const Vec3& from, const Vec3& tangent, double angle_rad) {
  return GreatCirclePoint(from, tangent, angle_rad).normalized();
}

LocalChart::LocalChart(const Vec3& origin) : origin_(origin.normalized()) {
  const SphericalAngles s = AnglesOf(origin_);
  e1_ = ThetaHatAt(s.theta_rad, s.phi_rad);
  e2_ = PhiHatAt(s.phi_rad);
}

Vec3 LocalChart::At(double a, double b) const {
  const double rho = std::hypot(a, b);
  if (rho == 0.0) return origin_;
  return AlongGreatCircle(origin_, (a * e1_ + b * e2_) / rho, rho);
}

Eigen::Vector3cd ProbeSample::FieldVector_v() const {
  return e_theta * ThetaHatAt(theta_rad, phi_rad).cast<Complex>() +
         e_phi * PhiHatAt(phi_rad).cast<Complex>();
}

CoCross ProbeSample::CoCrossFor(PolarizationReference reference) const {
  return CoCrossOf(e_theta, e_phi, phi_rad, reference, floor_v);
}

PatternProbe::PatternProbe(const Array& array, const Eigen::VectorXcd& currents_a,
                           double radiated_power_w)
    : array_(array),
      currents_(currents_a),
      // Sources only: every At() call brings its own directions (direct sums, one
      // thread; large batches get a plan of their own).
      plan_(std::make_shared<const FieldPlan>(array, Directions::FromAngles({}, {}),
                                              FieldOptions{1, FieldMethod::kDirect})),
      per_v2_(DirectivityPerSquaredField(radiated_power_w)),
      floor_v_(FieldFloor_v(array, currents_a)) {}

std::shared_ptr<const FieldPlan> PatternProbe::SearchPlanFor(const Array& array) {
  const std::size_t sources = array.size() * (array.ground == Ground::kNone ? 1 : 2);
  if (sources < kSearchFastSources) return nullptr;
  FieldOptions o;
  o.method = FieldMethod::kFast;
  o.fixed_pass_tolerance = kSearchTolerance;
  // A few directions over the sphere, so that the choice of transform sees the
  // extent of the directions the searches take (type 3's grid grows with it; with
  // none it would look free), and type 3 takes any direction (the box of these).
  std::vector<double> theta, phi;
  for (int i = 0; i <= 6; ++i)
    for (int j = 0; j < 12; ++j) {
      theta.push_back(i * kPi / 6);
      phi.push_back(j * kPi / 6);
    }
  auto p = std::make_shared<const FieldPlan>(array, Directions::FromAngles(theta, phi), o);
  if (!p->probes_fast()) return nullptr;
  // Type 3's grid grows with the aperture, not with the sources: on a sparse or deep
  // array it can cost more time (or memory) than the exact sums it would spare. It is
  // taken where the cost model prices the directions an analysis searches well below
  // their exact sums (a lattice's grid holds about a point per source: always).
  if (p->fast_transform() == FastTransform::kType3 &&
      !(p->EstimatedSeconds(kSearchDirections, FieldMethod::kFast) <
        0.5 * p->EstimatedSeconds(kSearchDirections, FieldMethod::kDirect)))
    return nullptr;
  return p;
}

double PatternProbe::SearchBytes(const Array& array) {
  const std::shared_ptr<const FieldPlan> p = SearchPlanFor(array);
  return p ? p->KeptProbeBytes() : 0.0;
}

const PatternProbe::SearchPlan& PatternProbe::Search() const {
  std::call_once(search_->once, [&] {
    std::shared_ptr<const FieldPlan> p = SearchPlanFor(array_);
    if (!p) return;
    // The currents' grid, made here once, and the bound of its values.
    p->ExecuteAtFast(currents_, Directions::FromAngles({}, {}), &search_->error_v);
    search_->plan = std::move(p);
  });
  return *search_;
}

bool PatternProbe::NoFieldAt(const Vec3& r) const {
  return BelowGround(array_.ground, AnglesOf(r).theta_rad);
}

std::vector<ProbeSample> PatternProbe::At(const std::vector<Vec3>& r_hat) const {
  return Evaluate(r_hat, true);
}

std::vector<ProbeSample> PatternProbe::AtExact(const std::vector<Vec3>& r_hat) const {
  return Evaluate(r_hat, false);
}

std::vector<ProbeSample> PatternProbe::Evaluate(const std::vector<Vec3>& r_hat,
                                                bool allow_fast) const {
  if (r_hat.empty()) return {};
  std::vector<double> theta, phi;
  AnglesOfAll(r_hat, &theta, &phi);
  // Exact sums (null depths reach rounding) on the plan built once for the sources; a
  // large batch of a large array (a cut's samples, the axial-ratio sampling) gets a plan
  // of its own, whose auto choice takes the fast path where it is cheaper.
  // Batches below kParallelBatchDirections run on one thread: the refinements'
  // thousands of small calls would otherwise keep a second thread spinning between
  // them (OpenMP's wait policy) for no gain.
  FarField f;
  if (r_hat.size() < kParallelBatchDirections) {
    f = plan_->ExecuteAt(currents_, Directions::FromAngles(theta, phi));
  } else {
    FieldOptions o;
    o.method = allow_fast && r_hat.size() >= kFastBatchDirections &&
                       plan_->num_sources() >= kFastBatchSources
                   ? FieldMethod::kAuto
                   : FieldMethod::kDirect;
    f = FieldPlan(array_, Directions::FromAngles(theta, phi), o).Execute(currents_);
  }
  // Callers may evaluate from several threads at once (RefineMaxima's polish).
#pragma omp atomic
  evaluations_ += r_hat.size();
  return Samples(f, theta, phi);
}

void PatternProbe::AnglesOfAll(const std::vector<Vec3>& r_hat, std::vector<double>* theta,
                               std::vector<double>* phi) {
  theta->resize(r_hat.size());
  phi->resize(r_hat.size());
  for (std::size_t i = 0; i < r_hat.size(); ++i) {
    const SphericalAngles s = AnglesOf(r_hat[i]);
    (*theta)[i] = s.theta_rad;
    (*phi)[i] = s.phi_rad;
  }
}

std::vector<ProbeSample> PatternProbe::Samples(const FarField& f, const std::vector<double>& theta,
                                               const std::vector<double>& phi) const {
  std::vector<ProbeSample> out(theta.size());
  for (std::size_t i = 0; i < theta.size(); ++i) {
    ProbeSample& s = out[i];
    s.theta_rad = theta[i];
    s.phi_rad = phi[i];
    // Floored as the grid is (PatternResult::field_floor_v): the same exact zeros.
    s.e_theta = Floored(f.e_theta[static_cast<Eigen::Index>(i)], floor_v_);
    s.e_phi = Floored(f.e_phi[static_cast<Eigen::Index>(i)], floor_v_);
    s.floor_v = floor_v_;
    s.directivity = per_v2_ * (std::norm(s.e_theta) + std::norm(s.e_phi));
    s.no_field = BelowGround(array_.ground, theta[i]);
  }
  return out;
}

std::vector<ProbeSample> PatternProbe::AtSearch(const std::vector<Vec3>& r_hat) const {
  const std::shared_ptr<const FieldPlan>& plan = Search().plan;
  if (!plan) return AtExact(r_hat);
  if (r_hat.empty()) return {};
  std::vector<double> theta, phi;
  AnglesOfAll(r_hat, &theta, &phi);
  const FarField f = plan->ExecuteAtFast(currents_, Directions::FromAngles(theta, phi), nullptr);
#pragma omp atomic
  search_evaluations_ += r_hat.size();
  return Samples(f, theta, phi);
}

ProbeSample PatternProbe::At(const Vec3& r_hat) const { return At(std::vector<Vec3>{r_hat})[0]; }

}  // namespace lobecast
