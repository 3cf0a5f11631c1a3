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
  kPort,  // the circuit columns: port, then the drive and load values
  kVoltage,
  kResistance,
  kReactance,
  kNumColumns
};
constexpr std::array<std::string_view, kNumColumns> kColumnNames = {"x",
                                                                    "y",
                                                                    "z",
                                                                    "ux",
                                                                    "uy",
                                                                    "uz",
                                                                    "length",
                                                                    "magnitude",
                                                                    "phase",
                                                                    "distribution",
                                                                    "radius",
                                                                    "self_reactance",
                                                                    "conductivity",
                                                                    "port",
                                                                    "voltage",
                                                                    "resistance",
                                                                    "reactance"};
constexpr std::string_view kRequiredList = "x, y, z, ux, uy, uz, length, magnitude, phase";
constexpr std::string_view kPortRequiredList = "x, y, z, ux, uy, uz, length";

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

// One data row: its cells by column, located errors keyed dipole[N].<column>.
struct Row {
  const std::vector<Cell>& cells;
  const std::array<int, kNumColumns>& index_of;
  const std::string& path;
  int line = 0;
  std::string prefix;  // "dipole[N]"

  bool has_column(Column c) const { return index_of[c] >= 0; }
  // A non-empty cell in a column the header names.
  bool given(Column c) const { return has_column(c) && !cell(c).text.empty(); }
  const Cell& cell(Column c) const { return cells[static_cast<std::size_t>(index_of[c])]; }
  SourceLocation where(Column c) const { return SourceLocation{path, line, cell(c).column}; }
  std::string key(Column c) const { return prefix + "." + std::string(kColumnNames[c]); }
  double number(Column c) const {
    const Cell& k = cell(c);
    const auto v = ParseNumber(k.text);
    if (!v) {
      throw InputError(where(c), key(c), k.text.empty() ? "an empty cell" : Quoted(k.text),
                       "a number");
    }
    if (!std::isfinite(*v)) throw InputError(where(c), key(c), Quoted(k.text), "a finite number");
    return *v;
  }
  // An empty cell or a missing column: not given.
  std::optional<double> optional_number(Column c) const {
    if (!given(c)) return std::nullopt;
    return number(c);
  }
};

// What drives the row's dipole, as a [[dipole]] table's current, drive or load key
// (CONVENTIONS §3): an empty port cell or no port column is a current row.
Port ReadPort(const Row& row, double reference_ohm) {
  PortKind kind = PortKind::kCurrent;
  if (row.given(kPort)) {
    const std::string_view text = row.cell(kPort).text;
    bool known = false;
    for (PortKind k : {PortKind::kCurrent, PortKind::kDrive, PortKind::kLoad}) {
      if (EqualsIgnoreCase(text, ToString(k))) {
        kind = k;
        known = true;
      }
    }
    if (!known) {
      throw InputError(row.where(kPort), row.key(kPort), Quoted(text),
                       "current, drive or load (an empty cell: current)");
    }
  }
  const std::string name(ToString(kind));
  // A cell that belongs to another kind of port: refused, not ignored.
  auto refuse = [&](Column c, std::string_view belongs_to) {
    if (!row.given(c)) return;
    throw InputError(row.where(c), row.key(c),
                     "a " + std::string(kColumnNames[c]) + " cell in a " + name + " row",
                     "an empty cell (" + std::string(kColumnNames[c]) + " belongs to " +
                         std::string(belongs_to) + ")");
  };
  auto non_negative = [&](Column c, double fallback, std::string_view expected) {
    const std::optional<double> v = row.optional_number(c);
    if (v && *v < 0)
      throw InputError(row.where(c), row.key(c), FormatNumber(*v), std::string(expected));
    return v.value_or(fallback);
  };
  Port p;
  p.kind = kind;
  if (kind == PortKind::kCurrent) {
    refuse(kVoltage, "drive rows");
    refuse(kResistance, "drive and load rows");
    refuse(kReactance, "drive and load rows");
    if (!row.has_column(kMagnitude)) {
      throw InputError(row.where(kPort), row.prefix + ".magnitude",
                       "a current row and no 'magnitude' column",
                       "a magnitude column (A peak) for current rows");
    }
    const double magnitude = row.number(kMagnitude);
    if (magnitude < 0.0) {
      throw InputError(row.where(kMagnitude), row.key(kMagnitude), FormatNumber(magnitude),
                       "a magnitude >= 0 (A peak; reverse the sign with phase = 180)");
    }
    // Without a port column every row is a current row and its phase cell is required.
    const double phase =
        row.has_column(kPort) ? row.optional_number(kPhase).value_or(0.0) : row.number(kPhase);
    p.current_a = std::polar(magnitude, phase * kDegree);
    return p;
  }
  refuse(kMagnitude, "current rows");
  const std::string passive = "a resistance >= 0 ohm (sources and loads are passive)";
  if (kind == PortKind::kDrive) {
    if (!row.given(kVoltage)) {
      throw InputError(row.has_column(kVoltage) ? row.where(kVoltage) : row.where(kPort),
                       row.prefix + ".voltage", "a drive row without a voltage",
                       "a voltage cell (V peak; phase default 0, resistance default the "
                       "reference impedance, reactance default 0)");
    }
    const double volts =
        non_negative(kVoltage, 0.0, "a voltage >= 0 (V peak; reverse the sign with phase = 180)");
    const double phase_deg = row.optional_number(kPhase).value_or(0.0);
    p.voltage_v = std::polar(volts, phase_deg * kDegree);
    p.impedance_ohm = Complex(non_negative(kResistance, reference_ohm, passive),
                              row.optional_number(kReactance).value_or(0.0));
    return p;
  }
  refuse(kVoltage, "drive rows");
  refuse(kPhase, "current and drive rows");
  p.impedance_ohm = Complex(non_negative(kResistance, 0.0, passive),
                            row.optional_number(kReactance).value_or(0.0));
  return p;
}

}  // namespace

std::vector<CsvDipole> ParseCsvDipoles(std::string_view text, const std::string& path,
                                       double metres_per_unit, std::size_t first_index,
                                       double reference_ohm) {
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
      // With a port column, magnitude and phase belong to the current rows only.
      const bool ports = index_of[kPort] >= 0;
      for (int c = 0; c < kDistribution; ++c) {
        if (ports && (c == kMagnitude || c == kPhase)) continue;
        if (index_of[c] < 0) {
          throw InputError(
              SourceLocation{path, line_no, 1}, std::string(kColumnNames[c]),
              "no '" + std::string(kColumnNames[c]) + "' column in the header",
              ports ? "columns " + std::string(kPortRequiredList) +
                          " (the others optional with a port column)"
                    : "columns " + std::string(kRequiredList) + " (distribution optional)");
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
    const Row row{cells, index_of, path, line_no, prefix};
    auto cell = [&](Column c) -> const Cell& { return row.cell(c); };
    auto where = [&](Column c) { return row.where(c); };
    auto key = [&](Column c) { return row.key(c); };
    auto number = [&](Column c) { return row.number(c); };

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
    d.port = ReadPort(row, reference_ohm);
    d.current_a = d.port.current_a;
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
    auto optional_number = [&](Column c) { return row.optional_number(c); };
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
    if (d.port.kind != PortKind::kCurrent && std::isnan(d.wire.reactance_ohm) &&
        !(d.wire.radius_m > 0 && d.dipole.distribution == Distribution::kTriangular)) {
      // As for a [[dipole]] table (array_reader.cpp): the circuit needs X_self.
      const std::string kind(ToString(d.port.kind));
      throw InputError(
          SourceLocation{path, line_no, cells[static_cast<std::size_t>(index_of[kPort])].column},
          prefix + ".port", "a " + kind + " row without a self reactance",
          d.dipole.distribution == Distribution::kTriangular
              ? "a radius cell (the self reactance follows from it) or a "
                "self_reactance cell (ohm)"
              : "a self_reactance cell (ohm): a uniform current's self reactance "
                "depends on its end loading, which no wire formula covers");
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
