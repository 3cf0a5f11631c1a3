// What a compute or check will cost before it starts: CPU time and peak memory,
// from the sizes and the routes, so a huge input is refused with the estimate in the
// message (cli/run_limits.h) instead of running silently for days or dying out of
// memory hours in. Coarse by design (within a factor of a few): only the terms
// that grow fastest are counted. With the array (PriceRoutes) the routes are
// those the job will take (the power quadrature, the fast field path); with the
// sizes alone, the closed form and the direct sum or a generic fast path. The
// pattern analysis is priced by its memory only (RoutePrices::analysis_bytes).
#pragma once

#include <cstddef>
#include <string>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/power/power_cost.h"
#include "engine/types.h"

namespace lobecast {

struct RunSize {
  std::size_t dipoles = 0;
  Ground ground = Ground::kNone;
  std::size_t directions = 0;  // 0: no pattern (check)
  FieldMethod method = FieldMethod::kAuto;
  bool resistance_matrix = false;  // the N x N matrix stored (--resistance-matrix, or N <= 4096)
  int threads = 0;                 // 0: all cores (ResolveThreads)
  // Streamed (ComputePatternBlocks into the file, engine/pattern_stream.h): the
  // result is never whole in memory, only a block and the analysis' view.
  bool streamed = false;
};

struct RunEstimate {
  double power_pairs = 0;  // dipole-source pairs of the closed-form power, O(N^2)
  double field_pairs = 0;  // source-direction pairs, N_s x directions
  double field_directions = 0;
  double power_seconds = 0;  // wall seconds on the threads used
  double field_seconds = 0;
  // Per direction besides the field: the floor, U, D and polarization, and the
  // file's compression (one thread).
  double finish_seconds = 0;
  double memory_bytes = 0;  // peak: the result's grids, the plan's block, the matrix
  // The routes priced: with the sizes alone the closed form (matrix when stored)
  // and the cheaper of the direct sum and the fast path by sizes; with the job's
  // RoutePrices the routes it will take.
  PowerRoute power_route = PowerRoute::kStreamed;
  std::size_t power_nodes = 0;  // the quadrature's nodes evaluated
  FieldMethod field_method = FieldMethod::kDirect;
  FastTransform field_transform = FastTransform::kNone;  // kNone: type 3 by sizes
  double seconds() const { return power_seconds + field_seconds + finish_seconds; }
  // "power 4.2e+06 dipole pairs, field 6.5e+10 source-direction pairs: about 3.2 min and
  // 1.1 GB of memory"; a quadrature or fast field names its route instead ("power by the
  // quadrature on 5.5e+06 nodes, field 1e+06 directions by the lattice transform: ...").
  std::string Describe() const;
};

// The sizes alone: the closed-form power (the streamed O(N^2) rows, priced per
// pair) and the field's direct sum or, when cheaper, a fast path priced per point.
// An upper bound for large arrays, whose job takes the quadrature or the lattice.
RunEstimate EstimateRun(const RunSize& size);

// The routes a job will take, priced as it chooses them (PriceRoutes), so a
// million-dipole lattice on a million directions is priced at the lattice
// transform and the quadrature it runs in minutes, not at the 10^12 pairs it never
// sums.
struct RoutePrices {
  PowerChoice power;                                // ChoosePowerRoute's: the route, its cost, why
  std::size_t power_nodes = 0;                      // the quadrature's rule, when taken
  FieldMethod field_method = FieldMethod::kDirect;  // kFast when any block will take it
  FastTransform field_transform = FastTransform::kNone;
  double field_seconds = 0;  // every block: its plan and its field (wall, threads counted)
  double field_bytes = 0;    // the largest block's plan (kFast: the transform's grid too)
  // The pattern analysis' memory beside the result, when it runs: the grid its searches
  // keep on large arrays (PatternProbe::SearchBytes; set by the caller, 0 otherwise).
  double analysis_bytes = 0;
};

// The job's routes for `array` on `grid` (empty: no pattern, as `check`) under
// `options`: the power by ChoosePowerRoute (the matrix when the job builds it,
// N <= resistance_matrix_max_dipoles or store_resistance_matrix); the field by one
// FieldPlan over a sample of the grid (up to 33 theta rows by 33 phi values,
// the first and last of each), asked what each block of theta rows would cost at
// its size with the method asked (FieldPlan::EstimatedSeconds: auto's own
// choice). O(N) to build the sample plans; nothing is summed or transformed.
RoutePrices PriceRoutes(const Array& array, const AngularGrid& grid, const PatternOptions& options);

// The sizes' estimate with the job's routes: their seconds instead of the
// closed form and the direct sum, and the memory of the largest stage: the power (it
// runs before the result exists), the field (the result and the fast plan's bytes)
// or the analysis (the result and its search grid).
RunEstimate EstimateRun(const RunSize& size, const RoutePrices& prices);

// The machine's physical memory, bytes (0 when unknown): the default memory limit of
// a run (cli/run_limits.h) and of reading a whole result (io/hdf5/result_reader.h).
double PhysicalMemoryBytes();

}  // namespace lobecast
