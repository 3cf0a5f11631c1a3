#include "engine/run_estimate.h"

#include <unistd.h>

#include <algorithm>
#include <cstdio>

#include "engine/pattern_stream.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

// CPU seconds per unit on one core, measured on the development machine (AMD EPYC
// 2.1 GHz): the streamed power's inner loop from `lobecast check` on 2e4 and 4e4
// random dipoles (9.1 s and 38 s of user time: 2.3e-8 and 2.4e-8 s a pair); the
// direct field sum from the cost model of engine/field/method_cost.cpp (4.5e8
// general pairs a second); the fast path from README "Speed" (about 1.2 s on 2
// threads for a 1 M-direction grid whatever N: 2.4e-6 CPU s a direction, counted
// for the sources too).
constexpr double kSecondsPerPowerPair = 2.4e-8;
constexpr double kSecondsPerFieldPair = 1.0 / 4.5e8;
constexpr double kSecondsPerFastPoint = 2.4e-6;

// Bytes: PatternResult holds ~65 a direction (two complex field components,
// intensity, directivity, axial ratio, tilt, sense), the analysis 2 more; the
// field plan works on blocks of at most 2^20 directions at ~100 bytes each; a
// dipole costs a few hundred bytes across the description, plan and result.
constexpr double kBytesPerDirection = 67.0;
constexpr double kPlanBlockDirections = 1 << 20;
constexpr double kBytesPerPlanDirection = 100.0;
constexpr double kBytesPerDipole = 400.0;
constexpr double kBytesPerStreamedBlock = 100.0;
constexpr double kViewDirections = kStreamViewDirections;

std::string Duration(double s) {
  char buf[48];
  if (s < 90) {
    std::snprintf(buf, sizeof buf, "%.2g s", s);
  } else if (s < 5400) {
    std::snprintf(buf, sizeof buf, "%.2g min", s / 60);
  } else if (s < 2 * 86400) {
    std::snprintf(buf, sizeof buf, "%.2g h", s / 3600);
  } else {
    std::snprintf(buf, sizeof buf, "%.2g days", s / 86400);
  }
  return buf;
}

}  // namespace

std::string RunEstimate::Describe() const {
  char buf[160];
  if (field_pairs > 0) {
    std::snprintf(buf, sizeof buf, "power %.2g dipole pairs, field %.2g source-direction pairs",
                  power_pairs, field_pairs);
  } else {
    std::snprintf(buf, sizeof buf, "power %.2g dipole pairs", power_pairs);
  }
  char mem[48];
  std::snprintf(mem, sizeof mem, "%.2g GB", memory_bytes / 1e9);
  return std::string(buf) + ": about " + Duration(seconds()) + " and " + mem + " of memory";
}

double PhysicalMemoryBytes() {
  const long pages = ::sysconf(_SC_PHYS_PAGES);
  const long page = ::sysconf(_SC_PAGESIZE);
  return pages > 0 && page > 0 ? static_cast<double>(pages) * static_cast<double>(page) : 0;
}

RunEstimate EstimateRun(const RunSize& size) {
  const double n = static_cast<double>(size.dipoles);
  const double sources = size.ground == Ground::kNone ? n : 2 * n;  // PEC: one image each
  const double m = static_cast<double>(size.directions);
  const double threads = std::max(1, ResolveThreads(size.threads));
  RunEstimate e;
  e.power_pairs = n * sources;
  e.power_seconds = e.power_pairs * kSecondsPerPowerPair / threads;
  if (m > 0) {
    e.field_pairs = sources * m;
    const double direct = e.field_pairs * kSecondsPerFieldPair / threads;
    const double fast = (sources + m) * kSecondsPerFastPoint / threads;
    e.field_seconds = size.method == FieldMethod::kDirect ? direct : std::min(direct, fast);
  }
  // Streamed: one block finished beside its plan (result rows and the field
  // chunk, ~100 bytes a direction), and the analysis' view instead of the grid.
  const double held = size.streamed ? std::min(m, kPlanBlockDirections) * kBytesPerStreamedBlock +
                                          std::min(m, kViewDirections) * kBytesPerDirection
                                    : m * kBytesPerDirection;
  e.memory_bytes = held + std::min(m, kPlanBlockDirections) * kBytesPerPlanDirection +
                   n * kBytesPerDipole + (size.resistance_matrix ? 8 * n * n : 0.0);
  return e;
}

}  // namespace lobecast
