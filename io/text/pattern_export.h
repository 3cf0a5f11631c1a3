// Plain-text tables of pattern samples for spreadsheets and scripts: CSV or TSV,
// optional '#' note lines first, then one header row, then one row per direction,
// every row with the same number of columns. Numbers are the shortest decimal that
// reads back to the same double (io/text/number_text.h), '.' as the decimal point
// whatever the locale; "-inf" stands for the dB value of a zero, "nan" for an
// undefined axial ratio or tilt (no field).
//
// Columns (units in the names):
//   cut_angle_deg            phi and great-circle cuts only (io/text/export_samples.h)
//   theta_deg, phi_deg       or azimuth_deg, elevation_deg (see CoordinateDefinition)
//   directivity_dBi          10 log10 D
//   co_dBi, cross_dBi        directivity of the co- and cross-polar component for the
//                            reference (Ludwig-3 x or y, or RHCP / LHCP)
//   axial_ratio_dB, tilt_deg, sense   IEEE Std 145-2013; sense +1 right, -1 left,
//                            0 linear or no field
//   phase_theta_deg, phase_phi_deg    arg rE_theta, arg rE_phi in (-180, 180]
//   rE_theta_V, rE_phi_V     |rE_theta|, |rE_phi| (V, peak)
#pragma once

#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "engine/polarization.h"
#include "io/text/export_samples.h"

namespace lobecast {

enum class ExportFormat { kCsv, kTsv };
enum class ExportCoordinates { kThetaPhi, kAzimuthElevation };
std::string_view ToString(ExportFormat f);       // "csv", "tsv"
std::string_view ToString(ExportCoordinates c);  // "theta-phi", "az-el"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<ExportFormat> ExportFormatFromString(std::string_view s);
std::optional<ExportCoordinates> ExportCoordinatesFromString(std::string_view s);

// One line defining the coordinates, for the notes: theta from +z and phi from +x
// toward +y; or azimuth = phi (from +x toward +y in the xy plane) and elevation =
// 90 deg - theta (above the xy plane).
std::string CoordinateDefinition(ExportCoordinates c);

struct PatternTableOptions {
  ExportFormat format = ExportFormat::kCsv;
  ExportCoordinates coordinates = ExportCoordinates::kThetaPhi;
  PolarizationReference reference = PolarizationReference::kLinearX;
  bool cut_angle_column = false;
  // Radiated power of the currents (W), for the co- and cross-polar directivities.
  double radiated_power_w = 1.0;
  // The numerical floor (PatternResult::field_floor_v): co and cross parts below it are
  // exact zeros (-inf dBi).
  double field_floor_v = 0.0;
  // Written first, each as "# " + note (notes must not contain newlines).
  std::vector<std::string> notes;
};

// The header row's column names, in order.
std::vector<std::string> PatternTableColumns(const PatternTableOptions& options);

void WritePatternTable(std::ostream& out, const std::vector<ExportSample>& samples,
                       const PatternTableOptions& options);

}  // namespace lobecast
