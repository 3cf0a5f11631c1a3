// Far-field RF-exposure estimates as text, CSV and JSON (`lobecast exposure`): per
// direction the gain, the EIRP, the distance at which the far-field power density
// falls to the limit the user gave, r = sqrt(EIRP / (4 pi S_lim)), and optionally the
// density at a given distance (engine/link/exposure.h). Every output carries the
// exposure note (io/safety_note.h, kExposureNote) in full.
#pragma once

#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "engine/link/far_field_region.h"
#include "io/text/link_station.h"

namespace lobecast::text {

struct ExposureRow {
  std::string kind;  // "worst" (the refined peak), "toward" (asked for), "cut"
  double theta_deg = 0, phi_deg = 0;
  double cut_angle_deg = std::numeric_limits<double>::quiet_NaN();  // along a cut, else NaN
  double directivity = 0;                                           // linear
  double gain = 0;                                                  // linear
  double eirp_w = 0;
  double distance_to_limit_m = 0;
  double density_w_m2 = std::numeric_limits<double>::quiet_NaN();  // at the --distance
  bool exact = true;  // computed through the engine (false: read from the stored grid)
};

struct ExposureReport {
  std::string result_path, name;
  double frequency_hz = 0;
  Ground ground = Ground::kNone;
  double power_w = 0;
  GainBasis basis;
  double limit_w_m2 = 0;
  std::optional<double> distance_m;
  FarFieldRegionResult region;
  std::string rows_what;  // "the worst direction and the cut phi = 40 deg (grid)"
  std::vector<ExposureRow> rows;
  std::vector<std::string> cautions;
  std::string map_path;  // empty: no map
};

// Warnings: a distance to the limit, or a distance asked, inside the far-field
// distance (the estimate does not hold there).
std::vector<std::string> ExposureCautions(const ExposureReport& r);
// What the ground means for the figures: over PEC the reflection is in the pattern
// for theta < 90 deg (a real ground differs); in free space reflections are missing.
std::string ExposureGroundNote(Ground ground);

std::string ExposureText(const ExposureReport& r);
std::string ExposureCsv(const ExposureReport& r);
std::string ExposureJson(const ExposureReport& r);

}  // namespace lobecast::text
