// Exact far field of an array of elemental dipoles by direct superposition
// (CONVENTIONS §1; Balanis 4th ed. sec. 4.2 for one dipole):
//
//   rE(r_hat) = (j w mu0 / 4 pi) sum_n I_n Le_n [r_hat x (r_hat x u_n)] exp(+j k r_hat . r_n)
//
// reported as rE_theta, rE_phi in volts. The plan holds everything that does not
// depend on the currents (source moments, directions, projection vectors), so it
// can be executed for many current vectors (synthesis, tolerance studies).
//
// Two methods compute the same sum:
//  - direct: every source-direction pair, vectorized (inlined sincos,
//    engine/field/sincos.h) and threaded over directions; exact to rounding, O(N M);
//  - fast: a type-3 non-uniform FFT with the exponential-of-semicircle kernel
//    (engine/field/nufft.h; Barnett, Magland and af Klinteberg, SIAM J. Sci. Comput.
//    41, 2019), O(N + M + grid log grid) with a kernel-width factor, accurate to
//    a requested tolerance relative to the pattern peak. Sources on a lattice
//    take a type-2 transform over the lattice sites instead (engine/field/lattice.h),
//    which needs no spreading and whose grid does not grow with the pitch. It
//    pays off for large arrays on dense grids; auto picks it only when its
//    estimated cost is well below the direct one.
#pragma once

#include <array>
#include <cstddef>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

struct AxisLattice;  // engine/field/lattice.h
class PointSum;      // engine/field/nufft.h

struct FarField {
  Eigen::VectorXcd e_theta;  // rE_theta per direction, V
  Eigen::VectorXcd e_phi;    // rE_phi per direction, V
  // The error bound the field met, relative to its peak over the plan's
  // directions (<= FieldOptions::tolerance_relative): the fast path's; 0 for an
  // exact (direct) sum.
  double error_bound_relative = 0;
  std::size_t size() const { return static_cast<std::size_t>(e_theta.size()); }
};

// y = A^H W x per dipole: FieldPlan::ExecuteAdjoint's result.
struct DipoleSums {
  // One per dipole, in the units of the field times ohms (A's entries are V per A).
  Eigen::VectorXcd values;
  // Fast path: the error bound met, relative to max_n |y_n| (<= the plan's
  // tolerance_relative); 0 for an exact (direct) sum.
  double error_bound_relative = 0;
};

enum class FieldMethod { kDirect, kFast, kAuto };
// Which transform the fast path runs: a type-3 NUFFT for any positions, or a
// type-2 NUFFT over the sites when every source sits on an axis-aligned
// lattice (engine/field/lattice.h; grid arrays, also thinned, offset-row and over ground).
enum class FastTransform { kNone, kType3, kLattice };
std::string_view ToString(FastTransform t);  // "none", "type-3", "lattice"
std::string_view ToString(FieldMethod m);    // "direct", "fast", "auto"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<FieldMethod> FieldMethodFromString(std::string_view s);

// kAuto's margin: the fast path is taken when the cost model (method_cost.cpp)
// prices it below this share of the direct sum. The model is within about 25 % of
// measured times on the machines it was fitted on (tests/bench/RESULTS.md), so a
// route it finds a third dearer is slower, and the exact sum is kept where the two
// are near.
inline constexpr double kAutoFastShare = 0.75;
bool FastPays(double fast_seconds, double direct_seconds);

struct FieldOptions {
  // OpenMP threads across directions; 0 uses the OpenMP default. The result does
  // not depend on it: each direction's sum runs over the sources in a fixed order
  // (direct), and the fast path's grid sums run in a fixed order too.
  int num_threads = 0;
  // kAuto takes the fast path only when its estimated cost is below
  // kAutoFastShare of the direct one (FastPays), so small arrays and coarse grids
  // always get the exact sum.
  FieldMethod method = FieldMethod::kAuto;
  // Fast path only: the largest error in |rE| over all plan directions, relative
  // to the largest |rE| over the plan's directions. 1e-9 keeps patterns exact
  // to far below any plotting or side-lobe resolution. The fast path first runs
  // a cheap 1e-4 pass to find the peak, then one tight enough for it; when the
  // peak is so far below sum |I Le| that double precision cannot reach the
  // tolerance, it sums directly instead. The direct path ignores it.
  double tolerance_relative = 1e-9;
  // Fast path: take the lattice transform when the sources sit on a lattice and
  // it is estimated cheaper; false always runs type 3 (for comparisons).
  bool use_lattice = true;
  // Fast path only: when > 0, one transform pass at this tolerance (relative to
  // sum |I Le|, rounded down to a power of ten, 1e-14 to 1e-1) instead of the
  // scout pass and the search relative to the peak, and no direct fallback; the
  // auto choice costs that one pass. For quadratures of quadratic forms
  // (engine/power/power_quadrature.h), whose error is set by an absolute bound on
  // every sample rather than one relative to the peak; error_bound_relative still
  // reports the bound met relative to the peak (infinite when the peak is 0), and
  // tolerance_relative is then unused.
  double fixed_pass_tolerance = 0;

  // False (with a message naming the field, the value and the rule) unless
  // num_threads >= 0, 1e-14 <= tolerance_relative <= 1e-2 and
  // fixed_pass_tolerance is 0 or 1e-14 to 1e-1.
  bool IsValid(std::string* why) const;
};

class FieldPlan {
 public:
  // Throws InvalidArgument if the array is invalid (see Validate in types.h).
  FieldPlan(const Array& array, const Directions& directions, const FieldOptions& options = {});

  // currents_a: one complex peak current per dipole (images follow automatically).
  FarField Execute(const Eigen::VectorXcd& currents_a) const;
  // Fills a caller-owned FarField (resized as needed) for directions
  // [first, first + out.size()) -- lets callers process a grid in chunks.
  // The fast path transforms all plan directions at once: its first call for a
  // current vector computes and keeps the whole field (the output's size), and
  // later chunks for the same currents are copies. Thread-safe.
  void ExecuteRange(const Eigen::VectorXcd& currents_a, std::size_t first, std::size_t count,
                    FarField& out) const;

  // The exact (direct) sum at directions of the caller's, reusing the plan's
  // sources: for many small evaluations (off-grid searches), where building a
  // plan per call would cost O(N) setup each time. Any plan can serve, one built
  // on no directions too. Thread-safe.
  FarField ExecuteAt(const Eigen::VectorXcd& currents_a, const Directions& directions) const;
  // The fast path at directions of the caller's, for many small evaluations at one
  // current vector (off-grid searches of large arrays): the transform's grid (lattice
  // or type 3) is made once per current vector (kept for the next call with the same
  // currents), then a direction costs O(kernel points), not O(sources). Type 3 takes
  // directions within the box of the plan's own (a plan on directions spanning the
  // sphere's box takes any).
  // One pass at the plan's fixed_pass_tolerance (tolerance_relative when it is 0),
  // rounded down to a power of ten; *error_bound_v gets the bound on |rE - exact rE|
  // (V) of every direction, the fast path's error model on sum |I Le| plus the
  // lattice placement. A direction's value does not depend on the others of the
  // call. Only where probes_fast(); throws InternalError elsewhere. Thread-safe.
  FarField ExecuteAtFast(const Eigen::VectorXcd& currents_a, const Directions& directions,
                         double* error_bound_v) const;
  // The plan took the fast path (ExecuteAtFast).
  bool probes_fast() const { return fast_transform_ != FastTransform::kNone; }

  // The adjoint of Execute. A is the linear map currents -> (rE_theta, rE_phi) at
  // the plan's directions that Execute applies (images fold back onto their
  // dipoles; directions the ground zeroes are zero rows); with x = field (one
  // value per plan direction) and W = diag(weights) (the identity when weights
  // is empty), this returns y = A^H W x:
  //
  //   y_n = sum_i w_i [conj(A_theta(i, n)) x_theta_i + conj(A_phi(i, n)) x_phi_i].
  //
  // For least squares (the gradient A^H W (A I - target)) and for quadratic forms
  // by quadrature, e.g. P = (1 / 2 eta0) sum_i w_i |rE_i|^2 = 1/2 I^H R I with
  // R ~ A^H W A / eta0 (w_i the solid-angle weights). Direct path: exact to
  // rounding, vectorized like Execute, threaded over sources; the result does not
  // depend on the thread count. Fast path: the transforms' exact adjoints, the
  // same tolerance search and error bound as Execute (relative to max_n |y_n|),
  // and the same fallback to the direct sum. Thread-safe.
  DipoleSums ExecuteAdjoint(const FarField& field, const Eigen::VectorXd& weights = {}) const;
  // The same for Cartesian field vectors rE (3 x directions): x_theta = theta_hat . rE,
  // x_phi = phi_hat . rE (A's values are transverse, so a radial part adds nothing).
  DipoleSums ExecuteAdjoint(const Eigen::Matrix3Xcd& field,
                            const Eigen::VectorXd& weights = {}) const;

  std::size_t num_dipoles() const { return num_dipoles_; }
  std::size_t num_sources() const { return static_cast<std::size_t>(source_pos_.cols()); }
  std::size_t num_directions() const { return static_cast<std::size_t>(dirs_.k_r_hat.cols()); }

  // kDirect or kFast: what options.method (kAuto resolved) led to.
  FieldMethod method_used() const { return method_used_; }
  // The cost model's seconds (threads counted) and peak bytes of executing the
  // plan, as if it had num_directions directions spread as its own are (the
  // transform's grid as it is, the per-direction work scaled): for jobs that plan
  // a sample of their directions to cost them (engine/power/power_cost.h). method:
  // the direct sum, the fast path, or what auto would pick at that size. A plan
  // built with kDirect, or that chose it, costs its fast path by type 3.
  double EstimatedSeconds(double num_directions, FieldMethod method = FieldMethod::kAuto) const;
  double EstimatedBytes(double num_directions, FieldMethod method = FieldMethod::kAuto) const;
  // The grid ExecuteAtFast keeps (bytes): the transform's FFT grid of the currents at
  // the plan's pass tolerance, every layer of a layered lattice; 0 where !probes_fast().
  double KeptProbeBytes() const;
  // The fast path's transform (kNone for the direct path): the lattice one when
  // the sources sit on a lattice and it is estimated cheaper than type 3.
  FastTransform fast_transform() const { return fast_transform_; }

 private:
  struct FastCache;  // engine/field/fast_path.h

  // Per-direction data the direct sum reads: k r_hat, theta_hat, phi_hat, zeroed.
  struct DirectionData {
    Eigen::Matrix3Xd k_r_hat, theta_hat, phi_hat;
    std::vector<unsigned char> zeroed;  // 1 where the ground forces E = 0
  };
  DirectionData MakeDirectionData(const Directions& directions) const;

  // The direct sums' source weights for one current vector (real and imaginary
  // parts of I times the signed moment, or of I), kept for the next call with the
  // same currents (a probe of a few directions at a time would rebuild them, O(N),
  // as often as it sums; direct_sum.cpp).
  struct SourceWeights;
  struct WeightCache;
  static std::shared_ptr<WeightCache> MakeWeightCache();
  std::shared_ptr<const SourceWeights> WeightsFor(const Eigen::VectorXcd& currents_a) const;

  // The exact sums (direct_sum.cpp).
  void ExecuteDirect(const Eigen::VectorXcd& currents_a, std::size_t first, std::size_t count,
                     FarField& out) const;
  void SumDirect(const Eigen::VectorXcd& currents_a, const DirectionData& dirs, std::size_t first,
                 std::size_t count, FarField& out) const;
  // y = A^H W x from v_i = w_i (theta_hat_i x_theta_i + phi_hat_i x_phi_i)
  // (3 x directions, zero where the ground zeroes the field):
  // y_n = j (w mu0 / 4 pi) sum over n's sources s of m_s . sum_i v_i exp(-j k_i . r_s).
  Eigen::VectorXcd AdjointDirect(const Eigen::Matrix3Xcd& v) const;

  // The fast path (fast_path.cpp).
  void ExecuteFast(const Eigen::VectorXcd& currents_a, std::size_t first, std::size_t count,
                   FarField& out) const;
  // The fast path's transform at tolerance eps (cached by its exponent); the
  // caller holds cache.mutex.
  std::shared_ptr<const PointSum> FastPlanLocked(FastCache& cache, double eps) const;
  // The fast transforms' strengths of these currents (sources x 1 collinear, else
  // x 3: I Le u per source); *l1 gets sum_s |I_s| |Le_s u_s|, which bounds every
  // component's sum.
  Eigen::MatrixXcd FastStrengths(const Eigen::VectorXcd& currents_a, double* l1) const;
  DipoleSums AdjointFast(const Eigen::Matrix3Xcd& v) const;

  // The cost model behind kAuto and the transform choice (method_cost.cpp).
  // direction_scale: as if the plan had that many times its directions.
  double EstimatedDirectSeconds(double direction_scale = 1.0) const;
  double EstimatedType3Seconds(double direction_scale = 1.0) const;
  double EstimatedLatticeSeconds(double direction_scale = 1.0) const;

  std::size_t num_dipoles_ = 0;
  Ground ground_ = Ground::kNone;
  double prefactor_ = 0.0;          // w mu0 / (4 pi)
  Eigen::Matrix3Xd source_pos_;     // m
  Eigen::Matrix3Xd source_moment_;  // Le * u, m
  std::vector<int> source_dipole_;  // which dipole's current drives the source
  // When every moment is parallel to one axis (a common case: all dipoles along
  // z, with or without ground), each source carries a signed scalar moment
  // along it, and the sum needs one complex accumulator instead of three.
  bool collinear_ = false;
  Vec3 common_axis_ = Vec3::UnitZ();
  std::vector<double> signed_moment_m_;     // Le * (u . axis), collinear only
  std::array<std::vector<double>, 6> soa_;  // x, y, z (m); moment x, y, z (m, general only)
  double tolerance_relative_ = 1e-9;
  double fixed_pass_tolerance_ = 0;  // FieldOptions::fixed_pass_tolerance
  FieldMethod method_used_ = FieldMethod::kDirect;
  FastTransform fast_transform_ = FastTransform::kNone;
  // The sources' lattice, when they have one (fast path only): its phase error
  // k max|x - site| is added to the fast path's error bound.
  std::shared_ptr<const AxisLattice> lattice_;
  double lattice_phase_error_ = 0;
  std::shared_ptr<FastCache> fast_;       // shared by copies; keyed on currents
  std::shared_ptr<WeightCache> weights_;  // shared by copies; keyed on currents
  double wavenumber_rad_m_ = 0;
  int num_threads_ = 0;
  DirectionData dirs_;  // the plan's directions
};

}  // namespace lobecast
