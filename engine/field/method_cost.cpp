// The cost model behind FieldMethod::kAuto and the choice of fast transform
// (far_field.h): estimated seconds of the direct sum, type 3 and the lattice
// transform for a plan.
#include <algorithm>
#include <array>
#include <cmath>
#include <vector>

#include "engine/field/far_field.h"
#include "engine/field/fast_path.h"
#include "engine/field/lattice.h"
#include "engine/field/nufft.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

// Cost model for kAuto: CPU seconds per unit on one core. The direct sum's pair
// rates depend on which kernel clone runs (kernel_clones.h): measured on 2.1 GHz
// AMD EPYC cores, AVX-512 clone with tests/bench/field_bench.cpp, AVX2 clone with
// `lobecast compute --threads 1` on random 1024- to 16384-dipole arrays (field
// seconds, least of three; tests/bench/RESULTS.md, "On a machine without
// AVX-512"). The baseline clone was not measured: half the AVX2 rates, a guess.
// The fast transforms' constants were fitted on the AVX2 machine to planar and
// cube arrays and lattices (type 3 takes ~1.3 us a direction on a planar array,
// and 1.5 us (planar) to 8 us (3-D) a source to spread; the lattice transform
// ~1.25 us a direction and no spreading); on the AVX-512 machine they price type 3
// at most a little high.
struct PairRates {
  double collinear, general;  // source-direction pairs a second
};
constexpr PairRates kPairsAvx512{6.5e8, 4.5e8};
constexpr PairRates kPairsAvx2{4.0e8, 3.4e8};
constexpr PairRates kPairsBaseline{2.0e8, 1.7e8};
constexpr double kSecondsPerKernelPoint = 1.6e-9;    // interpolate, per component
constexpr double kSecondsPerSpreadSource = 4.6e-7;   // type 3's spread (one thread): per source
constexpr double kSecondsPerSpreadPoint = 3.0e-9;    // and per kernel point and component
constexpr double kSecondsPerFftPointLog = 1.0e-9;    // per grid point and log2(size), per component
constexpr double kSecondsPerTargetPass = 5.0e-7;     // kernel transforms, phases, copies
constexpr double kSecondsPerLatticeTarget = 4.0e-7;  // lattice: phases, projection, copies
constexpr double kSecondsPerLayerTarget = 8.0e-8;    // lattice: one layer's phase and sum
constexpr double kMaxFastGridBytes = 4.0 * (1ull << 30);

// The clone the loader picks on this CPU, near enough for pricing: x86-64-v4 is
// AVX-512 F/BW/CD/DQ/VL, v3 AVX2 with FMA (feature names both GCC and Clang know).
const PairRates& RunningPairRates() {
#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
  static const PairRates& rates = []() -> const PairRates& {
    __builtin_cpu_init();
    if (__builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512bw") &&
        __builtin_cpu_supports("avx512cd") && __builtin_cpu_supports("avx512dq") &&
        __builtin_cpu_supports("avx512vl"))
      return kPairsAvx512;
    if (__builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma")) return kPairsAvx2;
    return kPairsBaseline;
  }();
  return rates;
#else
  return kPairsAvx2;  // other targets: not measured; the AVX2 figures as a guess
#endif
}

}  // namespace

bool FastPays(double fast_seconds, double direct_seconds) {
  return fast_seconds < kAutoFastShare * direct_seconds;
}

double FieldPlan::EstimatedDirectSeconds(double direction_scale) const {
  std::size_t live = 0;
  for (unsigned char z : dirs_.zeroed) live += z ? 0 : 1;
  const PairRates& rates = RunningPairRates();
  const double per = 1.0 / (collinear_ ? rates.collinear : rates.general);
  const int threads = ResolveThreads(num_threads_);
  return direction_scale * static_cast<double>(live) * static_cast<double>(num_sources()) * per /
         threads;
}

// A scout pass, then one about three digits tighter than asked (the peak is
// below sum |c|, often well below for irregular currents, and the error model
// carries a factor 10): the tolerances both fast estimates cost.
// With a fixed pass tolerance, that one pass.
std::vector<double> PassTolerances(double tolerance_relative, double fixed_pass_tolerance) {
  if (fixed_pass_tolerance > 0) return {fixed_pass_tolerance};
  return {kScoutTolerance, std::max(1e-14, 1e-3 * tolerance_relative)};
}

double FieldPlan::EstimatedType3Seconds(double direction_scale) const {
  const double comps = collinear_ ? 1.0 : 3.0;
  const int threads = ResolveThreads(num_threads_);
  const double nd = direction_scale * static_cast<double>(num_directions());
  double total = 0;
  for (double eps : PassTolerances(tolerance_relative_, fixed_pass_tolerance_)) {
    const NufftGeometry g = Nufft3::GeometryFor(source_pos_, dirs_.k_r_hat, eps);
    if (g.fft_points() * comps * 16.0 > kMaxFastGridBytes) return 1e300;
    const double spread = static_cast<double>(num_sources()) * g.kernel_points() * comps;
    const double interp = nd * g.kernel_points() * comps / threads;
    const double fft = g.fft_points() * std::log2(std::max(2.0, g.fft_points())) * comps;
    total += static_cast<double>(num_sources()) * kSecondsPerSpreadSource +
             spread * kSecondsPerSpreadPoint + interp * kSecondsPerKernelPoint +
             fft * kSecondsPerFftPointLog + nd * kSecondsPerTargetPass / threads;
  }
  return total;
}

double FieldPlan::EstimatedLatticeSeconds(double direction_scale) const {
  if (!lattice_) return 1e300;
  const double comps = collinear_ ? 1.0 : 3.0;
  const int threads = ResolveThreads(num_threads_);
  const double nd = direction_scale * static_cast<double>(num_directions());
  double total = 0;
  for (double eps : PassTolerances(tolerance_relative_, fixed_pass_tolerance_)) {
    const LatticeShape shape = LatticeSum::ShapeFor(*lattice_, eps);
    const NufftGeometry& g = shape.per_layer;
    if (g.fft_points() * comps * 16.0 > kMaxFastGridBytes) return 1e300;
    const double interp = nd * g.kernel_points() * comps / threads;
    const double fft = g.fft_points() * std::log2(std::max(2.0, g.fft_points())) * comps;
    total += shape.layers * (interp * kSecondsPerKernelPoint + fft * kSecondsPerFftPointLog +
                             nd * comps * kSecondsPerLayerTarget / threads) +
             nd * kSecondsPerLatticeTarget / threads;
  }
  return total;
}

double FieldPlan::EstimatedSeconds(double num_directions, FieldMethod method) const {
  const double scale = this->num_directions() ? num_directions / this->num_directions() : 0.0;
  const double direct = EstimatedDirectSeconds(scale);
  if (method == FieldMethod::kDirect) return direct;
  const double fast = fast_transform_ == FastTransform::kLattice ? EstimatedLatticeSeconds(scale)
                                                                 : EstimatedType3Seconds(scale);
  if (method == FieldMethod::kFast) return fast;
  return FastPays(fast, direct) ? fast : direct;
}

double FieldPlan::EstimatedBytes(double num_directions, FieldMethod method) const {
  // Per direction: the plan's unit vectors (73 bytes), the field kept and handed
  // out (64), and on the fast path the transform's targets, factors and output
  // (about 100); the fast path's FFT grid besides.
  const double direct = 137.0 * num_directions;
  if (method == FieldMethod::kDirect) return direct;
  if (method == FieldMethod::kAuto) {
    const double scale = this->num_directions() ? num_directions / this->num_directions() : 0.0;
    const double fast = fast_transform_ == FastTransform::kLattice ? EstimatedLatticeSeconds(scale)
                                                                   : EstimatedType3Seconds(scale);
    if (!FastPays(fast, EstimatedDirectSeconds(scale))) return direct;
  }
  const double comps = collinear_ ? 1.0 : 3.0;
  const double eps = PassTolerances(tolerance_relative_, fixed_pass_tolerance_).back();
  const double grid = fast_transform_ == FastTransform::kLattice
                          ? LatticeSum::ShapeFor(*lattice_, eps).per_layer.fft_points()
                          : Nufft3::GeometryFor(source_pos_, dirs_.k_r_hat, eps).fft_points();
  return 237.0 * num_directions + 16.0 * comps * grid;
}

double FieldPlan::KeptProbeBytes() const {
  if (!probes_fast()) return 0.0;
  const double comps = collinear_ ? 1.0 : 3.0;
  const double eps = PassTolerances(tolerance_relative_, fixed_pass_tolerance_).back();
  // The plan's and the transform's per-source data (positions, moments, phases, the
  // strengths handed in and their phased copy, the grid coordinates while the grid is
  // made: about 250 bytes a source), then the grids.
  const double sources = 250.0 * static_cast<double>(num_sources());
  if (fast_transform_ == FastTransform::kLattice) {
    const LatticeShape shape = LatticeSum::ShapeFor(*lattice_, eps);
    return sources + 16.0 * comps * shape.layers * shape.per_layer.fft_points();
  }
  // Type 3: the kept FFT grid and, while it is made, the spread grid beside it.
  const NufftGeometry g = Nufft3::GeometryFor(source_pos_, dirs_.k_r_hat, eps);
  const double spread = static_cast<double>(g.spread_size[0]) * g.spread_size[1] * g.spread_size[2];
  return sources + 16.0 * comps * (g.fft_points() + spread);
}

}  // namespace lobecast
