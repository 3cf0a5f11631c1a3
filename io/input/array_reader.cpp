#include "io/input/array_reader.h"

#include <algorithm>
#include <cmath>
#include <complex>
#include <filesystem>
#include <initializer_list>
#include <limits>
#include <optional>
#include <string_view>
#include <utility>
#include <vector>

#include <toml++/toml.h>

#include "engine/error.h"
#include "engine/power/radiated_power.h"
#include "io/input/csv_dipoles.h"
#include "io/input/design_reader.h"
#include "io/input/excitation_synthesis.h"
#include "io/input/frequency_grid_reader.h"
#include "io/input/text_file.h"
#include "io/input/toml_values.h"
#include "io/input/units.h"

namespace lobecast {
namespace {

struct DipoleSite {
  SourceLocation where;     // table header or CSV row
  SourceLocation position;  // position value (TOML) or z cell (CSV)
  std::string position_key;
  SourceLocation length;
  std::string length_key;
};

// The frequencies and the grid are read by the base (frequency_grid_reader.h).
class Reader : private FrequencyGridReader {
 public:
  Reader(std::string_view text, std::string path, std::string base_dir)
      : FrequencyGridReader(std::move(path)), text_(text), base_dir_(std::move(base_dir)) {}

  ArrayDescription Read() {
    ArrayDescription out;
    out.source_path = path_;
    out.source_text = std::string(text_);

    toml::table root;
    try {
      root = toml::parse(text_, std::string_view(path_));
    } catch (const toml::parse_error& e) {
      throw InputError(At(e.source()), "TOML syntax error: " + std::string(e.description()));
    }

    const bool design = IsDesign(root);
    if (design) {
      CheckKeys(root, "",
                {"name", "description", "frequency", "ground", "length_unit", "dipoles_csv", "grid",
                 "dipole", "reference_impedance", "element", "lattice", "taper", "steer", "null",
                 "objective", "frequencies"});
    } else {
      CheckKeys(root, "",
                {"name", "description", "frequency", "ground", "length_unit", "dipoles_csv", "grid",
                 "dipole", "reference_impedance", "frequencies"});
    }
    if (const toml::node* n = root.get("name")) out.name = String(*n, "name");
    if (const toml::node* n = root.get("description")) out.description = String(*n, "description");

    if (root.get("frequencies"))
      ReadFrequencies(root, out);
    else
      ReadFrequency(root, out.array);
    ReadGround(root, out.array);

    const LengthUnit unit = ReadLengthUnit(root);
    out.length_unit = std::string(ToString(unit));
    scale_ = MetresPer(unit, out.array.wavelength_m());

    ReadGrid(root, out);
    if (const toml::node* n = root.get("reference_impedance")) {
      out.reference_impedance_ohm =
          Positive(*n, "reference_impedance", "a resistance in ohm", "a resistance");
    }

    if (design)
      AddGenerated(ReadDesignTables(root, path_, scale_, out.length_unit, out.array), out);
    if (const toml::node* n = root.get("dipole")) ReadDipoleTables(*n, out);
    if (const toml::node* n = root.get("dipoles_csv")) ReadCsv(*n, out);

    if (out.array.dipoles.empty()) {
      throw InputError(SourceLocation{path_, 1, 1}, "dipole", "no dipoles",
                       "at least one [[dipole]] table or a dipoles_csv file with one row");
    }
    CheckDipoles(out);
    bool any_source = false, any_circuit = false;
    for (const Port& p : out.ports) {
      any_source = any_source || (p.kind == PortKind::kCurrent && p.current_a != 0.0) ||
                   (p.kind == PortKind::kDrive && p.voltage_v != 0.0);
      any_circuit = any_circuit || p.kind != PortKind::kCurrent;
    }
    if (!any_source) {
      // With drives or loads, "magnitude" alone would name only the current key.
      throw InputError(out.dipole_locations.front(), "dipole[*].current",
                       any_circuit ? "every current magnitude and drive voltage is 0 (loads "
                                     "only re-radiate)"
                                   : "every magnitude is 0",
                       "at least one non-zero current or drive voltage (with none, nothing "
                       "radiates and directivity is undefined)");
    }

    // The given currents; 0 for drive and load until the circuit is solved.
    out.currents = Eigen::VectorXcd::Zero(static_cast<Eigen::Index>(out.ports.size()));
    for (std::size_t m = 0; m < out.ports.size(); ++m) {
      const Port& p = out.ports[m];
      if (p.kind == PortKind::kCurrent) out.currents[static_cast<Eigen::Index>(m)] = p.current_a;
    }
    if (out.design) ApplyExcitationSynthesis(out);
    CheckDipolePowers(out);
    try {
      Validate(out.array);
      ValidateCurrents(out.array, out.currents);
    } catch (const InvalidArgument& e) {
      throw InputError(SourceLocation{path_, 1, 1}, std::string("array rejected: ") + e.what());
    }
    return out;
  }

 private:
  void ReadGround(const toml::table& root, Array& array) const {
    const toml::node* n = root.get("ground");
    if (!n) return;  // default: free space
    const std::string s = String(*n, "ground");
    const auto g = GroundFromString(s);
    if (!g) throw InputError(At(*n), "ground", Quoted(s), "\"none\" or \"pec\"");
    array.ground = *g;
  }

  // The generated elements of a design, current-forced, ahead of the explicit ones.
  void AddGenerated(GeneratedDipoles g, ArrayDescription& out) {
    g.info.first_generated = out.array.dipoles.size();
    for (std::size_t i = 0; i < g.dipoles.size(); ++i) {
      out.array.dipoles.push_back(g.dipoles[i]);
      out.ports.push_back(Port{PortKind::kCurrent, g.currents[i], 0.0, 0.0});
      out.wires.push_back(g.wire);
      out.dipole_locations.push_back(g.where);
      sites_.push_back(DipoleSite{g.where, g.position, g.position_key, g.length, g.length_key});
    }
    for (const GratingLobe& lobe : g.info.grating_lobes) {
      out.warnings.push_back(g.where.ToString() +
                             ": warning: a grating lobe enters visible space at theta " +
                             FormatApprox(lobe.theta_rad / kDegree, 4) + " deg, phi " +
                             FormatApprox(lobe.phi_rad / kDegree, 4) +
                             " deg, as strong as the main beam (spacing too wide for this beam "
                             "direction)");
    }
    out.design = std::move(g.info);
  }

  void ReadDipoleTables(const toml::node& n, ArrayDescription& out) {
    const toml::array* a = n.as_array();
    if (!a) throw InputError(At(n), "dipole", Describe(n), "an array of tables ([[dipole]])");
    for (std::size_t i = 0; i < a->size(); ++i) {
      const toml::node& e = *a->get(i);
      const std::string key = "dipole[" + std::to_string(i) + "]";
      const toml::table* t = e.as_table();
      if (!t) throw InputError(At(e), key, Describe(e), "a table ([[dipole]])");
      CheckKeys(*t, key,
                {"position", "orientation", "length", "distribution", "current", "drive", "load",
                 "radius", "self_reactance", "conductivity"});
      auto require = [&](std::string_view name, std::string_view example) -> const toml::node& {
        const toml::node* v = t->get(name);
        if (!v) {
          throw InputError(At(*t), Join(key, name), "no " + std::string(name) + " key",
                           std::string(name) + " = " + std::string(example));
        }
        return *v;
      };

      Dipole d;
      DipoleSite site;
      site.where = At(*t);
      const toml::node& pos = require("position", "[x, y, z]");
      d.position_m = Vector3(pos, Join(key, "position"), "[x, y, z]") * scale_;
      site.position = At(pos);
      site.position_key = Join(key, "position");

      const toml::node& ori = require("orientation", "[ux, uy, uz]");
      const Vec3 u = Vector3(ori, Join(key, "orientation"), "[ux, uy, uz]");
      if (!(u.stableNorm() > 0.0)) {
        throw InputError(At(ori), Join(key, "orientation"), "the zero vector [0, 0, 0]",
                         "a non-zero vector along the current");
      }
      d.orientation = u / u.stableNorm();  // stableNorm: no overflow for huge components

      const toml::node& len = require("length", "<length in " + out.length_unit + ">");
      d.length_m = Positive(len, Join(key, "length"),
                            "a number (the length in " + out.length_unit + ")", "a length") *
                   scale_;
      site.length = At(len);
      site.length_key = Join(key, "length");

      if (const toml::node* v = t->get("distribution")) {
        const std::string s = String(*v, Join(key, "distribution"));
        const auto dist = DistributionFromString(s);
        if (!dist) {
          throw InputError(At(*v), Join(key, "distribution"), Quoted(s),
                           "\"uniform\" or \"triangular\"");
        }
        d.distribution = *dist;
      }

      Port port = ReadPort(*t, key, out.reference_impedance_ohm);
      out.ports.push_back(port);
      out.wires.push_back(ReadWire(*t, key, d.length_m, out.length_unit, scale_));
      const Wire& w = out.wires.back();
      if (w.radius_m > 0 && d.length_m < 30 * w.radius_m) {
        out.warnings.push_back(
            At(*t->get("radius")).ToString() + ": warning: key '" + Join(key, "radius") +
            "': length / radius = " + FormatApprox(d.length_m / w.radius_m, 3) +
            "; the thin-wire self reactance wants 30 or more (common practice): treat it as "
            "rough");
      }
      if (port.kind != PortKind::kCurrent && std::isnan(w.reactance_ohm) &&
          !(w.radius_m > 0 && d.distribution == Distribution::kTriangular)) {
        const std::string kind(ToString(port.kind));
        throw InputError(
            At(*t->get(kind)), Join(key, kind), "a " + kind + " without a self reactance",
            d.distribution == Distribution::kTriangular
                ? "radius = <wire radius> (the self reactance follows from it) or self_reactance = "
                  "<ohm>"
                : "self_reactance = <ohm>: a uniform current's self reactance depends on its end "
                  "loading (top hats, coils), which no wire formula covers");
      }
      out.array.dipoles.push_back(d);
      out.dipole_locations.push_back(site.where);
      sites_.push_back(std::move(site));
    }
  }

  // Exactly one of current, drive, load (CONVENTIONS §3, coupling keys).
  Port ReadPort(const toml::table& t, const std::string& key, double reference_ohm) const {
    const toml::node* found = nullptr;
    std::string_view found_name;
    for (std::string_view name : {"current", "drive", "load"}) {
      const toml::node* v = t.get(name);
      if (!v) continue;
      if (found) {
        throw InputError(At(*v), Join(key, name),
                         "both '" + std::string(found_name) + "' and '" + std::string(name) + "'",
                         "one of current, drive or load per dipole");
      }
      found = v;
      found_name = name;
    }
    if (!found) {
      throw InputError(At(t), Join(key, "current"), "no current, drive or load key",
                       "current = { magnitude = <A peak>, phase = <deg> }, or drive = { voltage = "
                       "<V peak>, phase = <deg> }, or load = { reactance = <ohm> }");
    }
    Port p;
    const std::string k = Join(key, found_name);
    if (found_name == "current") {
      p.current_a = Current(*found, k);
      return p;
    }
    const toml::table* pt = found->as_table();
    if (!pt) {
      throw InputError(At(*found), k, Describe(*found),
                       found_name == "drive" ? "{ voltage = <V peak>, phase = <deg>, resistance = "
                                               "<ohm>, reactance = <ohm> }"
                                             : "{ resistance = <ohm>, reactance = <ohm> }");
    }
    if (found_name == "drive") {
      CheckKeys(*pt, k, {"voltage", "phase", "resistance", "reactance"});
    } else {
      CheckKeys(*pt, k, {"resistance", "reactance"});
    }
    const double r_default = found_name == "drive" ? reference_ohm : 0.0;
    double r = r_default, x = 0;
    if (const toml::node* v = pt->get("resistance")) {
      r = Number(*v, Join(k, "resistance"), "a resistance in ohm");
      if (r < 0) {
        throw InputError(At(*v), Join(k, "resistance"), FormatNumber(r),
                         "a resistance >= 0 ohm (sources and loads are passive)");
      }
    }
    if (const toml::node* v = pt->get("reactance"))
      x = Number(*v, Join(k, "reactance"), "a reactance in ohm");
    p.impedance_ohm = Complex(r, x);
    if (found_name == "drive") {
      p.kind = PortKind::kDrive;
      const toml::node* v = pt->get("voltage");
      if (!v) {
        throw InputError(At(*pt), Join(k, "voltage"), "no voltage key",
                         "{ voltage = <V peak>, phase = <deg> } (phase default 0, resistance "
                         "default the reference impedance, reactance default 0)");
      }
      const double volts = Number(*v, Join(k, "voltage"), "a voltage in V peak");
      if (volts < 0) {
        throw InputError(At(*v), Join(k, "voltage"), FormatNumber(volts),
                         "a voltage >= 0 (V peak; reverse the sign with phase = 180)");
      }
      double phase_deg = 0;
      if (const toml::node* ph = pt->get("phase"))
        phase_deg = Number(*ph, Join(k, "phase"), "a phase in degrees");
      p.voltage_v = std::polar(volts, phase_deg * kDegree);
    } else {
      p.kind = PortKind::kLoad;
    }
    return p;
  }

  Complex Current(const toml::node& n, const std::string& key) const {
    const toml::table* t = n.as_table();
    if (!t) throw InputError(At(n), key, Describe(n), "{ magnitude = <A peak>, phase = <deg> }");
    CheckKeys(*t, key, {"magnitude", "phase"});
    const toml::node* m = t->get("magnitude");
    if (!m) {
      throw InputError(At(*t), Join(key, "magnitude"), "no magnitude key",
                       "{ magnitude = <A peak>, phase = <deg> } (phase optional, default 0)");
    }
    const double magnitude = Number(*m, Join(key, "magnitude"), "a current in A peak");
    if (magnitude < 0.0) {
      throw InputError(At(*m), Join(key, "magnitude"), FormatNumber(magnitude),
                       "a magnitude >= 0 (A peak; reverse the sign with phase = 180)");
    }
    double phase_deg = 0.0;
    if (const toml::node* p = t->get("phase"))
      phase_deg = Number(*p, Join(key, "phase"), "a phase in degrees");
    return std::polar(magnitude, phase_deg * kDegree);
  }

  void ReadCsv(const toml::node& n, ArrayDescription& out) {
    const std::string name = String(n, "dipoles_csv");
    std::filesystem::path p(name);
    if (p.is_relative() && !base_dir_.empty()) p = std::filesystem::path(base_dir_) / p;
    const std::string path = p.lexically_normal().string();
    std::string why;
    auto text = ReadTextFile(path, &why, kMaxCsvBytes);
    if (!text) {
      throw InputError(At(n), "dipoles_csv", Quoted(name) + " (" + path + ": " + why + ")",
                       "a readable CSV file, relative to the TOML file's directory");
    }
    if (IsHdf5(*text)) {
      throw InputError(At(n), "dipoles_csv", Quoted(name) + ", an HDF5 file (a lobecast result?)",
                       "a CSV element table (header x, y, z, ux, uy, uz, length, magnitude, "
                       "phase)");
    }
    const std::size_t first = out.array.dipoles.size();
    std::vector<CsvDipole> rows =
        ParseCsvDipoles(*text, path, scale_, first, out.reference_impedance_ohm);
    for (std::size_t i = 0; i < rows.size(); ++i) {
      const std::string key = "dipole[" + std::to_string(first + i) + "]";
      out.array.dipoles.push_back(rows[i].dipole);
      out.ports.push_back(rows[i].port);
      out.wires.push_back(rows[i].wire);
      out.dipole_locations.push_back(rows[i].row);
      sites_.push_back(DipoleSite{rows[i].row, rows[i].z_cell, key + ".z", rows[i].length_cell,
                                  key + ".length"});
    }
    if (rows.empty()) {
      out.warnings.push_back(SourceLocation{path, 1, 1}.ToString() +
                             ": warning: key 'dipoles_csv': the file has no dipole rows");
    }
    out.csv_path = path;
    out.csv_text = std::move(*text);
  }

  // The array's power a double cannot hold because of one dipole's own power: 0 W
  // when every dipole with a given current radiates below the smallest normal
  // double (frequency = 1e-300, length = 1e-300), inf when one radiates more than
  // the largest (magnitude = 1e300). The power check would report "the array
  // radiates 0 W" with no place; instead the key that takes the power out of range
  // is named: of frequency (k), length (Le) and current (|I|), the one farthest
  // from 1 in decades (P = |I|^2 R / 2 with R ~ (k Le)^2). Drive ports get their
  // currents later (the circuit), so an array with one is left to the power check.
  void CheckDipolePowers(const ArrayDescription& out) const {
    const double k = out.array.wavenumber_rad_m();
    std::optional<std::size_t> underflow;
    bool any_representable = false;
    for (std::size_t i = 0; i < out.array.dipoles.size() && i < out.ports.size(); ++i) {
      if (out.ports[i].kind == PortKind::kDrive) return;
      const double current = std::abs(out.currents[static_cast<Eigen::Index>(i)]);
      if (out.ports[i].kind != PortKind::kCurrent || !(current > 0.0)) continue;
      const Dipole& d = out.array.dipoles[i];
      const double power = 0.5 * current * current * MutualResistance(d, d, k);
      if (std::isinf(power)) Blame(out, i, current, "a power that overflows a double");
      if (std::isfinite(power) && power >= std::numeric_limits<double>::min()) {
        any_representable = true;
      } else if (!underflow) {
        underflow = i;
      }
    }
    if (underflow && !any_representable) {
      const std::size_t i = *underflow;
      Blame(out, i, std::abs(out.currents[static_cast<Eigen::Index>(i)]),
            "a power that underflows a double to 0 W");
    }
  }

  [[noreturn]] void Blame(const ArrayDescription& out, std::size_t i, double current,
                          const std::string& radiates) const {
    const Dipole& d = out.array.dipoles[i];
    const std::string fate = "dipole[" + std::to_string(i) + "] radiates " + radiates;
    const std::string expected =
        "a frequency, length and current whose radiated power is a representable number of "
        "watts";
    const auto decades = [](double v) { return std::abs(std::log10(v)); };
    const double by_frequency = decades(out.array.wavenumber_rad_m()),
                 by_length = decades(d.effective_length_m()), by_current = decades(current);
    if (by_frequency >= by_length && by_frequency >= by_current) {
      throw InputError(frequency_at_, "frequency",
                       FormatNumber(out.array.frequency_hz) + " Hz, at which " + fate, expected);
    }
    if (by_length >= by_current && i < sites_.size()) {
      throw InputError(sites_[i].length, sites_[i].length_key,
                       FormatApprox(d.length_m) + " m, with which " + fate, expected);
    }
    throw InputError(out.dipole_locations[i], "dipole[" + std::to_string(i) + "].current",
                     "a current of " + FormatNumber(current) + " A, with which " + fate, expected);
  }

  // Checks that need the whole array: lengths against the wavelength, the ground.
  // In a sweep, the shortest wavelength (the highest frequency) decides.
  void CheckDipoles(ArrayDescription& out) const {
    double lambda = out.array.wavelength_m();
    std::string at;  // which frequency, in a sweep
    if (out.frequencies_hz.size() > 1) {
      const double f_max = *std::max_element(out.frequencies_hz.begin(), out.frequencies_hz.end());
      lambda = kSpeedOfLight_m_s / f_max;
      at = " at the highest frequency, " + FormatNumber(f_max) + " Hz";
    }
    for (std::size_t i = 0; i < out.array.dipoles.size(); ++i) {
      const Dipole& d = out.array.dipoles[i];
      const DipoleSite& s = sites_[i];
      if (!d.position_m.allFinite()) {
        // A finite number of length units that overflows in metres.
        throw InputError(s.position, s.position_key, "a position that overflows a double in metres",
                         "coordinates of a physical size");
      }
      const std::string found =
          FormatApprox(d.length_m) + " m (" + FormatApprox(d.length_m / lambda, 4) + " wavelength)";
      if (d.length_m > 0.5 * lambda) {
        throw InputError(s.length, s.length_key, found,
                         "a length <= lambda/2 = " + FormatApprox(0.5 * lambda) + " m" + at +
                             "; an elemental dipole model is meaningless beyond that");
      }
      if (d.length_m > 0.1 * lambda) {
        std::string w = s.length.ToString() + ": warning: key '" + s.length_key + "': " + found +
                        " is longer than lambda/10 = " + FormatApprox(0.1 * lambda) + " m" + at +
                        "; the short-dipole model holds for lengths well below lambda/10";
        // Generated elements share one [element] length: say it once.
        if (out.warnings.empty() || out.warnings.back() != w) out.warnings.push_back(std::move(w));
      }
      if (out.array.ground == Ground::kPec && !(d.position_m.z() > 0.0)) {
        throw InputError(s.position, s.position_key, "z = " + FormatApprox(d.position_m.z()) + " m",
                         "z > 0: with ground = \"pec\" every dipole must be above the plane z = 0");
      }
    }
  }

  std::string_view text_;
  std::string base_dir_;
  double scale_ = 1.0;  // metres per length_unit
  std::vector<DipoleSite> sites_;
};

}  // namespace

ArrayDescription ParseArrayDescription(std::string_view text, const std::string& path_for_messages,
                                       const std::string& base_dir_for_csv) {
  return Reader(text, path_for_messages, base_dir_for_csv).Read();
}

ArrayDescription ReadArrayDescription(const std::string& path) {
  std::string why;
  const auto text = ReadTextFile(path, &why);
  if (!text)
    throw InputError(SourceLocation{path, 0, 0}, "cannot read the array description: " + why);
  if (IsHdf5(*text)) {
    throw InputError(SourceLocation{path, 0, 0},
                     "found an HDF5 file (a lobecast result?), expected an array description "
                     "(TOML); a result is read by 'lobecast report', 'export' and 'plot'");
  }
  const std::string base = std::filesystem::path(path).parent_path().string();
  return ParseArrayDescription(*text, path, base);
}

}  // namespace lobecast
