#include "io/input/requirements_reader.h"

#include <cmath>

#include <toml++/toml.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/text_case.h"
#include "io/input/text_file.h"
#include "io/input/toml_values.h"
#include "io/input/units.h"

namespace lobecast {
namespace {

class RequirementsReader : private TomlValues {
 public:
  RequirementsReader(std::string_view text, std::string path)
      : TomlValues(std::move(path)), text_(text) {}

  RequirementsFile Read() {
    toml::table root;
    try {
      root = toml::parse(text_, std::string_view(path_));
    } catch (const toml::parse_error& e) {
      throw InputError(At(e.source()), "TOML syntax error: " + std::string(e.description()));
    }
    if (root.contains("lattice") && root["lattice"].is_table())
      throw InputError(At(*root.get("lattice")), "lattice", "a [lattice] table",
                       "a requirements file (lattice = \"rectangular\", \"triangular\" or "
                       "\"either\"); a design file goes to synth or compute");
    CheckKeys(root, "",
              {"name", "description", "frequency", "directivity_dbi", "beamwidth_deg",
               "sidelobe_db", "scan_deg", "ground", "ground_height", "polarization", "lattice",
               "max_elements", "max_aperture", "element_length", "length_unit", "axial_ratio_db"});
    RequirementsFile out;
    out.source_path = path_;
    SizingRequirements& r = out.requirements;
    if (const toml::node* n = root.get("name")) out.name = String(*n, "name");
    if (const toml::node* n = root.get("description")) out.description = String(*n, "description");
    r.frequency_hz = Frequency(root);
    const double lambda = r.wavelength_m();

    double scale = 1.0;
    if (root.get("length_unit")) {
      const LengthUnit u = ReadLengthUnit(root);
      out.length_unit = std::string(ToString(u));
      scale = MetresPer(u, lambda);
    }
    const std::string unit = " (" + out.length_unit + ")";

    if (const toml::node* n = root.get("directivity_dbi"))
      r.directivity_dbi = InRange(*n, "directivity_dbi", 0, 45, "a directivity in dBi");
    if (const toml::node* n = root.get("beamwidth_deg")) {
      const auto [xz, yz] = OneOrPair(*n, "beamwidth_deg", 1, 90, "a beamwidth in degrees");
      r.beamwidth_xz_deg = xz;
      r.beamwidth_yz_deg = yz;
    }
    if (!r.directivity_dbi && !r.beamwidth_xz_deg)
      throw InputError(SourceLocation{path_, 1, 1}, "directivity_dbi",
                       "neither directivity_dbi nor beamwidth_deg",
                       "directivity_dbi = <dBi at broadside>, beamwidth_deg = <deg> or [xz, yz], "
                       "or both");
    const toml::node* sll = root.get("sidelobe_db");
    if (!sll)
      throw InputError(SourceLocation{path_, 1, 1}, "sidelobe_db", "no sidelobe_db key",
                       "sidelobe_db = <dB re the peak, e.g. -25>");
    r.sidelobe_db = InRange(*sll, "sidelobe_db", -60, -10, "a level in dB re the peak");
    if (const toml::node* n = root.get("scan_deg")) {
      const auto [xz, yz] = OneOrPair(*n, "scan_deg", 0, 80, "an angle from broadside in degrees");
      r.scan_xz_deg = xz;
      r.scan_yz_deg = yz;
    }

    if (const toml::node* n = root.get("ground")) {
      const std::string s = String(*n, "ground");
      const auto g = GroundFromString(s);
      if (!g) throw InputError(At(*n), "ground", Quoted(s), "\"none\" or \"pec\"");
      r.ground = *g;
    }
    if (const toml::node* n = root.get("ground_height")) {
      if (r.ground != Ground::kPec)
        throw InputError(At(*n), "ground_height", "a ground height without a ground plane",
                         "ground = \"pec\" with it, or no ground_height in free space");
      r.ground_height_m = Number(*n, "ground_height", "a length" + unit) * scale;
      if (!(r.ground_height_m > 0 && r.ground_height_m <= 2 * lambda))
        throw InputError(At(*n), "ground_height", FormatApprox(r.ground_height_m) + " m",
                         "a height in (0, 2] wavelengths (" + FormatApprox(2 * lambda) + " m)");
    } else if (r.ground == Ground::kPec) {
      r.ground_height_m = 0.25 * lambda;
    }

    if (const toml::node* n = root.get("polarization")) {
      const std::string s = Lower(String(*n, "polarization"));
      if (s == "x") {
        r.polarization = Vec3::UnitX();
      } else if (s == "y") {
        r.polarization = Vec3::UnitY();
      } else if (const auto sense = CircularSenseFromString(s)) {
        r.circular = sense;  // crossed pairs: x and y (crossed_pair.h)
        r.polarization = Vec3::UnitX();
      } else {
        throw InputError(At(*n), "polarization", Quoted(s),
                         "\"x\", \"y\" (short dipoles) or \"rhcp\", \"lhcp\" (crossed pairs)");
      }
    }
    if (const toml::node* n = root.get("axial_ratio_db")) {
      if (!r.circular)
        throw InputError(At(*n), "axial_ratio_db", "an axial-ratio limit with linear polarization",
                         "polarization = \"rhcp\" or \"lhcp\" with it");
      const double v = Number(*n, "axial_ratio_db", "a limit in dB");
      if (!(v > 0 && v <= 20))
        throw InputError(At(*n), "axial_ratio_db", FormatNumber(v), "a limit in (0, 20] dB");
      r.max_axial_ratio_db = v;
    }
    if (const toml::node* n = root.get("lattice")) {
      const std::string s = String(*n, "lattice");
      const auto c = LatticeChoiceFromString(s);
      if (!c)
        throw InputError(At(*n), "lattice", Quoted(s),
                         "\"rectangular\", \"triangular\" or \"either\"");
      r.lattice = *c;
    }
    if (const toml::node* n = root.get("max_elements")) {
      const auto* i = n->as_integer();
      if (!i || i->get() < 4 || i->get() > 100000)
        throw InputError(At(*n), "max_elements", Describe(*n), "an integer in [4, 100000]");
      r.max_elements = static_cast<long>(i->get());
    }
    if (const toml::node* n = root.get("max_aperture")) {
      const auto [x, y] = OneOrPair(*n, "max_aperture", 0, 1e300, "a length" + unit);
      for (const double v : {x, y}) {
        if (!(v * scale >= 0.5 * lambda))
          throw InputError(
              At(*n), "max_aperture",
              FormatApprox(v * scale) + " m (" + FormatApprox(v * scale / lambda) + " wavelength)",
              "at least half a wavelength (" + FormatApprox(0.5 * lambda) +
                  " m): room for two elements");
      }
      r.max_aperture_x_m = x * scale;
      r.max_aperture_y_m = y * scale;
    }
    r.element_length_m = 0.05 * lambda;
    if (const toml::node* n = root.get("element_length")) {
      r.element_length_m = Number(*n, "element_length", "a length" + unit) * scale;
      if (!(r.element_length_m > 0 && r.element_length_m <= 0.1 * lambda * (1 + 1e-12)))
        throw InputError(At(*n), "element_length", FormatApprox(r.element_length_m) + " m",
                         "a length in (0, 0.1] wavelength (" + FormatApprox(0.1 * lambda) +
                             " m): the short-dipole model");
    }
    try {
      Validate(r);  // the engine's backstop; every rule above is stricter or equal
    } catch (const InvalidArgument& e) {
      throw InputError(SourceLocation{path_, 1, 1}, e.what());
    }
    return out;
  }

 private:
  double Frequency(const toml::table& root) const {
    const toml::node* n = root.get("frequency");
    if (!n)
      throw InputError(
          SourceLocation{path_, 1, 1}, "frequency", "no frequency key",
          "frequency = <Hz> or \"<number> <unit>\" (unit " + std::string(kFrequencyUnitList) + ")");
    const std::optional<double> f = n->is_string()
                                        ? FrequencyFromString(n->as_string()->get())
                                        : std::optional<double>(Number(*n, "frequency", "Hz"));
    if (!f || !std::isfinite(*f) || !(*f > 0))
      throw InputError(At(*n), "frequency", Describe(*n),
                       "a finite frequency > 0: Hz, or a string such as \"10 GHz\" (unit " +
                           std::string(kFrequencyUnitList) + ")");
    return *f;
  }

  double InRange(const toml::node& n, const std::string& key, double lo, double hi,
                 const std::string& what) const {
    const double v = Number(n, key, what);
    if (!(v >= lo && v <= hi))
      throw InputError(At(n), key, FormatNumber(v),
                       what + " in [" + FormatNumber(lo) + ", " + FormatNumber(hi) + "]");
    return v;
  }

  // One number for both principal planes, or [xz, yz].
  std::pair<double, double> OneOrPair(const toml::node& n, const std::string& key, double lo,
                                      double hi, const std::string& what) const {
    if (const toml::array* a = n.as_array()) {
      if (a->size() != 2)
        throw InputError(At(n), key, Describe(n), "one number, or [xz, yz]: " + what);
      return {InRange(*a->get(0), key + "[0]", lo, hi, what),
              InRange(*a->get(1), key + "[1]", lo, hi, what)};
    }
    const double v = InRange(n, key, lo, hi, what);
    return {v, v};
  }

  std::string_view text_;
};

}  // namespace

RequirementsFile ParseRequirements(std::string_view text, const std::string& path_for_messages) {
  return RequirementsReader(text, path_for_messages).Read();
}

RequirementsFile ReadRequirements(const std::string& path) {
  std::string why;
  const std::optional<std::string> text = ReadTextFile(path, &why);
  if (!text) throw InputError(SourceLocation{path, 0, 0}, "cannot read the file: " + why);
  if (IsHdf5(*text))
    throw InputError(SourceLocation{path, 0, 0},
                     "an HDF5 result, expected a requirements file (TOML)");
  return ParseRequirements(*text, path);
}

}  // namespace lobecast
