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

// Cost model for kAuto: CPU seconds per unit on one core of the development
// machine (AMD EPYC at 2.1 GHz, AVX-512 clone), from tests/bench/field_bench.cpp
// process CPU times. Only their ratios matter; the 0.5 margin in the choice
// absorbs the model's roughness.
constexpr double kSecondsPerPairCollinear = 1.0 / 6.5e8;
constexpr double kSecondsPerPairGeneral = 1.0 / 4.5e8;
constexpr double kSecondsPerKernelPoint = 2.0e-9;    // spread or interpolate, per component
constexpr double kSecondsPerFftPointLog = 1.0e-9;    // per grid point and log2(size), per component
constexpr double kSecondsPerTargetPass = 1.0e-6;     // kernel transforms, phases, copies
constexpr double kSecondsPerLatticeTarget = 6.0e-7;  // lattice: phases, projection, copies
constexpr double kSecondsPerLayerTarget = 8.0e-8;    // lattice: one layer's phase and sum
constexpr double kMaxFastGridBytes = 4.0 * (1ull << 30);

}  // namespace

double FieldPlan::EstimatedDirectSeconds(double direction_scale) const {
  std::size_t live = 0;
  for (unsigned char z : dirs_.zeroed) live += z ? 0 : 1;
  const double per = collinear_ ? kSecondsPerPairCollinear : kSecondsPerPairGeneral;
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
    total += (spread + interp) * kSecondsPerKernelPoint + fft * kSecondsPerFftPointLog +
             nd * kSecondsPerTargetPass / threads;
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
  return fast < 0.5 * direct ? fast : direct;
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
    if (!(fast < 0.5 * EstimatedDirectSeconds(scale))) return direct;
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
