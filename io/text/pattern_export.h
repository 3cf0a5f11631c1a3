// Plain-text tables of pattern samples for spreadsheets and scripts: CSV or TSV,
// one header row, then one row per direction, every row with the same number of
// columns. The notes (source, coordinates, reference, safety) go either into a last
// `notes` column, one note per row from the first (the rest of the column empty; a
// table shorter than its notes joins the remainder into its last row): a
// rectangular table that spreadsheets, Python's csv module and pandas open as is;
// or as '#' lines before the header, for readers that skip comments (numpy,
// gnuplot); or not at all. Cells holding the separator or a quote are quoted as in
// RFC 4180. Numbers never depend on the locale: '.' as the decimal mark, or ','
// with `decimal_comma` (then CSV cells are separated by ';', the convention of
// locales that write a decimal comma). Precision: kFull writes the shortest
// decimal that reads back to the same double (io/text/number_text.h); kDisplay
// rounds angles and dB values to 0.001 and fields to 6 significant digits. "-inf"
// stands for the dB value of a zero, "nan" for an undefined axial ratio or tilt.
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
enum class ExportPrecision { kDisplay, kFull };
enum class NotesStyle { kColumn, kComments };
enum class ExportCoordinates { kThetaPhi, kAzimuthElevation };
std::string_view ToString(ExportFormat f);       // "csv", "tsv"
std::string_view ToString(ExportCoordinates c);  // "theta-phi", "az-el"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<ExportFormat> ExportFormatFromString(std::string_view s);
std::optional<ExportCoordinates> ExportCoordinatesFromString(std::string_view s);
std::string_view ToString(ExportPrecision p);  // "display", "full"
std::optional<ExportPrecision> ExportPrecisionFromString(std::string_view s);

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
  // Notes without newlines, placed as notes_style says.
  std::vector<std::string> notes;
  NotesStyle notes_style = NotesStyle::kComments;
  ExportPrecision precision = ExportPrecision::kFull;
  bool decimal_comma = false;
};

// The cell separator: '\t' for TSV, ';' for CSV with a decimal comma, else ','.
char Separator(const PatternTableOptions& options);

// Appends a text cell, quoted (RFC 4180) when it holds the separator, a quote or a
// newline (also for the link and exposure tables).
void AppendText(std::string& out, const std::string& text, char sep);

// The header row's column names, in order.
std::vector<std::string> PatternTableColumns(const PatternTableOptions& options);

void WritePatternTable(std::ostream& out, const std::vector<ExportSample>& samples,
                       const PatternTableOptions& options);

}  // namespace lobecast
