// Limits on how long and how large a run may be before it starts (issue: huge
// inputs ran silently for days or died out of memory hours in). `compute` and
// `check` estimate the run (engine/run_estimate.h) and refuse one past the limits
// as bad input (exit 2), naming the estimate and the option that raises the limit;
// a run expected to take more than a few seconds says so on stderr first.
#pragma once

#include <string>

#include <CLI/CLI.hpp>

#include "engine/run_estimate.h"

namespace lobecast::cli {

struct RunLimits {
  double max_hours = 2;      // estimated wall time on the threads used
  double max_memory_gb = 0;  // 0: the machine's physical memory
};

// --max-hours and --max-memory-gb on `cmd`.
void AddRunLimitOptions(CLI::App* cmd, RunLimits& limits);

// Throws InputError (exit 2) naming `input` when `estimate` exceeds `limits`;
// otherwise prints "lobecast: estimated ..." on stderr for runs longer than a few
// seconds (unless quiet).
void CheckRunLimits(const RunEstimate& estimate, const RunLimits& limits, const std::string& input,
                    bool quiet);

// Streaming: the memory limit in bytes (--max-memory-gb, else the machine's physical
// memory; 0 when unknown), the one `compute` compares its in-memory estimate with to
// decide whether to stream.
double MemoryLimitBytes(const RunLimits& limits);

}  // namespace lobecast::cli
