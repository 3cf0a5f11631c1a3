// A frequency sweep in a result file (CONVENTIONS §3 "Frequency sweeps"), added by
// `compute` through ResultWriteOptions::before_finish beside the usual datasets,
// which hold the design (first) frequency so every reader of a plain result works.
//
// Layout (names in schema.h, VisitSweepColumns; F frequencies, file order, the
// first the design frequency):
//   /sweep                 attrs design_frequency_hz, steering ("phase", "delay",
//                          "none"); with a circuit gain_is_realized (0/1) and
//                          gain_definition
//   frequency_hz (F) Hz, peak_directivity_dbi (F) dBi, peak_theta_deg,
//   peak_phi_deg (F) deg (the refined peak; phi NaN on the z axis), radiated_w (F) W,
//   half_power_first_deg, half_power_second_deg (F) deg (the analysis' two principal
//   planes, named per frequency in first_plane, second_plane (F) strings; +inf where
//   the beam does not fall to half power), sidelobe_db (F) dB re the peak (-inf:
//   none), directivity (F, Nt, Np) linear;
//   with a circuit: gain_dbi (F) dBi at the peak, worst_reflection (F) |Gamma| and
//   worst_vswr (F) over the fed ports.
#pragma once

#include <string>
#include <string_view>

#include "engine/sweep/frequency_sweep.h"
#include "io/hdf5/result_writer.h"

namespace lobecast {

struct SweepFileInfo {
  std::string_view steering = "none";  // "phase", "delay" or "none"
  bool coupled = false;
  std::string gain_definition;  // with a circuit
};

void WriteSweep(PatternFileWriter& w, const FrequencySweep& sweep, const AngularGrid& grid,
                const SweepFileInfo& info);

}  // namespace lobecast
