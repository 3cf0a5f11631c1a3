// Scan sweeps: one array steered over a list of directions at its own frequency, the
// pattern computed and analysed at each (`lobecast scan --pattern`). Per steering
// direction: the refined peak (directivity, direction, pointing error from the steering
// direction), the scan loss (peak directivity re the beam steered to broadside), the
// half-power beamwidths in the principal planes, the side-lobe level, and for a
// periodic lattice the grating lobes in visible space (grating_lobes.h).
//
// The currents at a steering direction r_hat0 are a_n exp(-j k r_hat0 . r_n)
// (steering.h), a_n the taper: the same currents the scan impedance (coupling/scan.h)
// uses, so the two tables describe one excitation.
#pragma once

#include <cstddef>
#include <functional>
#include <limits>
#include <optional>
#include <vector>

#include <Eigen/Core>

#include "engine/analysis/analysis_types.h"
#include "engine/pattern.h"
#include "engine/synthesis/lattice_generator.h"
#include "engine/types.h"

namespace lobecast {

struct ScanPoint {
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  double steer_theta_deg = 0, steer_phi_deg = 0;  // where the beam was steered
  double peak_directivity_dbi = kNaN;             // refined
  double peak_theta_deg = kNaN, peak_phi_deg = kNaN;
  // The angle between the refined peak and the steering direction (deg): the element
  // pattern pulls the beam off it, and a grating lobe can take the peak over.
  double pointing_error_deg = kNaN;
  // peak directivity re the broadside beam's (dB, <= 0 when scanning costs).
  double scan_loss_db = kNaN;
  double half_power_first_deg = kNaN, half_power_second_deg = kNaN;  // +inf: not reached
  double sidelobe_db = kNaN;  // highest side lobe re the peak; -inf: none
  // Other lobes as high as the main beam (PatternAnalysis::major_lobes: a mirror
  // beam, a full-height grating lobe), which the side-lobe level leaves out.
  int other_major_lobes = -1;
  // Grating lobes of the lattice in visible space at this steering (-1: no lattice).
  int grating_lobes = -1;
  bool analysed = false;
};

struct ScanSweepOptions {
  PatternOptions pattern;  // its progress is replaced by the sweep's
  AnalysisOptions analysis;
  // The lattice of a design, for the grating lobes; unset: not counted (-1).
  std::optional<LatticeSpec> lattice;
  // Broadside, for the scan loss: the direction the beam is steered to for the
  // reference directivity (the lattice's broadside, or +z for an explicit array).
  Vec3 broadside = Vec3::UnitZ();
  std::function<void(double)> progress;  // fraction of the sweep done, 0..1
};

struct ScanSweep {
  std::vector<ScanPoint> points;
  double broadside_directivity_dbi = std::numeric_limits<double>::quiet_NaN();
  // The first steering direction (in the given order) with a grating lobe in visible
  // space; unset when none has (or no lattice is known).
  std::optional<std::size_t> grating_onset;
};

// theta_rad and phi_rad of the same length; amplitudes one per dipole (the taper,
// complex). Throws InvalidArgument for an invalid array, amplitudes that radiate
// nothing, or mismatched sizes.
ScanSweep RunScanSweep(const Array& array, const Eigen::VectorXcd& amplitudes,
                       const std::vector<double>& theta_rad, const std::vector<double>& phi_rad,
                       const AngularGrid& grid, const ScanSweepOptions& options);

}  // namespace lobecast
