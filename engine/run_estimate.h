// What a compute or check will cost before it starts: CPU time and peak memory,
// from the sizes alone, so a huge input is refused with the estimate in the
// message (cli/run_limits.h) instead of running silently for days or dying out of
// memory hours in. Coarse by design (within a factor of a few): only the terms
// that grow fastest are counted.
#pragma once

#include <cstddef>
#include <string>

#include "engine/field/far_field.h"
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
  double power_pairs = 0;    // dipole-source pairs of the closed-form power, O(N^2)
  double field_pairs = 0;    // source-direction pairs of the direct field sum, N x directions
  double power_seconds = 0;  // wall seconds on the threads used
  double field_seconds = 0;
  double memory_bytes = 0;  // peak: the result's grids, the plan's block, the matrix
  double seconds() const { return power_seconds + field_seconds; }
  // "power 4e+08 dipole pairs, field 6.5e+10 source-direction pairs, ~3.2 min, ~1.1 GB"
  std::string Describe() const;
};

// The one place run costs are estimated. The power is the streamed O(N^2) route
// (engine/power/power_large.h); when a cheaper power route for large arrays is
// added (the O(N + L^2 log L) one), its cost goes here, chosen as ComputePattern
// chooses it, and every limit follows.
RunEstimate EstimateRun(const RunSize& size);

// The machine's physical memory, bytes (0 when unknown): the default memory limit of
// a run (cli/run_limits.h) and of reading a whole result (io/hdf5/result_reader.h).
double PhysicalMemoryBytes();

}  // namespace lobecast
