#include "engine/sweep/frequency_sweep.h"

#include <algorithm>
#include <cmath>
#include <complex>

#include <Eigen/Geometry>

#include "engine/analysis/pattern_analysis.h"
#include "engine/check.h"
#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/grid.h"

namespace lobecast {

Eigen::VectorXcd SweepCurrentsAt(const Array& array, const SweepExcitation& excitation,
                                 double frequency_hz) {
  if (!(frequency_hz > 0)) throw InvalidArgument("sweep frequencies must be > 0");
  Eigen::VectorXcd currents = excitation.design_currents_a;
  if (!excitation.steering || excitation.steering->mode != SteeringMode::kDelay ||
      frequency_hz == array.frequency_hz)
    return currents;
  // True time delay: the delays stay, so each steered current turns by
  // exp(-j 2 pi (f - f0) tau_n) (CONVENTIONS §3, design files; steering.h).
  std::vector<Vec3> positions;
  for (std::size_t n = 0; n < excitation.steered_count; ++n)
    positions.push_back(array.dipoles[excitation.steered_first + n].position_m);
  const std::vector<double> tau = SteeringDelays(positions, excitation.steering->direction);
  const double df = frequency_hz - array.frequency_hz;
  for (std::size_t n = 0; n < tau.size(); ++n) {
    const auto i = static_cast<Eigen::Index>(excitation.steered_first + n);
    currents[i] *= std::polar(1.0, -2.0 * kPi * df * tau[n]);
  }
  return currents;
}

double SquintDeg(const FrequencyPoint& p, const FrequencyPoint& design) {
  auto unit = [](const FrequencyPoint& q) {
    return UnitVectorAt(q.peak_theta_deg * kDegree,
                        std::isnan(q.peak_phi_deg) ? 0.0 : q.peak_phi_deg * kDegree);
  };
  if (std::isnan(p.peak_theta_deg) || std::isnan(design.peak_theta_deg))
    return FrequencyPoint::kNaN;
  const Vec3 a = unit(p), b = unit(design);
  // atan2 of |a x b| and a . b: accurate at small angles, where acos is not.
  return std::atan2(a.cross(b).norm(), a.dot(b)) / kDegree;
}

FrequencyPoint SummarizeFrequency(double frequency_hz, const PatternResult& result,
                                  const PatternAnalysis* analysis, const CouplingResult* coupling) {
  FrequencyPoint p;
  p.frequency_hz = frequency_hz;
  p.radiated_w = result.radiated_power_w;
  if (analysis) {
    p.analysed = true;
    p.peak_directivity_dbi = analysis->peak.directivity_dbi;
    p.peak_theta_deg = analysis->peak.direction.theta_deg;
    p.peak_phi_deg = analysis->peak.direction.phi_deg;
    p.first_plane = analysis->elevation_cut.plane;
    p.second_plane = analysis->orthogonal_cut.plane;
    p.half_power_first_deg = analysis->elevation_cut.half_power_width_deg;
    p.half_power_second_deg = analysis->orthogonal_cut.half_power_width_deg;
    p.sidelobe_db = analysis->highest_side_lobe ? analysis->highest_side_lobe->level_db
                                                : -std::numeric_limits<double>::infinity();
  }
  if (coupling) {
    // The reference power of the result's /pattern gain (coupling.h).
    p.gain_is_realized = coupling->available_w > 0;
    const double reference_w = p.gain_is_realized ? coupling->available_w : coupling->accepted_w;
    if (analysis && reference_w > 0)
      p.gain_dbi = ToDb(analysis->peak.directivity * coupling->radiated_w / reference_w);
    double worst = -1;
    for (Eigen::Index m = 0; m < coupling->reflection.size(); ++m) {
      const double g = std::abs(coupling->reflection[m]);
      if (std::isfinite(g)) worst = std::max(worst, g);
    }
    if (worst >= 0) {
      p.worst_reflection = worst;
      p.worst_vswr = Vswr(Complex(worst, 0.0));
    }
  }
  return p;
}

SweepFrequency ComputeSweepFrequency(const Array& array, const std::vector<double>& frequencies_hz,
                                     std::size_t i, const SweepExcitation& excitation,
                                     const AngularGrid& grid, const SweepOptions& options) {
  LOBECAST_CHECK_LT(i, frequencies_hz.size());
  const double f = frequencies_hz[i];
  const double total = static_cast<double>(frequencies_hz.size());
  Array at = array;
  at.frequency_hz = f;
  Eigen::VectorXcd currents = SweepCurrentsAt(array, excitation, f);
  std::optional<CouplingResult> coupling;
  if (excitation.coupled) {
    std::vector<Port> ports = excitation.ports;
    for (std::size_t m = 0; m < ports.size(); ++m)
      if (ports[m].kind == PortKind::kCurrent)
        ports[m].current_a = currents[static_cast<Eigen::Index>(m)];
    coupling = SolveCoupling(at, ports, excitation.wires, excitation.coupling);
    currents = coupling->circuit.current_a;
  }
  PatternOptions po = options.pattern;
  po.progress = [&](double frac) {
    if (options.progress) options.progress(i, (static_cast<double>(i) + frac) / total);
  };
  const PatternResult r = ComputePattern(at, currents, grid, po);
  std::optional<PatternAnalysis> a;
  try {
    a = AnalyzePattern(at, currents, r, options.analysis);
  } catch (const InvalidArgument&) {
    // The figures stay NaN (FrequencyPoint::analysed false); the pattern is kept.
  }
  return {SummarizeFrequency(f, r, a ? &*a : nullptr, coupling ? &*coupling : nullptr),
          r.directivity};
}

FrequencySweep RunFrequencySweep(const Array& array, const std::vector<double>& frequencies_hz,
                                 const SweepExcitation& excitation, const AngularGrid& grid,
                                 const SweepOptions& options, const DesignPoint& design) {
  if (frequencies_hz.empty() || frequencies_hz.front() != array.frequency_hz)
    throw InvalidArgument("a sweep's first frequency must be the array's design frequency");
  FrequencySweep out;
  out.num_directions = grid.size();
  out.directivity.reserve(frequencies_hz.size() * out.num_directions);
  const double total = static_cast<double>(frequencies_hz.size());
  for (std::size_t i = 0; i < frequencies_hz.size(); ++i) {
    SweepFrequency one;
    if (i == 0 && design.result) {
      one.point =
          SummarizeFrequency(frequencies_hz[i], *design.result, design.analysis, design.coupling);
      one.directivity = design.result->directivity;
    } else {
      one = ComputeSweepFrequency(array, frequencies_hz, i, excitation, grid, options);
    }
    LOBECAST_CHECK_EQ(static_cast<std::size_t>(one.directivity.size()), out.num_directions);
    out.directivity.insert(out.directivity.end(), one.directivity.data(),
                           one.directivity.data() + one.directivity.size());
    out.points.push_back(one.point);
    if (options.progress) options.progress(i, (static_cast<double>(i) + 1.0) / total);
  }
  return out;
}

}  // namespace lobecast
