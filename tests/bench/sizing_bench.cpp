// Sizing (engine/sizing): the time to size a 10 GHz requirement of 25 dBi at broadside,
// side lobes -25 dB, scan 45 deg in every azimuth, x dipoles a quarter wavelength over
// PEC, either lattice: the prediction alone, and prediction plus the engine's check of
// every candidate (patterns at broadside and at both scan edges, re-sized where they
// miss). One iteration each: the figures are wall times of single runs.
//   sizing_bench --benchmark_filter=...   (not a test; see RESULTS.md)
#include <benchmark/benchmark.h>

#include <cmath>

#include "engine/sizing/sizing.h"

namespace lobecast {
namespace {

SizingRequirements Requirement25() {
  SizingRequirements r;
  r.frequency_hz = 10e9;
  r.directivity_dbi = 25;
  r.sidelobe_db = -25;
  r.scan_xz_deg = r.scan_yz_deg = 45;
  r.ground = Ground::kPec;
  r.ground_height_m = 0.25 * r.wavelength_m();
  r.element_length_m = 0.05 * r.wavelength_m();
  return r;
}

// range(0): 1 with the engine's check, 0 prediction only.
void BM_Size25dBi(benchmark::State& state) {
  const SizingRequirements req = Requirement25();
  SizingOptions o;
  o.check = state.range(0) != 0;
  SizingResult r;
  for (auto _ : state) r = SizeArray(req, o);
  const SizingCandidate& best = r.candidates.front();
  state.counters["candidates"] = static_cast<double>(r.candidates.size());
  state.counters["best_elements"] = static_cast<double>(best.elements());
  state.counters["best_meets"] = best.meets;
  state.counters["best_predicted_dbi"] = best.directivity_dbi;
  for (const ComputedBeam& b : best.computed)
    if (b.steer_theta_deg == 0) state.counters["best_computed_dbi"] = b.peak_dbi;
  int rounds = 0;
  for (const SizingCandidate& c : r.candidates) rounds += c.rounds;
  state.counters["sizings"] = rounds;
}

BENCHMARK(BM_Size25dBi)
    ->Arg(0)
    ->Arg(1)
    ->Iterations(1)
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();

}  // namespace
}  // namespace lobecast

BENCHMARK_MAIN();
