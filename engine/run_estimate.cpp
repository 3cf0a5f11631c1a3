#include "engine/run_estimate.h"

#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <vector>

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
// Per direction after the field, CPU seconds: the floor, U, D and polarization
// (DeriveFromField, about 800 instructions a direction by callgrind) on the
// threads, and the file's shuffle and deflate on one (level 1: 45 ms for the
// 65 160 directions of random-1024, whose noisy low bytes are deflate's worst
// case; smooth patterns compress faster). tests/bench/RESULTS.md, "The whole
// job's parts".
constexpr double kSecondsPerDerivedDirection = 2.5e-7;
constexpr double kSecondsPerStoredDirection = 6.0e-7;
// Building one block's field plan, per source (positions, moments, the lattice
// search): as engine/power/power_cost.cpp prices its plans.
constexpr double kSecondsPerPlanSource = 1.5e-7;
// The field's sample plan: up to this many theta rows and phi values.
constexpr std::size_t kSampleAxis = 33;

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

// Up to kSampleAxis of the values, evenly spread, the first and last among them.
std::vector<double> SampleOf(const std::vector<double>& values) {
  const std::size_t n = values.size();
  if (n <= kSampleAxis) return values;
  std::vector<double> out;
  for (std::size_t k = 0; k < kSampleAxis; ++k) {
    out.push_back(values[k * (n - 1) / (kSampleAxis - 1)]);
  }
  return out;
}

}  // namespace

std::string RunEstimate::Describe() const {
  std::string s;
  char buf[96];
  if (power_route == PowerRoute::kQuadrature) {
    std::snprintf(buf, sizeof buf, "power by the quadrature on %.2g nodes",
                  static_cast<double>(power_nodes));
  } else {
    std::snprintf(buf, sizeof buf, "power %.2g dipole pairs", power_pairs);
  }
  s = buf;
  if (field_pairs > 0) {
    if (field_method == FieldMethod::kFast && field_transform != FastTransform::kNone) {
      std::snprintf(buf, sizeof buf, ", field %.2g directions by the %s transform",
                    field_directions, std::string(ToString(field_transform)).c_str());
    } else {
      std::snprintf(buf, sizeof buf, ", field %.2g source-direction pairs", field_pairs);
    }
    s += buf;
  }
  std::snprintf(buf, sizeof buf, "%.2g GB", memory_bytes / 1e9);
  return s + ": about " + Duration(seconds()) + " and " + buf + " of memory";
}

double PhysicalMemoryBytes() {
  const long pages = ::sysconf(_SC_PHYS_PAGES);
  const long page = ::sysconf(_SC_PAGESIZE);
  return pages > 0 && page > 0 ? static_cast<double>(pages) * static_cast<double>(page) : 0;
}

namespace {

// The result held in memory (or, streamed, one block and the analysis' view).
double HeldBytes(const RunSize& size) {
  const double m = static_cast<double>(size.directions);
  // Streamed: one block finished beside its plan (result rows and the field
  // chunk, ~100 bytes a direction), and the analysis' view instead of the grid.
  return size.streamed ? std::min(m, kPlanBlockDirections) * kBytesPerStreamedBlock +
                             std::min(m, kViewDirections) * kBytesPerDirection
                       : m * kBytesPerDirection;
}

// The dipoles (description, plan, result) and the stored matrix.
double DipoleBytes(const RunSize& size) {
  const double n = static_cast<double>(size.dipoles);
  return n * kBytesPerDipole + (size.resistance_matrix ? 8 * n * n : 0.0);
}

}  // namespace

RunEstimate EstimateRun(const RunSize& size) {
  const double n = static_cast<double>(size.dipoles);
  const double sources = size.ground == Ground::kNone ? n : 2 * n;  // PEC: one image each
  const double m = static_cast<double>(size.directions);
  const double threads = std::max(1, ResolveThreads(size.threads));
  RunEstimate e;
  e.power_pairs = n * sources;
  e.power_seconds = e.power_pairs * kSecondsPerPowerPair / threads;
  e.power_route = size.resistance_matrix ? PowerRoute::kMatrix : PowerRoute::kStreamed;
  if (m > 0) {
    e.field_pairs = sources * m;
    e.field_directions = m;
    const double direct = e.field_pairs * kSecondsPerFieldPair / threads;
    const double fast = (sources + m) * kSecondsPerFastPoint / threads;
    const bool take_fast = size.method != FieldMethod::kDirect && fast < direct;
    e.field_seconds = take_fast ? fast : direct;
    e.field_method = take_fast ? FieldMethod::kFast : FieldMethod::kDirect;
    e.finish_seconds = m * (kSecondsPerDerivedDirection / threads + kSecondsPerStoredDirection);
  }
  e.memory_bytes = HeldBytes(size) + std::min(m, kPlanBlockDirections) * kBytesPerPlanDirection +
                   DipoleBytes(size);
  return e;
}

RoutePrices PriceRoutes(const Array& array, const AngularGrid& grid,
                        const PatternOptions& options) {
  RoutePrices p;
  PowerQuadratureOptions quadrature = options.power_quadrature;
  quadrature.num_threads = options.field.num_threads;
  // As RunBlocks (pattern.cpp) chooses.
  p.power = ChoosePowerRoute(
      array, options.power_method,
      array.size() <= options.resistance_matrix_max_dipoles || options.store_resistance_matrix,
      options.store_resistance_matrix, quadrature);
  if (p.power.route == PowerRoute::kQuadrature) {
    p.power_nodes = PowerQuadratureRule(array, quadrature).num_nodes();
  }
  if (grid.size() == 0) return p;
  AngularGrid sample;
  sample.theta_deg = SampleOf(grid.theta_deg);
  sample.phi_deg = SampleOf(grid.phi_deg);
  FieldOptions f = options.field;
  // A fast plan keeps the lattice, to cost the transform auto would take at the
  // block's size; a direct one never looks for it.
  if (f.method == FieldMethod::kAuto) f.method = FieldMethod::kFast;
  const FieldPlan plan(array, Directions::FromGrid(sample), f);
  const std::size_t nt = grid.theta_deg.size();
  const std::size_t np = grid.phi_deg.size();
  const std::size_t rows_per_block = std::max<std::size_t>(1, options.block_directions / np);
  const double plan_seconds = static_cast<double>(plan.num_sources()) * kSecondsPerPlanSource;
  for (std::size_t row = 0; row < nt; row += rows_per_block) {
    const double d = static_cast<double>(std::min(rows_per_block, nt - row) * np);
    const double direct = plan.EstimatedSeconds(d, FieldMethod::kDirect);
    const double seconds = plan.EstimatedSeconds(d, options.field.method);
    const bool fast = options.field.method == FieldMethod::kFast ||
                      (options.field.method == FieldMethod::kAuto && seconds < direct);
    p.field_seconds += seconds + plan_seconds;
    if (fast) {
      p.field_method = FieldMethod::kFast;
      p.field_transform = plan.fast_transform();
      p.field_bytes = std::max(p.field_bytes, plan.EstimatedBytes(d, FieldMethod::kFast));
    } else {
      p.field_bytes = std::max(p.field_bytes, d * kBytesPerPlanDirection);
    }
  }
  return p;
}

RunEstimate EstimateRun(const RunSize& size, const RoutePrices& prices) {
  RunEstimate e = EstimateRun(size);
  e.power_route = prices.power.route;
  e.power_nodes = prices.power_nodes;
  e.power_seconds = prices.power.cost.seconds;
  if (size.directions > 0) {
    e.field_seconds = prices.field_seconds;
    e.field_method = prices.field_method;
    e.field_transform = prices.field_transform;
  }
  // The power runs before the result exists: the larger of its stage (the
  // quadrature's plans; the closed form's rows are O(N)) and the field's.
  const double power_stage =
      prices.power.route == PowerRoute::kQuadrature ? prices.power.cost.bytes : 0.0;
  e.memory_bytes = DipoleBytes(size) + std::max({HeldBytes(size) + prices.field_bytes, power_stage,
                                                 HeldBytes(size) + prices.analysis_bytes});
  return e;
}

}  // namespace lobecast
