// The scan impedance (engine/coupling/scan.h) as text: a table of |Gamma| per
// element against scan angle for people, and a CSV with one row per scan angle and
// element for spreadsheets.
#pragma once

#include <string>

#include "engine/coupling/scan.h"

namespace lobecast::text {

// reference: what Gamma is measured against, for the heading (e.g. "50 ohm").
std::string ScanTable(const ScanImpedanceTable& table, const std::string& reference);

// Header: theta_deg,phi_deg,element,active_resistance_ohm,active_reactance_ohm,
// reflection_magnitude,reflection_phase_deg,vswr (shortest round-trip numbers).
std::string ScanCsv(const ScanImpedanceTable& table);

}  // namespace lobecast::text
