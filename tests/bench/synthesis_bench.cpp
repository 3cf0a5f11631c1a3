// Excitation synthesis (engine/synthesis) on square panels of x dipoles at half a
// wavelength in free space, steered to (20 deg, 0): null placement (3 nulls, both
// components) and maximum directivity toward the beam (Ludwig-3 x). 1024 dipoles take
// the dense resistance matrix, 16384 the route auto takes without it (the band-limited
// quadrature on this lattice; R of 16384 dipoles would be 2 GiB). One iteration each:
// the figures are wall times of single runs.
//   synthesis_bench --benchmark_filter=...   (not a test; see RESULTS.md)
#include <benchmark/benchmark.h>

#include <cmath>

#include "engine/constants.h"
#include "engine/synthesis/max_directivity.h"
#include "engine/synthesis/null_placement.h"
#include "engine/synthesis/steering.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

Array Panel(int side) {
  Array a;
  a.frequency_hz = 10e9;
  const double l = a.wavelength_m();
  for (int i = 0; i < side * side; ++i) {
    Dipole d;
    d.position_m = Vec3(0.5 * l * (i % side), 0.5 * l * (i / side), 0.0);
    d.orientation = Vec3::UnitX();
    d.length_m = 0.05 * l;
    a.dipoles.push_back(d);
  }
  return a;
}

const Direction kBeam{20 * kDegree, 0.0};

void BM_PlaceNulls(benchmark::State& state) {
  const Array a = Panel(static_cast<int>(state.range(0)));
  const Eigen::VectorXcd i0 = SteeringPhasors(a, kBeam.theta_rad, kBeam.phi_rad);
  const Directions nulls = Directions::FromAngles({40 * kDegree, 35 * kDegree, 60 * kDegree},
                                                  {kPi, 0.5 * kPi, 1.25 * kPi});
  NullResult r;
  for (auto _ : state) r = PlaceNulls(a, i0, nulls, kBeam);
  double deepest = -1e9;
  for (double d : r.depth_db) deepest = std::max(deepest, d);
  state.counters["dipoles"] = static_cast<double>(a.size());
  state.counters["shallowest_null_db"] = deepest;
  state.counters["directivity_lost_db"] = r.directivity_lost_db;
  state.counters["uniform_directivity_dbi"] = 10 * std::log10(r.directivity_before);
}

// range(1): 0 the automatic solver (dense up to 4096 dipoles), else conjugate
// gradients to a residual of 1e-8, capped at that many iterations.
void BM_MaxDirectivity(benchmark::State& state) {
  const Array a = Panel(static_cast<int>(state.range(0)));
  MaxDirectivityOptions o;
  o.regularization = 1e-6;
  o.cg_tolerance = 1e-8;
  if (state.range(1) > 0) {
    o.solver = DirectivitySolver::kConjugateGradient;
    o.cg_max_iterations = static_cast<int>(state.range(1));
  }
  MaxDirectivityResult r;
  for (auto _ : state)
    r = MaximizeDirectivity(a, kBeam, PolarizationVector::LudwigX(kBeam.phi_rad), o);
  state.counters["dipoles"] = static_cast<double>(a.size());
  state.counters["directivity_dbi"] = 10 * std::log10(r.directivity);
  state.counters["cg_iterations"] = r.cg_iterations;
  state.counters["cg_residual"] = r.cg_residual_relative;
  state.counters["n_ks"] = r.sensitivity_re_uniform;
  state.counters["digits_in_p"] = r.digits_in_power;
}

BENCHMARK(BM_PlaceNulls)->Arg(32)->Arg(128)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();
BENCHMARK(BM_MaxDirectivity)
    ->Args({32, 0})
    ->Args({32, 1000})
    ->Args({128, 10})
    ->Args({128, 300})
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();

}  // namespace
}  // namespace lobecast

BENCHMARK_MAIN();
