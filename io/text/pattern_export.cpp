#include "io/text/pattern_export.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

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

std::string_view ToString(ExportPrecision p) {
  return p == ExportPrecision::kDisplay ? "display" : "full";
}

std::optional<ExportPrecision> ExportPrecisionFromString(std::string_view s) {
  const std::string l = Lower(s);
  if (l == "display") return ExportPrecision::kDisplay;
  if (l == "full") return ExportPrecision::kFull;
  return std::nullopt;
}

char Separator(const PatternTableOptions& o) {
  if (o.format == ExportFormat::kTsv) return '\t';
  return o.decimal_comma ? ';' : ',';
}

namespace {

// How a column's numbers are rounded at ExportPrecision::kDisplay.
enum class Rounding { kThousandths, kSignificant6 };

void AppendNumber(std::string& out, double v, Rounding r, const PatternTableOptions& o) {
  // An undefined number (the tilt of a circular field) is an empty cell: spreadsheets
  // leave it out of sums, averages and charts (a "nan" text cell would plot as 0 in
  // some), pandas and numpy.genfromtxt read it as NaN.
  if (std::isnan(v)) return;
  const std::size_t start = out.size();
  if (o.precision == ExportPrecision::kFull || !std::isfinite(v)) {
    AppendShortest(out, v);
  } else {
    char buf[48];
    if (r == Rounding::kThousandths) {
      std::snprintf(buf, sizeof buf, "%.3f", v);
      std::string t = buf;
      if (t.find('.') != std::string::npos) {
        while (t.back() == '0') t.pop_back();
        if (t.back() == '.') t.pop_back();
      }
      if (t == "-0") t = "0";
      out += t;
    } else {
      std::snprintf(buf, sizeof buf, "%.6g", v);
      out += buf;
    }
  }
  if (o.decimal_comma)
    std::replace(out.begin() + static_cast<std::ptrdiff_t>(start), out.end(), '.', ',');
}

}  // namespace

void AppendText(std::string& out, const std::string& text, char sep) {
  if (text.find_first_of(std::string{sep, '"', '\n', '\r'}) == std::string::npos) {
    out += text;
    return;
  }
  out += '"';
  for (char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
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
  if (o.notes_style == NotesStyle::kColumn && !o.notes.empty()) c.emplace_back("notes");
  return c;
}

void WritePatternTable(std::ostream& out, const std::vector<ExportSample>& samples,
                       const PatternTableOptions& o) {
  const char sep = Separator(o);
  const bool notes_column = o.notes_style == NotesStyle::kColumn && !o.notes.empty();
  std::string line;
  if (!notes_column) {
    for (const std::string& note : o.notes) out << "# " << note << '\n';
  }
  const std::vector<std::string> columns = PatternTableColumns(o);
  for (std::size_t k = 0; k < columns.size(); ++k) {
    if (k > 0) line += sep;
    line += columns[k];
  }
  out << line << '\n';

  const double per_v2 = DirectivityPerSquaredField(o.radiated_power_w);
  for (std::size_t row = 0; row < samples.size(); ++row) {
    const ExportSample& s = samples[row];
    line.clear();
    auto field = [&](double v, Rounding r) {
      if (!line.empty()) line += sep;
      AppendNumber(line, v, r, o);
    };
    constexpr Rounding kFixed = Rounding::kThousandths;
    if (o.cut_angle_column) field(s.cut_angle_deg, kFixed);
    if (o.coordinates == ExportCoordinates::kAzimuthElevation) {
      field(s.phi_deg, kFixed);
      field(90.0 - s.theta_deg, kFixed);
    } else {
      field(s.theta_deg, kFixed);
      field(s.phi_deg, kFixed);
    }
    const CoCross cc =
        CoCrossOf(s.e_theta, s.e_phi, s.phi_deg * kDegree, o.reference, o.field_floor_v);
    field(ToDb(s.directivity), kFixed);
    field(ToDb(per_v2 * std::norm(cc.co)), kFixed);
    field(ToDb(per_v2 * std::norm(cc.cross)), kFixed);
    field(s.axial_ratio_db, kFixed);
    field(s.tilt_deg, kFixed);
    line += sep;
    line += std::to_string(static_cast<int>(s.sense));
    field(std::arg(s.e_theta) / kDegree, kFixed);
    field(std::arg(s.e_phi) / kDegree, kFixed);
    field(std::abs(s.e_theta), Rounding::kSignificant6);
    field(std::abs(s.e_phi), Rounding::kSignificant6);
    if (notes_column) {
      line += sep;
      std::string note;
      if (row + 1 < samples.size()) {
        if (row < o.notes.size()) note = o.notes[row];
      } else {
        for (std::size_t k = row; k < o.notes.size(); ++k)
          note += (k > row ? " | " : "") + o.notes[k];
      }
      AppendText(line, note, sep);
    }
    out << line << '\n';
  }
}

}  // namespace lobecast
