// Far-field throughput: a plain scalar std::complex std::exp loop, the direct
// path and the fast (NUFFT) path, for N dipoles on 1 deg and 0.25 deg full-sphere
// grids. Run through run_benchmarks.sh, which starts one process per case so that
// the peak resident memory (getrusage ru_maxrss) belongs to that case alone.
//
// Arrays (third argument, the layout):
//  0 jittered: N z-directed short dipoles on a square planar lattice of
//    half-wavelength pitch with a small random jitter in x and y (a large planar
//    array as built), random complex currents: the type-3 fast path;
//  1 general: every dipole tilted randomly and z jittered too: the three-component
//    kernels and a 3-D type-3 grid;
//  2 lattice: the same lattice without jitter: the lattice (type-2) fast path;
//  3 sparse lattice: pitch 2 wavelengths (a thinned-aperture or station layout).
// BM_FastType3 runs the lattice layouts with the lattice transform switched off,
// for the ratio between the two fast transforms. Huge direct and scalar cases run
// on an evenly strided subset of the grid (reported as "directions"), so pairs/s
// stays comparable.
#include <sys/resource.h>

#include <benchmark/benchmark.h>
#include <omp.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <memory>
#include <random>
#include <string>
#include <vector>

#include "engine/field/far_field.h"
#include "engine/field/lattice.h"
#include "engine/field/nufft.h"
#include "engine/grid.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

constexpr double kFrequency_hz = 1.0e9;

enum Layout { kJittered = 0, kGeneral = 1, kLattice = 2, kSparseLattice = 3 };

testing::TestArray PlanarArray(int n, int layout) {
  testing::TestArray a;
  a.frequency_hz = kFrequency_hz;
  const double lambda = a.wavelength_m();
  const int side = static_cast<int>(std::ceil(std::sqrt(static_cast<double>(n))));
  std::mt19937_64 rng(12345);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  const bool general = layout == kGeneral;
  const double jitter = layout == kJittered || general ? 0.05 : 0.0;
  const double pitch = layout == kSparseLattice ? 2.0 : 0.5;
  for (int i = 0; i < n; ++i) {
    Dipole d;
    // Planar (z = 0) for the collinear cases; the general cases also jitter z, so
    // the fast path needs a 3-D grid there.
    const double jx = jitter * u(rng), jy = jitter * u(rng), jz = general ? 0.05 * u(rng) : 0.0;
    d.position_m = Vec3((i % side) * pitch + jx, (i / side) * pitch + jy, jz) * lambda;
    d.orientation = general ? Vec3(u(rng), u(rng), u(rng)).normalized() : Vec3::UnitZ();
    d.length_m = 0.01 * lambda;
    a.Add(d, Complex(u(rng), u(rng)));
  }
  return a;
}

// Every stride-th direction of the grid, stride chosen so that directions * n <= max_pairs.
Directions GridDirections(double step_deg, double n, double max_pairs, std::size_t* full_size) {
  const AngularGrid g = AngularGrid::FromRanges({0, 180, step_deg}, {0, 360, step_deg});
  const Directions all = Directions::FromGrid(g);
  *full_size = all.size();
  const auto stride =
      static_cast<std::size_t>(std::max(1.0, std::ceil(all.size() * n / max_pairs)));
  if (stride == 1) return all;
  std::vector<double> th, ph;
  for (std::size_t i = 0; i < all.size(); i += stride)
    th.push_back(all.theta_rad(i)), ph.push_back(all.phi_rad(i));
  return Directions::FromAngles(th, ph);
}

void Finish(benchmark::State& state, double pairs_per_iteration, std::size_t directions) {
  rusage ru{};
  getrusage(RUSAGE_SELF, &ru);
  state.counters["pairs_per_s"] =
      benchmark::Counter(pairs_per_iteration, benchmark::Counter::kIsIterationInvariantRate);
  state.counters["directions"] = static_cast<double>(directions);
  state.counters["peak_MiB"] = static_cast<double>(ru.ru_maxrss) / 1024.0;
  state.counters["threads"] = omp_get_max_threads();
}

// The reference: what one would write first, std::exp of a std::complex per pair,
// threaded over directions like the engine.
void BM_ScalarLoop(benchmark::State& state) {
  const auto n = static_cast<int>(state.range(0));
  const double step = static_cast<double>(state.range(1)) / 100.0;
  const testing::TestArray a = PlanarArray(n, static_cast<int>(state.range(2)));
  std::size_t full = 0;
  const Directions dirs = GridDirections(step, n, 1.0e8, &full);
  const double k = a.wavenumber_rad_m();
  const auto m = static_cast<std::ptrdiff_t>(dirs.size());
  std::vector<Complex> et(dirs.size()), ep(dirs.size());
  for (auto _ : state) {
#pragma omp parallel for schedule(static)
    for (std::ptrdiff_t i = 0; i < m; ++i) {
      const auto ui = static_cast<std::size_t>(i);
      const Vec3 r = dirs.r_hat(ui);
      Complex mx = 0.0, my = 0.0, mz = 0.0;
      for (std::size_t j = 0; j < a.size(); ++j) {
        const Dipole& d = a.dipoles[j];
        const Complex w = a.currents[static_cast<Eigen::Index>(j)] * d.effective_length_m() *
                          std::exp(Complex(0.0, k * r.dot(d.position_m)));
        mx += w * d.orientation.x(), my += w * d.orientation.y(), mz += w * d.orientation.z();
      }
      const Vec3 t = dirs.theta_hat(ui), p = dirs.phi_hat(ui);
      et[ui] = t.x() * mx + t.y() * my + t.z() * mz;
      ep[ui] = p.x() * mx + p.y() * my + p.z() * mz;
    }
    benchmark::DoNotOptimize(et.data());
    benchmark::DoNotOptimize(ep.data());
  }
  Finish(state, static_cast<double>(n) * static_cast<double>(dirs.size()), dirs.size());
}

void BM_Direct(benchmark::State& state) {
  const auto n = static_cast<int>(state.range(0));
  const double step = static_cast<double>(state.range(1)) / 100.0;
  const testing::TestArray a = PlanarArray(n, static_cast<int>(state.range(2)));
  std::size_t full = 0;
  const Directions dirs = GridDirections(step, n, 4.0e9, &full);
  FieldOptions o;
  o.method = FieldMethod::kDirect;
  const FieldPlan plan(a, dirs, o);
  const Eigen::VectorXcd currents = a.currents;
  FarField f;
  for (auto _ : state) {
    plan.ExecuteRange(currents, 0, plan.num_directions(), f);
    benchmark::DoNotOptimize(f.e_theta.data());
  }
  Finish(state, static_cast<double>(n) * static_cast<double>(dirs.size()), dirs.size());
}

// Fast path on the whole grid, plan and execution both timed (the plan does the
// NUFFT's kernel-transform setup once per plan, so a user pays both). The error is
// measured against the direct sum on an evenly strided subset of 4000 directions,
// relative to the pattern peak.
void RunFast(benchmark::State& state, bool use_lattice) {
  const auto n = static_cast<int>(state.range(0));
  const double step = static_cast<double>(state.range(1)) / 100.0;
  const testing::TestArray a = PlanarArray(n, static_cast<int>(state.range(2)));
  std::size_t full = 0;
  const Directions dirs = GridDirections(step, 1.0, 1e300, &full);
  FieldOptions o;
  o.method = FieldMethod::kFast;
  o.use_lattice = use_lattice;
  const Eigen::VectorXcd currents = a.currents;
  FarField f;
  double bound = 0;
  FastTransform transform = FastTransform::kNone;
  for (auto _ : state) {
    const FieldPlan plan(a, dirs, o);
    plan.ExecuteRange(currents, 0, plan.num_directions(), f);
    bound = f.error_bound_relative;
    transform = plan.fast_transform();
    benchmark::DoNotOptimize(f.e_theta.data());
  }
  Finish(state, static_cast<double>(n) * static_cast<double>(dirs.size()), dirs.size());
  state.counters["error_bound"] = bound;
  state.counters["lattice"] = transform == FastTransform::kLattice ? 1.0 : 0.0;

  const std::size_t stride = std::max<std::size_t>(1, dirs.size() / 4000);
  std::vector<double> th, ph;
  std::vector<std::size_t> at;
  for (std::size_t i = 0; i < dirs.size(); i += stride)
    th.push_back(dirs.theta_rad(i)), ph.push_back(dirs.phi_rad(i)), at.push_back(i);
  FieldOptions od;
  od.method = FieldMethod::kDirect;
  const FarField ref = FieldPlan(a, Directions::FromAngles(th, ph), od).Execute(currents);
  double peak = 0, err = 0;
  for (std::size_t i = 0; i < f.size(); ++i) {
    const auto e = static_cast<Eigen::Index>(i);
    peak = std::max(peak, std::sqrt(std::norm(f.e_theta[e]) + std::norm(f.e_phi[e])));
  }
  for (std::size_t j = 0; j < at.size(); ++j) {
    const auto e = static_cast<Eigen::Index>(at[j]), r = static_cast<Eigen::Index>(j);
    err = std::max(err, std::sqrt(std::norm(f.e_theta[e] - ref.e_theta[r]) +
                                  std::norm(f.e_phi[e] - ref.e_phi[r])));
  }
  state.counters["error_rel_peak"] = err / peak;
}

// One execution outside the timed loop (its own function, so a profile such as
// callgrind's tells it from the loop's): one-time costs, such as FFTW's first
// planning in the process, stay out of the per-execution figures.
[[gnu::noinline]] void ExecuteOnce(const PointSum& sum, const Eigen::MatrixXcd& c) {
  const Eigen::MatrixXcd f = sum.Execute(c);
  benchmark::DoNotOptimize(f.data());
}

// Repeated executions of one transform (built once, and executed once, outside
// the timing): what a synthesis loop pays per current vector. Arguments: N points (a jittered
// square planar lattice of half-wavelength pitch; exact for the lattice transform), targets (the
// first of an evenly strided full-sphere 1 deg grid), transform (0 type 3, 1 lattice), tolerance
// exponent.
void BM_PointSumExecute(benchmark::State& state) {
  const auto n = static_cast<int>(state.range(0));
  const auto m = static_cast<std::size_t>(state.range(1));
  const bool lattice = state.range(2) == 1;
  const NufftOptions options{std::pow(10.0, static_cast<double>(state.range(3))), 0};
  const testing::TestArray a = PlanarArray(n, lattice ? kLattice : kJittered);
  Eigen::Matrix3Xd x(3, n);
  for (int j = 0; j < n; ++j) x.col(j) = a.dipoles[static_cast<std::size_t>(j)].position_m;
  std::size_t full = 0;
  const Directions dirs = GridDirections(1.0, 1.0, 1e300, &full);
  const std::size_t stride = std::max<std::size_t>(1, dirs.size() / m);
  Eigen::Matrix3Xd s(3, static_cast<Eigen::Index>((dirs.size() + stride - 1) / stride));
  for (Eigen::Index i = 0; i < s.cols(); ++i)
    s.col(i) = a.wavenumber_rad_m() * dirs.r_hat(static_cast<std::size_t>(i) * stride);
  std::unique_ptr<const PointSum> sum;
  if (lattice) {
    const auto lat = FindAxisLattice(x, 1e-12, 4.0 * n + 1024.0);
    if (!lat) {
      state.SkipWithError("no lattice");
      return;
    }
    sum = std::make_unique<const LatticeSum>(*lat, s, options);
  } else {
    sum = std::make_unique<const Nufft3>(x, s, options);
  }
  Eigen::MatrixXcd c(n, 1);
  for (int j = 0; j < n; ++j) c(j, 0) = a.currents[j];
  ExecuteOnce(*sum, c);
  for (auto _ : state) {
    const Eigen::MatrixXcd f = sum->Execute(c);
    benchmark::DoNotOptimize(f.data());
  }
  Finish(state, static_cast<double>(n) * static_cast<double>(s.cols()),
         static_cast<std::size_t>(s.cols()));
}

void BM_Fast(benchmark::State& state) { RunFast(state, true); }
void BM_FastType3(benchmark::State& state) { RunFast(state, false); }

void Timing(benchmark::internal::Benchmark* b) {
  b->Unit(benchmark::kMillisecond)->UseRealTime()->MeasureProcessCPUTime()->MinTime(0.3);
}

// Arguments: N, grid step in hundredths of a degree, layout (see the top).
void Cases(benchmark::internal::Benchmark* b) {
  for (int step : {100, 25}) {
    for (int n : {16, 256, 1024, 4096, 65536}) b->Args({n, step, kJittered});
    b->Args({1024, step, kGeneral});
  }
  Timing(b);
}

void LatticeCases(benchmark::internal::Benchmark* b) {
  for (int step : {100, 25}) {
    for (int layout : {kLattice, kSparseLattice}) {
      for (int n : {256, 4096, 65536}) b->Args({n, step, layout});
    }
  }
  Timing(b);
}

BENCHMARK(BM_ScalarLoop)->Apply(Cases);
BENCHMARK(BM_Direct)->Apply(Cases);
BENCHMARK(BM_Fast)->Apply(Cases)->Apply(LatticeCases);
BENCHMARK(BM_FastType3)->Apply(LatticeCases);
BENCHMARK(BM_PointSumExecute)
    ->ArgsProduct({{16, 256, 4096}, {64, 4096, 65341}, {0, 1}, {-9}})
    ->Unit(benchmark::kMicrosecond)
    ->UseRealTime()
    ->MeasureProcessCPUTime()
    ->MinTime(0.2);

}  // namespace
}  // namespace lobecast

BENCHMARK_MAIN();
