#include "io/input/csv_dipoles.h"

#include <array>
#include <cmath>
#include <complex>
#include <optional>

#include "engine/text_case.h"
#include "io/input/units.h"

namespace lobecast {
namespace {

enum Column {
  kX,
  kY,
  kZ,
  kUx,
  kUy,
  kUz,
  kLength,
  kMagnitude,
  kPhase,
  kDistribution,  // the required columns come before this one, the optional from it on
  kRadius,
  kSelfReactance,
  kConductivity,
  kNumColumns
};
constexpr std::array<std::string_view, kNumColumns> kColumnNames = {
    "x",           "y",         "z",     "ux",           "uy",     "uz",
    "length",      "magnitude", "phase", "distribution", "radius", "self_reactance",
    "conductivity"};
constexpr std::string_view kRequiredList = "x, y, z, ux, uy, uz, length, magnitude, phase";

struct Cell {
  std::string_view text;  // trimmed
  int column = 1;         // 1-based column of the first non-blank character
};

std::vector<Cell> SplitRow(std::string_view line) {
  std::vector<Cell> cells;
  std::size_t start = 0;
  while (true) {
    const std::size_t comma = line.find(',', start);
    const std::size_t end = comma == std::string_view::npos ? line.size() : comma;
    std::string_view raw = line.substr(start, end - start);
    std::size_t lead = raw.find_first_not_of(" \t");
    if (lead == std::string_view::npos) lead = raw.size();
    std::size_t last = raw.find_last_not_of(" \t");
    std::string_view text =
        lead < raw.size() ? raw.substr(lead, last - lead + 1) : std::string_view{};
    cells.push_back({text, static_cast<int>(start + lead) + 1});
    if (comma == std::string_view::npos) break;
    start = comma + 1;
  }
  return cells;
}

std::string Quoted(std::string_view s) { return "'" + EchoText(s) + "'"; }

}  // namespace

std::vector<CsvDipole> ParseCsvDipoles(std::string_view text, const std::string& path,
                                       double metres_per_unit, std::size_t first_index) {
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);  // UTF-8 byte order mark

  std::array<int, kNumColumns> index_of{};  // cell index of each column, -1 if absent
  index_of.fill(-1);
  std::size_t header_cells = 0;
  bool have_header = false;
  std::vector<CsvDipole> out;

  int line_no = 0;
  std::size_t pos = 0;
  while (pos <= text.size()) {
    const std::size_t nl = text.find('\n', pos);
    std::string_view line =
        text.substr(pos, nl == std::string_view::npos ? std::string_view::npos : nl - pos);
    pos = nl == std::string_view::npos ? text.size() + 1 : nl + 1;
    ++line_no;
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    const std::size_t first = line.find_first_not_of(" \t");
    if (first == std::string_view::npos || line[first] == '#') continue;

    const std::vector<Cell> cells = SplitRow(line);
    if (!have_header && line.find(';') != std::string_view::npos) {
      // A table saved by a spreadsheet in a locale with a decimal comma.
      throw InputError(SourceLocation{path, line_no, static_cast<int>(line.find(';')) + 1},
                       "header",
                       "cells separated by ';' ('" + EchoText(line.substr(first), 40) + "')",
                       "cells separated by ',' and numbers with a '.' decimal mark (save the "
                       "table as CSV with ',' as the separator, e.g. in an English locale)");
    }
    if (!have_header) {
      for (std::size_t i = 0; i < cells.size(); ++i) {
        const SourceLocation at{path, line_no, cells[i].column};
        const std::string name = Lower(cells[i].text);
        int col = -1;
        for (int c = 0; c < kNumColumns; ++c) {
          if (name == kColumnNames[c]) col = c;
        }
        if (col < 0) {
          throw InputError(at,
                           cells[i].text.empty() ? "column " + std::to_string(i + 1)
                                                 : std::string(cells[i].text),
                           cells[i].text.empty() ? "an empty header cell" : "unknown column",
                           "one of " + std::string(kCsvColumnList));
        }
        if (index_of[col] >= 0) {
          throw InputError(at, name, "a second '" + name + "' column",
                           "each column once in the header");
        }
        index_of[col] = static_cast<int>(i);
      }
      for (int c = 0; c < kDistribution; ++c) {
        if (index_of[c] < 0) {
          throw InputError(SourceLocation{path, line_no, 1}, std::string(kColumnNames[c]),
                           "no '" + std::string(kColumnNames[c]) + "' column in the header",
                           "columns " + std::string(kRequiredList) + " (distribution optional)");
        }
      }
      header_cells = cells.size();
      have_header = true;
      continue;
    }

    const std::size_t n = first_index + out.size();
    const std::string prefix = "dipole[" + std::to_string(n) + "]";
    if (cells.size() != header_cells) {
      throw InputError(SourceLocation{path, line_no, 1}, prefix,
                       std::to_string(cells.size()) + " cells",
                       std::to_string(header_cells) + " cells, one per header column");
    }
    auto cell = [&](Column c) -> const Cell& {
      return cells[static_cast<std::size_t>(index_of[c])];
    };
    auto where = [&](Column c) { return SourceLocation{path, line_no, cell(c).column}; };
    auto key = [&](Column c) { return prefix + "." + std::string(kColumnNames[c]); };
    auto number = [&](Column c) {
      const Cell& k = cell(c);
      const auto v = ParseNumber(k.text);
      if (!v) {
        throw InputError(where(c), key(c), k.text.empty() ? "an empty cell" : Quoted(k.text),
                         "a number");
      }
      if (!std::isfinite(*v)) throw InputError(where(c), key(c), Quoted(k.text), "a finite number");
      return *v;
    };

    CsvDipole d;
    d.row = SourceLocation{path, line_no, 1};
    d.z_cell = where(kZ);
    d.length_cell = where(kLength);
    // One cell after the other (a constructor's arguments are evaluated in no fixed
    // order): with two bad cells the first is reported on every compiler.
    const double x = number(kX), y = number(kY), z = number(kZ);
    d.dipole.position_m = Vec3(x, y, z) * metres_per_unit;
    const double ux = number(kUx), uy = number(kUy), uz = number(kUz);
    const Vec3 u(ux, uy, uz);
    if (!(u.stableNorm() > 0.0)) {
      throw InputError(where(kUx), prefix + ".ux/uy/uz", "the zero vector (0, 0, 0)",
                       "a non-zero orientation vector");
    }
    d.dipole.orientation = u / u.stableNorm();
    const double length = number(kLength);
    if (!(length > 0.0)) {
      throw InputError(where(kLength), key(kLength), FormatNumber(length), "a length > 0");
    }
    d.dipole.length_m = length * metres_per_unit;
    const double magnitude = number(kMagnitude);
    if (magnitude < 0.0) {
      throw InputError(where(kMagnitude), key(kMagnitude), FormatNumber(magnitude),
                       "a magnitude >= 0 (A peak; reverse the sign with phase = 180)");
    }
    const double phase_deg = number(kPhase);
    d.current_a = std::polar(magnitude, phase_deg * kDegree);
    if (index_of[kDistribution] >= 0 && !cell(kDistribution).text.empty()) {
      const auto dist = DistributionFromString(cell(kDistribution).text);
      if (!dist) {
        throw InputError(where(kDistribution), key(kDistribution), Quoted(cell(kDistribution).text),
                         "uniform or triangular");
      }
      d.dipole.distribution = *dist;
    }
    // The wire, as the TOML keys of the same names (array_reader.h): an empty cell
    // or a missing column is not given.
    auto optional_number = [&](Column c) -> std::optional<double> {
      if (index_of[c] < 0 || cell(c).text.empty()) return std::nullopt;
      return number(c);
    };
    if (const auto r = optional_number(kRadius)) {
      if (!(*r > 0.0) || *r * metres_per_unit >= 0.5 * d.dipole.length_m) {
        throw InputError(where(kRadius), key(kRadius), FormatNumber(*r),
                         "a radius > 0 and below half the length: a thin wire");
      }
      d.wire.radius_m = *r * metres_per_unit;
    }
    if (const auto x = optional_number(kSelfReactance)) d.wire.reactance_ohm = *x;
    if (const auto s = optional_number(kConductivity)) {
      if (!(*s > 0.0)) {
        throw InputError(where(kConductivity), key(kConductivity), FormatNumber(*s),
                         "a conductivity > 0 (S/m)");
      }
      if (!(d.wire.radius_m > 0)) {
        throw InputError(where(kConductivity), key(kConductivity),
                         "a conductivity without a radius",
                         "a radius cell as well (the loss depends on it)");
      }
      d.wire.conductivity_s_m = *s;
    }
    out.push_back(std::move(d));
  }
  if (!have_header) {
    throw InputError(SourceLocation{path, 1, 1}, "header", "no header row",
                     "a header row naming the columns (" + std::string(kRequiredList) + ")");
  }
  return out;
}

}  // namespace lobecast
