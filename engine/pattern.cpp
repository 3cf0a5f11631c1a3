// The whole pattern job on a grid (pattern.h).
#include "engine/pattern.h"
#include "engine/threads.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdarg>
#include <cstdio>
#include <functional>
#include <limits>

#include <omp.h>

#include "engine/check.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/intensity.h"
#include "engine/polarization.h"
#include "engine/power/power_large.h"
#include "engine/power/power_quadrature.h"
#include "engine/power/radiated_power.h"
#include "engine/rounding_floor.h"
#include "engine/run_estimate.h"
#include "engine/text_case.h"

namespace lobecast {
namespace {

using Clock = std::chrono::steady_clock;

constexpr const char* kQuadratureActiveNote =
    "active resistances not computed (NaN): they need the mutual reactances, whose sum "
    "is O(N^2) (engine/power/power_quadrature.h)";
double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

// printf into a string (the engine does not use io/text's Printf).
std::string Format(const char* format, ...) {
  va_list args;
  va_start(args, format);
  char buffer[256];
  const int n = std::vsnprintf(buffer, sizeof buffer, format, args);
  va_end(args);
  return n < 0 ? std::string() : std::string(buffer, std::min<std::size_t>(n, sizeof buffer - 1));
}

// Why the routes came out as they did, for ComputeSummary::message.
std::string RouteMessage(const ComputeSummary& s, std::size_t fast_blocks, std::size_t blocks,
                         const PatternOptions& options, const std::string& power_why) {
  std::vector<std::string> notes;
  if (s.field_method_given == FieldMethod::kAuto) {
    if (fast_blocks == 0) {
      notes.push_back(
          "auto chose the direct sum: the fast path was not estimated below half "
          "its cost");
    } else {
      notes.push_back("auto chose the fast path in " + std::to_string(fast_blocks) + " of " +
                      std::to_string(blocks) + " block" + (blocks == 1 ? "" : "s") +
                      ", where it was estimated below half the direct cost");
    }
  }
  if (s.fast_transforms_used.size() > 1) {
    notes.push_back("blocks differ in fast transform: " +
                    FastTransformsToString(s.fast_transforms_used));
  }
  if (!power_why.empty()) notes.push_back(power_why);
  if (s.power_route == PowerRoute::kStreamed) {
    notes.push_back(
        "power streamed without the resistance matrix: " + std::to_string(s.num_dipoles) +
        " dipoles exceed " + std::to_string(options.resistance_matrix_max_dipoles));
  }
  if (s.power_route == PowerRoute::kQuadrature) notes.push_back(kQuadratureActiveNote);
  std::string out;
  for (const std::string& n : notes) {
    if (!out.empty()) out += "; ";
    out += n;
  }
  return out;
}

}  // namespace

std::string FastTransformsToString(const std::vector<FastTransform>& transforms) {
  if (transforms.empty()) return std::string(ToString(FastTransform::kNone));
  std::string out;
  for (FastTransform t : transforms) {
    if (!out.empty()) out += '+';
    out += ToString(t);
  }
  return out;
}

std::optional<std::vector<FastTransform>> FastTransformsFromString(std::string_view s) {
  if (EqualsIgnoreCase(s, ToString(FastTransform::kNone))) return std::vector<FastTransform>{};
  std::vector<FastTransform> out;
  std::size_t begin = 0;
  while (begin <= s.size()) {
    const std::size_t plus = std::min(s.find('+', begin), s.size());
    const std::string_view name = s.substr(begin, plus - begin);
    bool known = false;
    for (FastTransform t : {FastTransform::kType3, FastTransform::kLattice}) {
      if (EqualsIgnoreCase(name, ToString(t))) out.push_back(t), known = true;
    }
    if (!known) return std::nullopt;
    begin = plus + 1;
  }
  return out;
}

std::string ComputeSummary::BriefReport() const {
  std::string s = "field " + std::string(ToString(field_method_used)) + " (asked " +
                  std::string(ToString(field_method_given)) + ")";
  if (field_method_used == FieldMethod::kFast) {
    s += Format(", %s transform, error bound %.2g of the peak |rE|",
                FastTransformsToString(fast_transforms_used).c_str(), field_error_bound_relative);
  }
  s += "; power " + std::string(ToString(power_route));
  if (power_route == PowerRoute::kQuadrature) {
    s += Format(" (degree %d, %zu nodes, error bound %.2g of P)", power_quadrature_degree,
                power_quadrature_nodes, power_error_bound_relative);
  } else {
    s += power_route == PowerRoute::kStreamed ? " (no resistance matrix stored)" : " (closed form)";
  }
  return s;
}

std::string ComputeSummary::FullReport() const {
  std::string s = BriefReport() + "\n";
  s += Format("size         %zu dipoles, %zu sources, %zu directions, %.3g pairs\n", num_dipoles,
              num_sources, num_directions, pairs);
  s += Format(
      "time         plan %.3f s, field %.3f s, power %.3f s, polarization %.3f s, %d "
      "thread%s\n",
      seconds_plan, seconds_field, seconds_power, seconds_polarization, threads_used,
      threads_used == 1 ? "" : "s");
  s += Format("power        %.6g W radiated\n", radiated_power_w);
  const std::string digits = PowerDigitsNote(power_significant_digits);
  if (!digits.empty()) s += "             " + digits + "\n";
  s += Format("peak         D = %.6g (%.2f dBi) at theta %g deg, ", peak_directivity,
              ToDb(peak_directivity), peak_theta_deg);
  s += std::isnan(peak_phi_deg) ? std::string("phi undefined (on the z axis)")
                                : Format("phi %g deg", peak_phi_deg);
  s += " (grid maximum)\n";
  if (!message.empty()) s += "message      " + message + "\n";
  return s;
}

std::string PowerDigitsNote(double digits) {
  if (!(digits < kPowerDigitsWanted)) return "";
  return Format(
      "the radiated power keeps only about %.0f significant digits: the currents nearly "
      "cancel (closer than a wavelength in anti-phase), so the sum of its terms is far "
      "larger than the power itself",
      std::max(0.0, std::floor(digits)));
}

void DeriveFromField(PatternResult& r, int num_threads) {
  const auto nn = static_cast<Eigen::Index>(r.grid.size());
  r.intensity_w_sr.resize(nn);
  r.directivity.resize(nn);
  r.axial_ratio_db.resize(nn);
  r.tilt_deg.resize(nn);
  r.sense.resize(static_cast<std::size_t>(nn));
  const double to_d = DirectivityPerIntensity(r.radiated_power_w);
  const double floor_v = r.field_floor_v;
#pragma omp parallel for num_threads(ResolveThreads(num_threads)) schedule(static)
  for (Eigen::Index i = 0; i < nn; ++i) {
    const Complex et = Floored(r.field.e_theta[i], floor_v);
    const Complex ep = Floored(r.field.e_phi[i], floor_v);
    r.field.e_theta[i] = et;
    r.field.e_phi[i] = ep;
    // U = |rE|^2 / (2 eta0) for peak phasors (CONVENTIONS §1).
    const double u = RadiationIntensity(et, ep);
    r.intensity_w_sr[i] = u;
    r.directivity[i] = to_d * u;
    const Polarization p = PolarizationOf(et, ep, floor_v);
    r.axial_ratio_db[i] = p.axial_ratio_db;
    r.tilt_deg[i] = p.tilt_deg;
    r.sense[static_cast<std::size_t>(i)] = p.sense;
  }
}

Eigen::Index PeakIndex(const Eigen::VectorXd& directivity) {
  const double max = directivity.maxCoeff();
  Eigen::Index i = 0;
  while (directivity[i] < max * (1.0 - 1e-9)) ++i;
  return i;
}

void PeakTracker::Add(std::size_t first_index, const Eigen::VectorXd& values) {
  for (Eigen::Index k = 0; k < values.size(); ++k) {
    const double v = values[k];
    if (!(v > max_)) continue;  // not a new prefix maximum
    max_ = v;
    // PeakIndex's threshold for this maximum; candidates below it can never qualify.
    const double threshold = max_ * (1.0 - 1e-9);
    // Values ascend, so those below it are at the front.
    std::size_t keep = 0;
    while (keep < candidates_.size() && candidates_[keep].value < threshold) ++keep;
    candidates_.erase(candidates_.begin(), candidates_.begin() + static_cast<std::ptrdiff_t>(keep));
    candidates_.push_back({first_index + static_cast<std::size_t>(k), v});
  }
}

const PeakTracker::Candidate* PeakTracker::Peak() const {
  // Ascending values: the first one within 1e-9 of the maximum.
  const double threshold = max_ * (1.0 - 1e-9);
  for (const Candidate& c : candidates_) {
    if (!(c.value < threshold)) return &c;
  }
  return nullptr;
}

std::size_t PeakTracker::index() const {
  const Candidate* c = Peak();
  return c ? c->index : 0;
}

double PeakTracker::value() const {
  const Candidate* c = Peak();
  return c ? c->value : 0.0;
}

std::vector<std::size_t> PeakTracker::candidate_indices() const {
  std::vector<std::size_t> out;
  for (const Candidate& c : candidates_) out.push_back(c.index);
  return out;
}

namespace {

// The grid peak (PeakIndex's) into the summary; phi undefined on the z axis.
void SetPeak(ComputeSummary& s, const AngularGrid& grid, std::size_t at, double value) {
  const std::size_t np = grid.phi_deg.size();
  s.peak_directivity = value;
  s.peak_theta_deg = grid.theta_deg[at / np];
  s.peak_phi_deg = grid.phi_deg[at % np];
  if (s.peak_theta_deg == 0.0 || s.peak_theta_deg == 180.0)
    s.peak_phi_deg = std::numeric_limits<double>::quiet_NaN();  // on the z axis
}

// The power, then theta rows [first_row, last_row) in blocks, each handed to
// `sink`. With finish_blocks the blocks are finished (floor, U, D, polarization) and
// the summary gets their peak; without, they carry only their unfloored field
// (ComputePatternRows gathers it; FinishPattern finishes the whole grid). The
// summary's route message is left to CloseSummary.
PatternInProgress RunBlocks(const Array& array, const Eigen::VectorXcd& currents,
                            const AngularGrid& grid, const PatternOptions& options,
                            const PatternBlockSink& sink, bool finish_blocks, std::size_t first_row,
                            std::size_t last_row) {
  Validate(array);
  ValidateCurrents(array, currents);
  std::string why;
  if (!options.field.IsValid(&why)) throw InvalidArgument(why);
  if (grid.size() == 0) throw InvalidArgument("grid: found no directions, expected at least one");
  LOBECAST_CHECK_LE(first_row, last_row);
  LOBECAST_CHECK_LE(last_row, grid.theta_deg.size());
  PatternInProgress progress;
  PatternResult& r = progress.result;
  r.grid = grid;
  ComputeSummary& s = r.summary;
  s.threads_used = ResolveThreads(options.field.num_threads);
  s.num_dipoles = array.size();

  auto t0 = Clock::now();
  PowerQuadratureOptions quadrature = options.power_quadrature;
  quadrature.num_threads = options.field.num_threads;
  const PowerChoice power = ChoosePowerRoute(
      array, options.power_method,
      array.size() <= options.resistance_matrix_max_dipoles || options.store_resistance_matrix,
      options.store_resistance_matrix, quadrature);
  // One progress bar over the power and the field, each its share of the run's
  // estimated time (the O(N^2) power of a large array stalled the bar at 0): the
  // power's route as chosen, the field by the sizes.
  double power_share = 0.0;
  if (options.progress) {
    const RunEstimate estimate =
        EstimateRun(RunSize{array.size(), array.ground, grid.size(), options.field.method, false,
                            options.field.num_threads});
    const double rest = estimate.field_seconds + estimate.finish_seconds;
    if (power.cost.seconds + rest > 0.0)
      power_share = power.cost.seconds / (power.cost.seconds + rest);
  }
  const std::function<void(double)> power_progress = [&](double x) {
    if (options.progress) options.progress(power_share * x);
  };
  if (power.route == PowerRoute::kQuadrature) {
    const QuadraturePower q = RadiatedPowerByQuadrature(array, currents, quadrature);
    r.radiated_power_w = q.radiated_power_w;
    s.power_error_bound_relative = q.error_bound_relative;
    s.power_quadrature_degree = q.rule.exact_degree();
    s.power_quadrature_nodes = q.rule.num_nodes();
    // The digits the bound leaves (at most those of a double).
    s.power_significant_digits =
        q.error_bound_relative > 0
            ? std::min(PowerSignificantDigits(1.0, 1.0), -std::log10(q.error_bound_relative))
            : PowerSignificantDigits(1.0, 1.0);
    r.active_resistance_ohm = Eigen::VectorXd::Constant(static_cast<Eigen::Index>(array.size()),
                                                        std::numeric_limits<double>::quiet_NaN());
    s.power_route = PowerRoute::kQuadrature;
  } else if (power.route == PowerRoute::kMatrix) {
    r.resistance_ohm = ResistanceMatrix(array, options.field.num_threads);
    r.radiated_power_w = RadiatedPower(r.resistance_ohm, currents);
    s.power_significant_digits =
        PowerSignificantDigits(r.radiated_power_w, PowerTermMagnitudes(r.resistance_ohm, currents));
    // The active resistances need the mutual reactances too: summed row by row
    // (O(N) memory) rather than from a second, complex N x N matrix.
    r.active_resistance_ohm =
        RadiatedPowerStreamed(array, currents, options.field.num_threads, power_progress)
            .active_resistance_ohm;
    s.power_route = PowerRoute::kMatrix;
  } else {
    const StreamedPower sp =
        RadiatedPowerStreamed(array, currents, options.field.num_threads, power_progress);
    r.radiated_power_w = sp.radiated_power_w;
    s.power_significant_digits = PowerSignificantDigits(sp.radiated_power_w, sp.term_magnitudes_w);
    r.active_resistance_ohm = sp.active_resistance_ohm;
    s.power_route = PowerRoute::kStreamed;
  }
  s.radiated_power_w = r.radiated_power_w;
  s.seconds_power = SecondsSince(t0);
  power_progress(1.0);
  CheckRadiatedPower(r.radiated_power_w);

  // The grid is planned and computed in blocks of whole theta rows, so the plan's
  // per-direction data (unit vectors, fast-path buffers) is bounded by the block,
  // not the grid. A grid up to block_directions is one block, exactly as one plan
  // over the whole grid. Each block is finished (floor, U, D, polarization: all per
  // direction, so the same bits whatever the blocks) and handed to the sink.
  const std::size_t n = grid.size();
  const std::size_t np = grid.phi_deg.size();
  const std::size_t rows_per_block = std::max<std::size_t>(1, options.block_directions / np);
  s.field_method_given = options.field.method;
  r.field_floor_v = FieldFloor_v(array, currents);
  std::size_t& blocks = progress.blocks;
  std::size_t& fast_blocks = progress.fast_blocks;
  progress.power_why = power.why;
  PeakTracker peak;
  FarField part;
  PatternResult b;  // the block being finished
  b.radiated_power_w = r.radiated_power_w;
  b.field_floor_v = r.field_floor_v;
  b.grid.phi_deg = grid.phi_deg;
  for (std::size_t row = first_row; row < last_row; row += rows_per_block) {
    auto tb = Clock::now();
    const std::size_t rows = std::min(rows_per_block, last_row - row);
    b.grid.theta_deg.assign(grid.theta_deg.begin() + static_cast<std::ptrdiff_t>(row),
                            grid.theta_deg.begin() + static_cast<std::ptrdiff_t>(row + rows));
    // Held only while the block's field is computed: gone before the block is
    // finished and handed over, so plan and finished rows never coexist.
    std::optional<FieldPlan> plan;
    plan.emplace(array, Directions::FromGrid(b.grid), options.field);
    s.seconds_plan += SecondsSince(tb);
    tb = Clock::now();
    s.num_sources = plan->num_sources();
    const bool fast = plan->method_used() == FieldMethod::kFast;
    ++blocks;
    if (fast) ++fast_blocks;
    std::vector<FastTransform>& used = s.fast_transforms_used;
    const FastTransform transform = plan->fast_transform();
    if (transform != FastTransform::kNone &&
        std::find(used.begin(), used.end(), transform) == used.end()) {
      used.push_back(transform);
    }
    // Sub-chunks only so progress can be reported; the fast path transforms the
    // whole block at once, so it runs as one.
    const std::size_t nb = plan->num_directions();
    const std::size_t chunk =
        fast ? nb
             : std::max<std::size_t>(1, (1u << 22) / std::max<std::size_t>(1, plan->num_sources()));
    if (chunk < nb) {
      b.field.e_theta.resize(static_cast<Eigen::Index>(nb));
      b.field.e_phi.resize(static_cast<Eigen::Index>(nb));
    }
    const std::size_t offset = row * np;
    for (std::size_t first = 0; first < nb; first += chunk) {
      const std::size_t count = std::min(chunk, nb - first);
      plan->ExecuteRange(currents, first, count, part);
      s.field_error_bound_relative =
          std::max(s.field_error_bound_relative, part.error_bound_relative);
      if (count == nb) {  // the block in one chunk: taken over, not copied
        b.field.e_theta.swap(part.e_theta);
        b.field.e_phi.swap(part.e_phi);
        part = FarField();
      } else {
        const auto at = static_cast<Eigen::Index>(first);
        const auto len = static_cast<Eigen::Index>(count);
        b.field.e_theta.segment(at, len) = part.e_theta;
        b.field.e_phi.segment(at, len) = part.e_phi;
      }
      if (options.progress) {
        options.progress(power_share + (1.0 - power_share) *
                                           static_cast<double>(offset + first + count) /
                                           static_cast<double>(n));
      }
    }
    plan.reset();
    s.seconds_field += SecondsSince(tb);
    tb = Clock::now();
    if (finish_blocks) {
      DeriveFromField(b, options.field.num_threads);
      peak.Add(offset, b.directivity);
    }
    s.seconds_polarization += SecondsSince(tb);
    sink(row, b);
    // One field buffer per block at a time: a block taken over whole is released
    // before the next is computed.
    if (chunk >= nb) b.field = FarField();
  }
  if (finish_blocks) SetPeak(s, grid, peak.index(), peak.value());
  return progress;
}

// The summary's entries that need every block (the driver of a split grid merges
// blocks and fast_blocks first).
void CloseSummary(PatternInProgress& progress, const PatternOptions& options) {
  ComputeSummary& s = progress.result.summary;
  s.field_method_used = progress.fast_blocks > 0 ? FieldMethod::kFast : FieldMethod::kDirect;
  s.message = RouteMessage(s, progress.fast_blocks, progress.blocks, options, progress.power_why);
  s.num_directions = progress.result.grid.size();
  s.pairs = static_cast<double>(s.num_directions) * static_cast<double>(s.num_sources);
}

}  // namespace

PatternResult ComputePatternBlocks(const Array& array, const Eigen::VectorXcd& currents,
                                   const AngularGrid& grid, const PatternOptions& options,
                                   const PatternBlockSink& sink) {
  PatternInProgress progress =
      RunBlocks(array, currents, grid, options, sink, true, 0, grid.theta_deg.size());
  CloseSummary(progress, options);
  return std::move(progress.result);
}

PatternInProgress ComputePatternRows(const Array& array, const Eigen::VectorXcd& currents,
                                     const AngularGrid& grid, const PatternOptions& options,
                                     std::size_t first_row, std::size_t last_row) {
  // The blocks gathered into the whole grid's field (the rows outside the share stay
  // zero), allocated once the first block's plan is gone, so the field never sits
  // beside a block's plan: the peak stays the in-memory result plus one plan.
  FarField all;
  const auto n = static_cast<Eigen::Index>(grid.size());
  const bool share = first_row > 0 || last_row < grid.theta_deg.size();
  const auto allocate = [&] {
    if (all.e_theta.size() != 0) return;
    all.e_theta.resize(n);
    all.e_phi.resize(n);
    if (share) all.e_theta.setZero(), all.e_phi.setZero();
  };
  const PatternBlockSink gather = [&](std::size_t row, const PatternResult& b) {
    allocate();
    const auto at = static_cast<Eigen::Index>(row * grid.phi_deg.size());
    all.e_theta.segment(at, b.field.e_theta.size()) = b.field.e_theta;
    all.e_phi.segment(at, b.field.e_phi.size()) = b.field.e_phi;
  };
  PatternInProgress progress =
      RunBlocks(array, currents, grid, options, gather, false, first_row, last_row);
  allocate();  // an empty share
  progress.result.field = std::move(all);
  return progress;
}

PatternResult FinishPattern(PatternInProgress&& progress, const PatternOptions& options) {
  // Finished (floor, U, D, polarization: per direction, so the same bits as the
  // streamed blocks'); the peak by PeakIndex on the whole grid (PeakTracker gives the
  // same index, tests/pattern_stream_test.cpp).
  CloseSummary(progress, options);
  PatternResult r = std::move(progress.result);
  const auto t0 = Clock::now();
  DeriveFromField(r, options.field.num_threads);
  const Eigen::Index peak = PeakIndex(r.directivity);
  SetPeak(r.summary, r.grid, static_cast<std::size_t>(peak), r.directivity[peak]);
  r.summary.seconds_polarization += SecondsSince(t0);
  return r;
}

PatternResult ComputePattern(const Array& array, const Eigen::VectorXcd& currents,
                             const AngularGrid& grid, const PatternOptions& options) {
  return FinishPattern(ComputePatternRows(array, currents, grid, options, 0, grid.theta_deg.size()),
                       options);
}

}  // namespace lobecast
