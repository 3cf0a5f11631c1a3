#include "cli/run_limits.h"

#include <cstdio>

#include "cli/option_checks.h"
#include "io/input_error.h"

namespace lobecast::cli {
namespace {

// A run expected to take longer than this is announced before it starts.
constexpr double kAnnounceSeconds = 5;

double PhysicalMemoryGb() { return PhysicalMemoryBytes() / 1e9; }

std::string Number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g", v);
  return buf;
}

}  // namespace

void AddRunLimitOptions(CLI::App* cmd, RunLimits& limits) {
  cmd->add_option("--max-hours", limits.max_hours,
                  "Refuse a run estimated to take longer than this (hours, on the threads "
                  "used) before it starts; raise it for a long job")
      ->check(NumberIn(1e-9, 1e6, "h"))
      ->capture_default_str();
  cmd->add_option("--max-memory-gb", limits.max_memory_gb,
                  "Refuse a run estimated to need more memory than this (GB) before it starts; "
                  "default: the machine's physical memory")
      ->check(NumberIn(1e-6, 1e9, "GB"));
}

double MemoryLimitBytes(const RunLimits& limits) {
  return 1e9 * (limits.max_memory_gb > 0 ? limits.max_memory_gb : PhysicalMemoryGb());
}

void CheckRunLimits(const RunEstimate& estimate, const RunLimits& limits, const std::string& input,
                    bool quiet) {
  const double memory_gb = limits.max_memory_gb > 0 ? limits.max_memory_gb : PhysicalMemoryGb();
  const std::string what = "too large a run: " + estimate.Describe();
  if (memory_gb > 0 && estimate.memory_bytes > memory_gb * 1e9) {
    throw InputError(SourceLocation{input},
                     what + ", above the memory limit of " + Number(memory_gb) +
                         " GB (use a coarser grid or fewer dipoles, or raise --max-memory-gb)");
  }
  if (estimate.seconds() > limits.max_hours * 3600) {
    throw InputError(SourceLocation{input},
                     what + ", above the time limit of " + Number(limits.max_hours) +
                         " h (use a coarser grid or fewer dipoles, or raise --max-hours)");
  }
  if (!quiet && estimate.seconds() > kAnnounceSeconds) {
    std::fprintf(stderr, "lobecast: estimated %s\n", estimate.Describe().c_str());
  }
}

}  // namespace lobecast::cli
