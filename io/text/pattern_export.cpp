#include "io/text/pattern_export.h"

#include <algorithm>
#include <cmath>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/intensity.h"
#include "engine/text_case.h"
#include "io/text/number_text.h"

namespace lobecast {

std::string_view ToString(ExportFormat f) { return f == ExportFormat::kTsv ? "tsv" : "csv"; }

std::string_view ToString(ExportCoordinates c) {
  return c == ExportCoordinates::kAzimuthElevation ? "az-el" : "theta-phi";
}

std::optional<ExportFormat> ExportFormatFromString(std::string_view s) {
  const std::string l = Lower(s);
  if (l == "csv") return ExportFormat::kCsv;
  if (l == "tsv") return ExportFormat::kTsv;
  return std::nullopt;
}

std::optional<ExportCoordinates> ExportCoordinatesFromString(std::string_view s) {
  const std::string l = Lower(s);
  if (l == "theta-phi") return ExportCoordinates::kThetaPhi;
  if (l == "az-el") return ExportCoordinates::kAzimuthElevation;
  return std::nullopt;
}

std::string CoordinateDefinition(ExportCoordinates c) {
  if (c == ExportCoordinates::kAzimuthElevation) {
    return "azimuth_deg: angle in the xy plane from +x toward +y (= phi); elevation_deg: angle "
           "above the xy plane toward +z (= 90 - theta)";
  }
  return "theta_deg: angle from +z; phi_deg: angle in the xy plane from +x toward +y";
}

std::vector<std::string> PatternTableColumns(const PatternTableOptions& o) {
  std::vector<std::string> c;
  if (o.cut_angle_column) c.push_back("cut_angle_deg");
  if (o.coordinates == ExportCoordinates::kAzimuthElevation) {
    c.insert(c.end(), {"azimuth_deg", "elevation_deg"});
  } else {
    c.insert(c.end(), {"theta_deg", "phi_deg"});
  }
  c.insert(c.end(), {"directivity_dBi", "co_dBi", "cross_dBi", "axial_ratio_dB", "tilt_deg",
                     "sense", "phase_theta_deg", "phase_phi_deg", "rE_theta_V", "rE_phi_V"});
  return c;
}

void WritePatternTable(std::ostream& out, const std::vector<ExportSample>& samples,
                       const PatternTableOptions& o) {
  const char sep = o.format == ExportFormat::kTsv ? '\t' : ',';
  std::string line;
  for (const std::string& note : o.notes) out << "# " << note << '\n';
  const std::vector<std::string> columns = PatternTableColumns(o);
  for (std::size_t k = 0; k < columns.size(); ++k) {
    if (k > 0) line += sep;
    line += columns[k];
  }
  out << line << '\n';

  const double per_v2 = DirectivityPerSquaredField(o.radiated_power_w);
  for (const ExportSample& s : samples) {
    line.clear();
    auto field = [&](double v) {
      if (!line.empty()) line += sep;
      AppendShortest(line, v);
    };
    if (o.cut_angle_column) field(s.cut_angle_deg);
    if (o.coordinates == ExportCoordinates::kAzimuthElevation) {
      field(s.phi_deg);
      field(90.0 - s.theta_deg);
    } else {
      field(s.theta_deg);
      field(s.phi_deg);
    }
    const CoCross cc =
        CoCrossOf(s.e_theta, s.e_phi, s.phi_deg * kDegree, o.reference, o.field_floor_v);
    field(ToDb(s.directivity));
    field(ToDb(per_v2 * std::norm(cc.co)));
    field(ToDb(per_v2 * std::norm(cc.cross)));
    field(s.axial_ratio_db);
    field(s.tilt_deg);
    line += sep;
    line += std::to_string(static_cast<int>(s.sense));
    field(std::arg(s.e_theta) / kDegree);
    field(std::arg(s.e_phi) / kDegree);
    field(std::abs(s.e_theta));
    field(std::abs(s.e_phi));
    out << line << '\n';
  }
}

}  // namespace lobecast
