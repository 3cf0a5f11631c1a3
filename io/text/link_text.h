// A link budget as text for people, one CSV row for spreadsheets, and JSON
// (`lobecast link`): the transmitter's gain toward the receiver, EIRP, free-space
// path loss, the receiver's gain, the polarization loss factor, the received power,
// the margin against a sensitivity, and where the far field begins. The figures come
// from engine/link (Friis, PLF, far-field region) and io/text/link_station.h (each
// end's exact field); this file only lays them out.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "engine/link/far_field_region.h"
#include "engine/link/link_budget.h"
#include "io/text/link_station.h"

namespace lobecast::text {

struct LinkEnd {
  std::string result_path;  // empty: a receiver given by its gain and polarization
  std::string name;         // the array's name, if any
  StationToward toward;     // result ends only
  GainBasis basis;
  FarFieldRegionResult region;  // result ends only
  bool ground_pec = false;      // the result stands over PEC ground
};

struct LinkReport {
  double frequency_hz = 0;
  double wavelength_m = 0;
  double power_w = 0;
  double distance_m = 0;
  // The receiver seen from the transmitter (its own coordinates), deg.
  DirectionDeg toward;
  // Positions of the two results' origins in the common frame (m), when given so.
  std::optional<Vec3> tx_position_m, rx_position_m;
  // The receiver's rotation in the common frame, when given: axis and angle (deg).
  std::optional<Vec3> rx_rotation_axis;
  double rx_rotation_deg = 0;
  LinkEnd tx;
  LinkEnd rx;
  // A receiver given by numbers: its gain (linear) and whether the user gave it, and
  // the wave polarization it is matched to (nullopt: assumed matched, PLF 1).
  double given_rx_gain = 1;
  bool rx_gain_given = false;
  std::optional<PolarizationReference> rx_polarization;
  double polarization_loss_factor = 1;
  LinkBudget budget;
  std::optional<double> sensitivity_dbm;
  // Everything the figures should be read with (far-field validity, ground), one
  // sentence each.
  std::vector<std::string> cautions;
};

// The cautions of a link: inside the far-field distance of either end (2 D^2 /
// lambda, or a few wavelengths: common practice), both ends over PEC ground, a
// polarization that is undefined.
std::vector<std::string> LinkCautions(const LinkReport& r);

// dBm of a power in W: 10 log10(P / 1 mW) (-inf at 0).
double ToDbm(double watts);

std::string LinkText(const LinkReport& r);
// Header and one row (units in the names), the cautions and the safety note in a
// last `notes` column, one per row from the top (io/text/pattern_export.h style).
std::string LinkCsv(const LinkReport& r);
std::string LinkJson(const LinkReport& r);

// A table with a `notes` last column: each row its cells (already separated by
// ','), the notes one per row from the top, the last row taking what is left
// (joined by " | "). Shared by the link and exposure tables.
std::string CsvWithNotes(const std::string& header, const std::vector<std::string>& rows,
                         const std::vector<std::string>& notes);

}  // namespace lobecast::text
