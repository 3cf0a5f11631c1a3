// The scan impedance (engine/coupling/scan.h) as text: a table of |Gamma| per
// element against scan angle for people, and a CSV with one row per scan angle and
// element for spreadsheets.
#pragma once

#include <string>

#include "engine/coupling/scan.h"
#include "engine/sweep/scan_sweep.h"

namespace lobecast::text {

// reference: what Gamma is measured against, for the heading (e.g. "50 ohm").
std::string ScanTable(const ScanImpedanceTable& table, const std::string& reference);

// Header: theta_deg,phi_deg,element,active_resistance_ohm,active_reactance_ohm,
// reflection_magnitude,reflection_phase_deg,vswr (shortest round-trip numbers).
std::string ScanCsv(const ScanImpedanceTable& table);

// The pattern at each steering direction (engine/sweep/scan_sweep.h), for people:
// steering angle, peak directivity, scan loss, beam direction and pointing error,
// half-power beamwidths, side-lobe level, grating lobes, and the grating-lobe onset.
// broadside: how the scan loss's reference was steered, for the heading.
std::string ScanPatternTable(const ScanSweep& sweep, const std::string& broadside);

// Header: steer_theta_deg,steer_phi_deg,peak_directivity_dbi,scan_loss_db,peak_theta_deg,
// peak_phi_deg,pointing_error_deg,half_power_first_deg,half_power_second_deg,sidelobe_db,
// other_major_lobes,grating_lobes (empty where unknown); shortest round-trip numbers, NaN an empty
// cell.
std::string ScanPatternCsv(const ScanSweep& sweep);

}  // namespace lobecast::text
