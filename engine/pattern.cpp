// The whole pattern job on a grid (pattern.h).
#include "engine/pattern.h"
#include "engine/threads.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <sstream>

#include <omp.h>

#include "engine/error.h"
#include "engine/polarization.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"

namespace lobecast {
namespace {

using Clock = std::chrono::steady_clock;
double SecondsSince(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

}  // namespace

Eigen::Index PeakIndex(const Eigen::VectorXd& directivity) {
  const double max = directivity.maxCoeff();
  Eigen::Index i = 0;
  while (directivity[i] < max * (1.0 - 1e-9)) ++i;
  return i;
}

PatternResult ComputePattern(const Array& array, const AngularGrid& grid,
                             const PatternOptions& options) {
  Validate(array);
  FieldOptions field_options;
  field_options.num_threads = options.num_threads;
  field_options.method = options.method;
  field_options.tolerance_relative = options.tolerance_relative;
  std::string why;
  if (!field_options.IsValid(&why)) throw InvalidArgument(why);
  if (grid.size() == 0) throw InvalidArgument("grid: found no directions, expected at least one");
  PatternResult r;
  r.grid = grid;
  ComputeSummary& s = r.summary;
  s.threads_used = ResolveThreads(options.num_threads);
  s.num_dipoles = array.size();

  auto t0 = Clock::now();
  const Eigen::VectorXcd currents = CurrentsOf(array);
  if (array.size() <= options.resistance_matrix_max_dipoles || options.store_resistance_matrix) {
    r.resistance_ohm = ResistanceMatrix(array);
    r.radiated_power_w = RadiatedPower(r.resistance_ohm, currents);
    r.active_resistance_ohm = ActiveResistance(r.resistance_ohm, currents);
    s.power_method = "matrix";
  } else {
    const StreamedPower sp = RadiatedPowerStreamed(array, currents, options.num_threads);
    r.radiated_power_w = sp.radiated_power_w;
    r.active_resistance_ohm = sp.active_resistance_ohm;
    s.power_method = "streamed";
  }
  s.radiated_power_w = r.radiated_power_w;
  s.seconds_power = SecondsSince(t0);
  CheckRadiatedPower(r.radiated_power_w);

  // The grid is planned and computed in blocks of whole theta rows, so the plan's
  // per-direction data (unit vectors, fast-path buffers) is bounded by the block,
  // not the grid: peak memory is the result itself plus O(block + N). A grid up
  // to block_directions is one block, exactly as one plan over the whole grid.
  const std::size_t n = grid.size();
  const std::size_t np = grid.phi_deg.size();
  const std::size_t rows_per_block = std::max<std::size_t>(1, options.block_directions / np);
  r.field.e_theta.resize(static_cast<Eigen::Index>(n));
  r.field.e_phi.resize(static_cast<Eigen::Index>(n));
  s.method_requested = std::string(ToString(options.method));
  bool any_fast = false;
  FarField part;
  for (std::size_t row = 0; row < grid.theta_deg.size(); row += rows_per_block) {
    auto tb = Clock::now();
    const std::size_t rows = std::min(rows_per_block, grid.theta_deg.size() - row);
    AngularGrid block;
    block.theta_deg.assign(grid.theta_deg.begin() + static_cast<std::ptrdiff_t>(row),
                           grid.theta_deg.begin() + static_cast<std::ptrdiff_t>(row + rows));
    block.phi_deg = grid.phi_deg;
    const FieldPlan plan(array, Directions::FromGrid(block), field_options);
    s.seconds_plan += SecondsSince(tb);
    tb = Clock::now();
    s.num_sources = plan.num_sources();
    const bool fast = plan.method_used() == FieldMethod::kFast;
    any_fast = any_fast || fast;
    const std::string transform(ToString(plan.fast_transform()));
    if (s.fast_transform == "none") {
      s.fast_transform = transform;
    } else if (transform != "none" && s.fast_transform.find(transform) == std::string::npos) {
      s.fast_transform += "+" + transform;
    }
    // Sub-chunks only so progress can be reported; the fast path transforms the
    // whole block at once, so it runs as one.
    const std::size_t nb = plan.num_directions();
    const std::size_t chunk =
        fast ? nb
             : std::max<std::size_t>(1, (1u << 22) / std::max<std::size_t>(1, plan.num_sources()));
    const std::size_t offset = row * np;
    for (std::size_t first = 0; first < nb; first += chunk) {
      const std::size_t count = std::min(chunk, nb - first);
      plan.ExecuteRange(currents, first, count, part);
      s.field_error_bound_relative =
          std::max(s.field_error_bound_relative, part.error_bound_relative);
      const auto at = static_cast<Eigen::Index>(offset + first);
      const auto len = static_cast<Eigen::Index>(count);
      r.field.e_theta.segment(at, len) = part.e_theta;
      r.field.e_phi.segment(at, len) = part.e_phi;
      if (options.progress) {
        options.progress(static_cast<double>(offset + first + count) / static_cast<double>(n));
      }
    }
    s.seconds_field += SecondsSince(tb);
  }
  s.method = any_fast ? "fast" : "direct";
  s.num_directions = n;
  s.pairs = static_cast<double>(n) * static_cast<double>(s.num_sources);

  t0 = Clock::now();
  const auto nn = static_cast<Eigen::Index>(n);
  r.intensity_w_sr.resize(nn);
  r.directivity.resize(nn);
  r.axial_ratio_db.resize(nn);
  r.tilt_deg.resize(nn);
  r.sense.resize(n);
  const double to_d = 4.0 * kPi / r.radiated_power_w;
#pragma omp parallel for num_threads(s.threads_used) schedule(static)
  for (Eigen::Index i = 0; i < nn; ++i) {
    const Complex et = r.field.e_theta[i], ep = r.field.e_phi[i];
    // U = |rE|^2 / (2 eta0) for peak phasors (CONVENTIONS §1).
    const double u = (std::norm(et) + std::norm(ep)) / (2.0 * kEta0_ohm);
    r.intensity_w_sr[i] = u;
    r.directivity[i] = to_d * u;
    const Polarization p = PolarizationOf(et, ep);
    r.axial_ratio_db[i] = p.axial_ratio_db;
    r.tilt_deg[i] = p.tilt_deg;
    r.sense[static_cast<std::size_t>(i)] = p.sense;
  }
  const Eigen::Index peak = PeakIndex(r.directivity);
  s.peak_directivity = r.directivity[peak];
  s.peak_theta_deg = grid.theta_deg[static_cast<std::size_t>(peak) / np];
  s.peak_phi_deg = grid.phi_deg[static_cast<std::size_t>(peak) % np];
  s.seconds_polarization = SecondsSince(t0);
  return r;
}

}  // namespace lobecast
