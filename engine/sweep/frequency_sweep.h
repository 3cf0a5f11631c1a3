// Frequency sweeps (CONVENTIONS §3 "Frequency sweeps"): one array's pattern at every
// frequency of a list, the excitation following frequency as the hardware would.
//
// The geometry (positions, lengths) is fixed in metres; the electrical size changes
// with k. The currents at each frequency:
//  - steered dipoles of a design, phase mode: the phase shifters keep their phases,
//    so the currents are the design's at every frequency (the beam squints);
//  - steered dipoles, delay mode: the true-time delays tau_n = r_hat0 . r_n / c0 are
//    kept, so I_n(f) = I_n(f0) exp(-j 2 pi (f - f0) tau_n): at f0 the design currents
//    (tapers, nulls and objectives included), elsewhere the same weights behind the
//    delays (no squint of the steered beam);
//  - every other current-forced dipole keeps its current (fixed phasors);
//  - with a circuit (drive, load or wires), the circuit is solved again at every
//    frequency (mutual impedances and wire self reactances follow k; a given
//    self_reactance is held), with the current-forced ports as above.
// The field plan depends on k (the phases k r_hat . r_n), so each frequency is
// planned and computed afresh; the grid and the options are shared.
#pragma once

#include <cstddef>
#include <functional>
#include <limits>
#include <optional>
#include <vector>

#include <Eigen/Core>

#include "engine/analysis/analysis_types.h"
#include "engine/coupling/coupling.h"
#include "engine/pattern.h"
#include "engine/synthesis/steering.h"
#include "engine/types.h"

namespace lobecast {

struct SweepExcitation {
  // The terminal currents at the design frequency (the array's frequency_hz), one
  // per dipole; for a circuit, the solved ones.
  Eigen::VectorXcd design_currents_a;
  // The steering of dipoles [steered_first, steered_first + steered_count) (a
  // design's generated elements); unset: every dipole keeps its current.
  std::optional<Steering> steering;
  std::size_t steered_first = 0;
  std::size_t steered_count = 0;
  // The circuit, when the array has one (NeedsCoupling): ports and wires as read;
  // the current-forced ports' currents are replaced by the retuned ones.
  bool coupled = false;
  std::vector<Port> ports;
  std::vector<Wire> wires;
  CouplingOptions coupling;
};

// The current-forced currents at frequency_hz (before any circuit solve):
// design_currents_a, with the steered dipoles' retuned in delay mode. Exactly the
// design currents at the design frequency. Throws InvalidArgument on f <= 0.
Eigen::VectorXcd SweepCurrentsAt(const Array& array, const SweepExcitation& excitation,
                                 double frequency_hz);

// The figures of one frequency, from the pattern analysis (refined off the grid).
struct FrequencyPoint {
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  double frequency_hz = 0;
  double peak_directivity_dbi = kNaN;  // refined
  double peak_theta_deg = kNaN;
  double peak_phi_deg = kNaN;  // NaN on the z axis
  double radiated_w = 0;       // for the currents of this frequency
  // Half-power beamwidths in the analysis' two principal planes (BeamCut), +inf where
  // the beam does not fall to half power within the cut.
  CutPlane first_plane = CutPlane::kElevation;
  CutPlane second_plane = CutPlane::kOrthogonal;
  double half_power_first_deg = kNaN;
  double half_power_second_deg = kNaN;
  // The highest side lobe re the peak (dB); -inf when the pattern has none.
  double sidelobe_db = kNaN;
  bool analysed = false;  // false: the analysis failed (the figures above NaN)
  // With a circuit: the gain at the peak, dBi (realized: 4 pi U / P_available when
  // every source has one, else 4 pi U / P_accepted, as the result's /pattern gain),
  // and the worst input match over the driven and current-forced ports (largest
  // |Gamma| against the reference impedance, and its VSWR). NaN without a circuit.
  bool gain_is_realized = false;
  double gain_dbi = kNaN;
  double worst_reflection = kNaN;  // |Gamma|, linear
  double worst_vswr = kNaN;
};

// The angle (deg) between two points' refined peaks: the beam squint of `p` from the
// design point. NaN when either was not analysed. A peak on the z axis (phi NaN) is
// the axis whatever its phi.
double SquintDeg(const FrequencyPoint& p, const FrequencyPoint& design);

// The figures of one computed frequency. coupling: the circuit solved for it, or null.
FrequencyPoint SummarizeFrequency(double frequency_hz, const PatternResult& result,
                                  const PatternAnalysis* analysis, const CouplingResult* coupling);

struct SweepOptions {
  PatternOptions pattern;  // its progress is replaced by the sweep's
  AnalysisOptions analysis;
  // Called with (frequency index, fraction of the whole sweep done in [0, 1]).
  std::function<void(std::size_t, double)> progress;
};

struct FrequencySweep {
  std::vector<FrequencyPoint> points;  // one per frequency, in the given order
  std::size_t num_directions = 0;
  // Directivity (linear) per frequency, (F, Nt * Np) row-major, theta-major rows.
  std::vector<double> directivity;
};

// What is already computed at the design frequency (compute's own result for
// excitation.design_currents_a, its analysis and circuit, each null when absent).
struct DesignPoint {
  const PatternResult* result = nullptr;
  const PatternAnalysis* analysis = nullptr;
  const CouplingResult* coupling = nullptr;
};

// Frequency i of `frequencies_hz` computed and analysed on its own (its currents,
// circuit, pattern, analysis): its figures and directivity grid. RunFrequencySweep is
// this for every frequency in order (the first taken from DesignPoint when given); a
// driver that splits the frequencies among processes (cli/mpi) calls it per index.
struct SweepFrequency {
  FrequencyPoint point;
  Eigen::VectorXd directivity;  // linear, the grid's (Nt * Np), theta-major
};
SweepFrequency ComputeSweepFrequency(const Array& array, const std::vector<double>& frequencies_hz,
                                     std::size_t index, const SweepExcitation& excitation,
                                     const AngularGrid& grid, const SweepOptions& options);

// Computes and analyses every frequency of `frequencies_hz` (the first is the
// array's design frequency, array.frequency_hz). With design.result set, the first
// point is taken from it instead of being computed again (so the sweep's first row
// is the result's own analysis). Throws InvalidArgument when a frequency's currents
// radiate nothing or its circuit cannot be solved.
FrequencySweep RunFrequencySweep(const Array& array, const std::vector<double>& frequencies_hz,
                                 const SweepExcitation& excitation, const AngularGrid& grid,
                                 const SweepOptions& options, const DesignPoint& design = {});

}  // namespace lobecast
