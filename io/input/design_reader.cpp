#include "io/input/design_reader.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <set>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/synthesis/crossed_pair.h"
#include "engine/text_case.h"
#include "io/input/toml_values.h"
#include "io/input/units.h"

namespace lobecast {

std::string_view ToString(ObjectiveKind k) {
  return k == ObjectiveKind::kMaxDirectivity ? "max-directivity" : "sidelobe-envelope";
}

std::optional<ObjectiveKind> ObjectiveKindFromString(std::string_view s) {
  for (ObjectiveKind k : {ObjectiveKind::kMaxDirectivity, ObjectiveKind::kSidelobeEnvelope})
    if (EqualsIgnoreCase(s, ToString(k))) return k;
  return std::nullopt;
}

namespace {

class DesignReader : private TomlValues {
 public:
  DesignReader(const toml::table& root, std::string path, double scale, std::string_view unit,
               const Array& array)
      : TomlValues(std::move(path)), root_(root), scale_(scale), unit_(unit), array_(array) {}

  GeneratedDipoles Read() {
    GeneratedDipoles out;
    DesignInfo& info = out.info;
    const toml::table& lattice = Table("lattice");
    info.lattice_where = At(lattice);
    out.where = At(lattice);
    ReadLattice(lattice, info.lattice);

    const toml::node* element_node = root_.get("element");
    if (!element_node) {
      throw InputError(At(lattice), "element", "no [element] table",
                       "[element] with orientation and length: the template of every "
                       "generated dipole");
    }
    info.element_where = At(Table("element"));
    Dipole templ = ReadElement(Table("element"), out);
    info.crossed = crossed_;

    if (const toml::node* t = root_.get("taper")) {
      info.taper_given = true;
      ReadTaper(Table("taper"), info);
      (void)t;
    }
    if (root_.get("steer")) ReadSteer(Table("steer"), info);
    if (const toml::node* n = root_.get("null")) ReadNulls(*n, info);
    if (root_.get("objective")) {
      ReadObjective(Table("objective"), info);
      if (info.taper_given) {
        throw InputError(At(*root_.get("taper")), "taper", "both [taper] and [objective]",
                         "one of them: the objective replaces the taper");
      }
    }

    // Generate: engine errors are about the lattice or the taper as a whole.
    std::vector<LatticeSite> sites;
    try {
      sites = GenerateLattice(info.lattice);
    } catch (const InvalidArgument& e) {
      throw InputError(At(lattice), std::string("lattice rejected: ") + e.what());
    }
    try {
      info.taper_amplitudes = LatticeTaper(info.taper, info.lattice, sites);
    } catch (const InvalidArgument& e) {
      const toml::node* t = root_.get("taper");
      throw InputError(t ? At(*t) : At(lattice), std::string("taper rejected: ") + e.what());
    }
    info.lattice_size = info.lattice.GeneratedCount();
    info.generated = sites.size();
    info.taper_efficiency = TaperEfficiency(info.taper_amplitudes);

    std::vector<Vec3> positions;
    for (const LatticeSite& s : sites) positions.push_back(s.position_m);
    if (array_.ground == Ground::kPec) {
      for (const LatticeSite& s : sites) {
        if (s.position_m.z() > 0.0) continue;
        throw InputError(out.position, out.position_key,
                         "element " + std::to_string(s.index) +
                             " at z = " + FormatApprox(s.position_m.z()) + " m",
                         "every element at z > 0: with ground = \"pec\" the lattice must stand "
                         "above the plane z = 0 (raise center's z)");
      }
    }

    const Vec3 beam = info.steering ? info.steering->direction : BroadsideOf(info.lattice);
    info.grating_lobes = VisibleGratingLobes(info.lattice, beam, array_.wavelength_m());

    // Orientation: the template turned with the lattice, normalized until the
    // reader's own normalization leaves it unchanged (a written file reads back
    // to the same bits).
    const auto unit = [](Vec3 v) {
      for (int i = 0; i < 4; ++i) v = v / v.stableNorm();
      return v;
    };
    const Vec3 o = unit(info.lattice.rotation * templ.orientation);
    // A crossed pair per site (crossed_pair.h): the second dipole a quarter period
    // behind or ahead of the first, by the sense asked toward the beam.
    std::vector<std::pair<Vec3, double>> per_site{{o, 0.0}};
    if (info.crossed) {
      try {
        const CrossedPair pair = CrossedPairFor(info.lattice, o, beam, *info.crossed);
        per_site.emplace_back(unit(pair.second), pair.second_phase_deg);
        info.crossed_phase_deg = pair.second_phase_deg;
      } catch (const InvalidArgument& e) {
        throw InputError(crossed_where_, "element.crossed_pair",
                         std::string(ToString(*info.crossed)) + " on this lattice", e.what());
      }
    }
    info.dipoles_per_site = per_site.size();
    Eigen::VectorXcd phasors = Eigen::VectorXcd::Ones(static_cast<Eigen::Index>(sites.size()));
    if (info.steering) phasors = SteeringPhasorsAt(positions, *info.steering, array_.frequency_hz);
    std::vector<double> amplitudes;
    for (std::size_t n = 0; n < sites.size(); ++n) {
      const double magnitude = info.peak_current_a * info.taper_amplitudes[n];
      const double site_rad = std::arg(phasors[static_cast<Eigen::Index>(n)]);
      for (const auto& [orientation, offset_deg] : per_site) {
        Dipole d = templ;
        d.position_m = positions[n];
        d.orientation = orientation;
        out.dipoles.push_back(d);
        const double phase_deg = WrappedDegrees(site_rad + offset_deg * kDegree);
        info.polar_currents.emplace_back(magnitude, phase_deg);
        out.currents.push_back(std::polar(magnitude, phase_deg * kDegree));
        amplitudes.push_back(info.taper_amplitudes[n]);
      }
    }
    // Per dipole from here on (a pair's two share their site's amplitude; the
    // efficiency is unchanged by the repetition).
    info.taper_amplitudes = std::move(amplitudes);
    info.generated = out.dipoles.size();
    return out;
  }

 private:
  const toml::table& Table(std::string_view name) const {
    const toml::node* n = root_.get(name);
    const toml::table* t = n ? n->as_table() : nullptr;
    if (!t)
      throw InputError(At(*n), std::string(name), Describe(*n),
                       "a [" + std::string(name) + "] table");
    return *t;
  }

  int Integer(const toml::node& n, const std::string& key, int min) const {
    const auto* v = n.as_integer();
    if (!v) throw InputError(At(n), key, Describe(n), "an integer >= " + std::to_string(min));
    const std::int64_t i = v->get();
    if (i < min || i > 10'000'000)
      throw InputError(At(n), key, std::to_string(i),
                       "an integer in [" + std::to_string(min) + ", 10000000]");
    return static_cast<int>(i);
  }

  // A number or an array of numbers (each through `one`).
  template <typename T, typename F>
  std::vector<T> OneOrList(const toml::node& n, const std::string& key, F one) const {
    std::vector<T> out;
    if (const toml::array* a = n.as_array()) {
      if (a->empty()) throw InputError(At(n), key, "an empty array", "at least one value");
      for (std::size_t i = 0; i < a->size(); ++i)
        out.push_back(one(*a->get(i), key + "[" + std::to_string(i) + "]"));
    } else {
      out.push_back(one(n, key));
    }
    return out;
  }

  const toml::node& Require(const toml::table& t, std::string_view prefix, std::string_view name,
                            std::string_view example) const {
    const toml::node* v = t.get(name);
    if (!v) {
      throw InputError(At(t), Join(prefix, name), "no " + std::string(name) + " key",
                       std::string(name) + " = " + std::string(example));
    }
    return *v;
  }

  // A key the chosen kind does not use is an error, never silently ignored.
  void Forbid(const toml::table& t, std::string_view prefix, std::string_view name,
              std::string_view why) const {
    if (const toml::node* v = t.get(name))
      throw InputError(At(*v), Join(prefix, name), "a " + std::string(name) + " key",
                       "no " + std::string(name) + " " + std::string(why));
  }

  double Angle(const toml::node& n, const std::string& key, double max_deg) const {
    const double x = Number(n, key, "an angle in degrees");
    if (!(x >= 0.0 && x <= max_deg))
      throw InputError(At(n), key, FormatNumber(x),
                       "an angle in [0, " + FormatNumber(max_deg) + "] degrees");
    return x;
  }

  double NegativeDb(const toml::node& n, const std::string& key) const {
    const double x = Number(n, key, "a level in dB");
    if (!(x < 0.0 && x >= -300.0))
      throw InputError(At(n), key, FormatNumber(x), "a level in [-300, 0) dB re the peak");
    return x;
  }

  void ReadLattice(const toml::table& t, LatticeSpec& spec) {
    CheckKeys(t, "lattice",
              {"kind", "count", "spacing", "radius", "axis", "center", "rotation", "remove"});
    const toml::node& kind_node = Require(t, "lattice", "kind", "\"rectangular\"");
    const std::string kind = String(kind_node, "lattice.kind");
    const auto k = LatticeKindFromString(kind);
    if (!k) {
      throw InputError(At(kind_node), "lattice.kind", Quoted(kind),
                       "\"line\", \"rectangular\", \"triangular\" or \"ring\"");
    }
    spec.kind = *k;
    const bool planar =
        spec.kind == LatticeKind::kRectangular || spec.kind == LatticeKind::kTriangular;
    const toml::node& count = Require(t, "lattice", "count", planar ? "[Nx, Ny]" : "N");
    auto positive_length = [&](const toml::node& v, const std::string& key) {
      return Positive(v, key, "a number (a length in " + std::string(unit_) + ")", "a length") *
             scale_;
    };
    if (spec.kind == LatticeKind::kRing) {
      spec.ring_counts = OneOrList<int>(
          count, "lattice.count",
          [&](const toml::node& v, const std::string& key) { return Integer(v, key, 1); });
      double total = 0.0;  // each ring is bounded; so are all of them together
      for (const int c : spec.ring_counts) total += c;
      if (total > 10'000'000)
        throw InputError(At(count), "lattice.count", "more than 10000000 elements",
                         "at most 10000000 elements");
      const toml::node& radius = Require(t, "lattice", "radius", "<ring radius>");
      spec.ring_radii_m = OneOrList<double>(radius, "lattice.radius", positive_length);
      if (spec.ring_radii_m.size() != spec.ring_counts.size()) {
        throw InputError(At(radius), "lattice.radius",
                         std::to_string(spec.ring_radii_m.size()) + " radii",
                         std::to_string(spec.ring_counts.size()) + " (one per ring in count)");
      }
      for (std::size_t r = 1; r < spec.ring_radii_m.size(); ++r) {
        if (!(spec.ring_radii_m[r] > spec.ring_radii_m[r - 1]))
          throw InputError(At(radius), "lattice.radius", "radii not increasing",
                           "increasing radii, innermost ring first");
      }
      Forbid(t, "lattice", "spacing", "on a ring (radius and count place its elements)");
      Forbid(t, "lattice", "axis", "on a ring (it lies in the x-y plane; use rotation)");
    } else {
      Forbid(t, "lattice", "radius", "except on a ring");
      if (planar) {
        const toml::array* a = count.as_array();
        if (!a || a->size() != 2)
          throw InputError(At(count), "lattice.count", Describe(count), "[Nx, Ny] (integers >= 1)");
        spec.count_x = Integer(*a->get(0), "lattice.count[0]", 1);
        spec.count_y = Integer(*a->get(1), "lattice.count[1]", 1);
        if (static_cast<double>(spec.count_x) * spec.count_y > 10'000'000)
          throw InputError(At(count), "lattice.count", "more than 10000000 elements",
                           "at most 10000000 elements");
      } else {
        spec.count_x = Integer(count, "lattice.count", 1);
      }
      const bool needs_spacing =
          spec.count_x > 1 || spec.count_y > 1 || spec.kind == LatticeKind::kTriangular;
      if (const toml::node* s = t.get("spacing")) {
        if (planar && s->is_array()) {
          const toml::array* a = s->as_array();
          if (a->size() != 2)
            throw InputError(At(*s), "lattice.spacing", Describe(*s), "[dx, dy] or one number");
          spec.spacing_x_m = positive_length(*a->get(0), "lattice.spacing[0]");
          spec.spacing_y_m = positive_length(*a->get(1), "lattice.spacing[1]");
        } else {
          spec.spacing_x_m = spec.spacing_y_m = positive_length(*s, "lattice.spacing");
        }
      } else if (needs_spacing) {
        Require(t, "lattice", "spacing", planar ? "[dx, dy]" : "<pitch>");
      }
      if (spec.kind == LatticeKind::kLine) {
        if (const toml::node* ax = t.get("axis")) {
          const std::string s = Lower(String(*ax, "lattice.axis"));
          if (s == "x")
            spec.axis = Vec3::UnitX();
          else if (s == "y")
            spec.axis = Vec3::UnitY();
          else if (s == "z")
            spec.axis = Vec3::UnitZ();
          else
            throw InputError(At(*ax), "lattice.axis", Quoted(s), "\"x\", \"y\" or \"z\"");
        }
      } else {
        Forbid(t, "lattice", "axis", "on a panel (it lies in the x-y plane; use rotation)");
      }
    }
    if (const toml::node* c = t.get("center")) {
      spec.center_m = Vector3(*c, "lattice.center", "[x, y, z]") * scale_;
      position_ = At(*c);
    } else {
      position_ = At(t);
    }
    if (const toml::node* r = t.get("rotation")) {
      const toml::table* rt = r->as_table();
      if (!rt)
        throw InputError(At(*r), "lattice.rotation", Describe(*r),
                         "{ axis = [x, y, z], angle = <deg> }");
      CheckKeys(*rt, "lattice.rotation", {"axis", "angle"});
      const toml::node& axis = Require(*rt, "lattice.rotation", "axis", "[x, y, z]");
      const Vec3 a = Vector3(axis, "lattice.rotation.axis", "[x, y, z]");
      if (!(a.stableNorm() > 0.0))
        throw InputError(At(axis), "lattice.rotation.axis", "the zero vector", "a non-zero axis");
      const double angle = Number(Require(*rt, "lattice.rotation", "angle", "<degrees>"),
                                  "lattice.rotation.angle", "an angle in degrees");
      spec.rotation = AxisAngleRotation(a, angle * kDegree);
    }
    if (const toml::node* r = t.get("remove")) {
      const toml::array* a = r->as_array();
      if (!a)
        throw InputError(At(*r), "lattice.remove", Describe(*r), "[i, j, ...] (element indices)");
      const std::size_t total = spec.GeneratedCount();
      std::set<std::size_t> seen;
      for (std::size_t i = 0; i < a->size(); ++i) {
        const std::string key = "lattice.remove[" + std::to_string(i) + "]";
        const toml::node& v = *a->get(i);
        const int idx = Integer(v, key, 0);
        if (static_cast<std::size_t>(idx) >= total)
          throw InputError(At(v), key, std::to_string(idx),
                           "an element index in [0, " + std::to_string(total - 1) + "]");
        if (!seen.insert(static_cast<std::size_t>(idx)).second)
          throw InputError(At(v), key, std::to_string(idx) + " again", "each index once");
        spec.removed.push_back(static_cast<std::size_t>(idx));
      }
      if (seen.size() == total)
        throw InputError(At(*r), "lattice.remove", "every element", "at least one element kept");
    }
  }

  Dipole ReadElement(const toml::table& t, GeneratedDipoles& out) {
    CheckKeys(t, "element",
              {"orientation", "length", "distribution", "radius", "self_reactance", "conductivity",
               "crossed_pair"});
    Dipole d;
    if (const toml::node* v = t.get("crossed_pair")) {
      const std::string s = String(*v, "element.crossed_pair");
      const auto sense = CircularSenseFromString(s);
      if (!sense)
        throw InputError(At(*v), "element.crossed_pair", Quoted(s),
                         "\"rhcp\" or \"lhcp\": the sense toward the beam");
      crossed_ = sense;
      crossed_where_ = At(*v);
    }
    const toml::node& ori = Require(t, "element", "orientation", "[ux, uy, uz]");
    const Vec3 u = Vector3(ori, "element.orientation", "[ux, uy, uz]");
    if (!(u.stableNorm() > 0.0))
      throw InputError(At(ori), "element.orientation", "the zero vector [0, 0, 0]",
                       "a non-zero vector along the current");
    d.orientation = u / u.stableNorm();
    const toml::node& len =
        Require(t, "element", "length", "<length in " + std::string(unit_) + ">");
    d.length_m = Positive(len, "element.length",
                          "a number (the length in " + std::string(unit_) + ")", "a length") *
                 scale_;
    out.length = At(len);
    out.length_key = "element.length";
    out.position = position_;
    out.position_key = root_["lattice"]["center"] ? "lattice.center" : "lattice";
    if (const toml::node* v = t.get("distribution")) {
      const std::string s = String(*v, "element.distribution");
      const auto dist = DistributionFromString(s);
      if (!dist)
        throw InputError(At(*v), "element.distribution", Quoted(s),
                         "\"uniform\" or \"triangular\"");
      d.distribution = *dist;
    }
    out.wire = ReadWire(t, "element", d.length_m, std::string(unit_), scale_);
    return d;
  }

  void ReadTaper(const toml::table& t, DesignInfo& info) {
    CheckKeys(t, "taper",
              {"kind", "sidelobe_db", "nbar", "pedestal_db", "aperture_radius", "peak_current"});
    TaperSpec& s = info.taper;
    const toml::node& kind_node = Require(t, "taper", "kind", "\"taylor\"");
    const std::string kind = String(kind_node, "taper.kind");
    const auto k = TaperKindFromString(kind);
    if (!k) {
      throw InputError(At(kind_node), "taper.kind", Quoted(kind),
                       "\"uniform\", \"binomial\", \"chebyshev\", \"taylor\", \"cosine\" or "
                       "\"circular-taylor\"");
    }
    s.kind = *k;
    const bool sll = s.kind == TaperKind::kChebyshev || s.kind == TaperKind::kTaylor ||
                     s.kind == TaperKind::kCircularTaylor;
    const bool nbar = s.kind == TaperKind::kTaylor || s.kind == TaperKind::kCircularTaylor;
    const std::string with = "with taper kind \"" + std::string(ToString(s.kind)) + "\"";
    if (const toml::node* v = t.get("sidelobe_db"); v && sll)
      s.sidelobe_db = NegativeDb(*v, "taper.sidelobe_db");
    if (!sll) Forbid(t, "taper", "sidelobe_db", with);
    if (const toml::node* v = t.get("nbar"); v && nbar) {
      s.nbar = Integer(*v, "taper.nbar", 1);
      if (s.nbar > 100)
        throw InputError(At(*v), "taper.nbar", std::to_string(s.nbar), "nbar <= 100");
    }
    if (!nbar) Forbid(t, "taper", "nbar", with);
    if (s.kind == TaperKind::kCosine) {
      if (const toml::node* v = t.get("pedestal_db")) {
        s.pedestal_db = Number(*v, "taper.pedestal_db", "a level in dB");
        if (!(s.pedestal_db <= 0 && s.pedestal_db >= -300))
          throw InputError(At(*v), "taper.pedestal_db", FormatNumber(s.pedestal_db),
                           "an edge level in [-300, 0] dB re the centre");
      }
    } else {
      Forbid(t, "taper", "pedestal_db", with);
    }
    if (s.kind == TaperKind::kCircularTaylor) {
      if (const toml::node* v = t.get("aperture_radius"))
        s.aperture_radius_m =
            Positive(*v, "taper.aperture_radius", "a number (a length)", "a radius") * scale_;
    } else {
      Forbid(t, "taper", "aperture_radius", with);
    }
    if (const toml::node* v = t.get("peak_current"))
      info.peak_current_a = Positive(*v, "taper.peak_current", "a current in A peak", "a current");
  }

  void ReadSteer(const toml::table& t, DesignInfo& info) {
    CheckKeys(t, "steer", {"theta", "phi", "mode"});
    info.steer_theta_deg = Angle(Require(t, "steer", "theta", "<deg from +z>"), "steer.theta", 180);
    if (const toml::node* v = t.get("phi")) info.steer_phi_deg = Angle(*v, "steer.phi", 360);
    Steering s;
    s.direction = UnitVectorAt(info.steer_theta_deg * kDegree, info.steer_phi_deg * kDegree);
    s.design_frequency_hz = array_.frequency_hz;
    if (const toml::node* v = t.get("mode")) {
      const std::string m = String(*v, "steer.mode");
      const auto mode = SteeringModeFromString(m);
      if (!mode) throw InputError(At(*v), "steer.mode", Quoted(m), "\"phase\" or \"delay\"");
      s.mode = *mode;
    }
    if (array_.ground == Ground::kPec && info.steer_theta_deg > 90) {
      throw InputError(At(*t.get("theta")), "steer.theta", FormatNumber(info.steer_theta_deg),
                       "theta <= 90 with ground = \"pec\" (no field below the plane)");
    }
    info.steering = s;
  }

  void ReadNulls(const toml::node& n, DesignInfo& info) {
    const toml::array* a = n.as_array();
    if (!a) throw InputError(At(n), "null", Describe(n), "an array of tables ([[null]])");
    for (std::size_t i = 0; i < a->size(); ++i) {
      const std::string key = "null[" + std::to_string(i) + "]";
      const toml::table* t = a->get(i)->as_table();
      if (!t) throw InputError(At(*a->get(i)), key, Describe(*a->get(i)), "a table ([[null]])");
      CheckKeys(*t, key, {"theta", "phi", "method"});
      DesignNull d;
      d.where = At(*t);
      d.theta_deg = Angle(Require(*t, key, "theta", "<deg>"), Join(key, "theta"), 180);
      d.phi_deg = Angle(Require(*t, key, "phi", "<deg>"), Join(key, "phi"), 360);
      if (array_.ground == Ground::kPec && d.theta_deg > 90) {
        throw InputError(At(*t->get("theta")), Join(key, "theta"), FormatNumber(d.theta_deg),
                         "theta <= 90 with ground = \"pec\" (below the plane the field is zero "
                         "already)");
      }
      bool phase_only = false;
      if (const toml::node* m = t->get("method")) {
        const std::string method = String(*m, Join(key, "method"));
        if (method != "least-squares" && method != "phase-only")
          throw InputError(At(*m), Join(key, "method"), Quoted(method),
                           "\"least-squares\" (default) or \"phase-only\"");
        phase_only = method == "phase-only";
      }
      if (i > 0 && phase_only != info.phase_only_nulls)
        throw InputError(At(*t), Join(key, "method"), "a method unlike null[0]'s",
                         "one method for every [[null]] (they are placed together)");
      info.phase_only_nulls = phase_only;
      info.nulls.push_back(d);
    }
  }

  void ReadObjective(const toml::table& t, DesignInfo& info) {
    CheckKeys(t, "objective",
              {"kind", "regularization", "sidelobe_db", "mask", "main_beam_factor"});
    DesignObjective o;
    o.where = At(t);
    const toml::node& kind_node = Require(t, "objective", "kind", "\"max-directivity\"");
    const std::string kind = String(kind_node, "objective.kind");
    const auto k = ObjectiveKindFromString(kind);
    if (!k)
      throw InputError(At(kind_node), "objective.kind", Quoted(kind),
                       "\"max-directivity\" or \"sidelobe-envelope\"");
    o.kind = *k;
    const std::string with = "with objective kind \"" + std::string(ToString(o.kind)) + "\"";
    if (o.kind == ObjectiveKind::kMaxDirectivity) {
      Forbid(t, "objective", "sidelobe_db", with);
      Forbid(t, "objective", "mask", with);
      Forbid(t, "objective", "main_beam_factor", with);
      if (const toml::node* v = t.get("regularization")) {
        const double r = Number(*v, "objective.regularization", "a number >= 0");
        if (!(r >= 0 && r < 1))
          throw InputError(At(*v), "objective.regularization", FormatNumber(r),
                           "a number in [0, 1)");
        o.regularization = r;
      }
    } else {
      Forbid(t, "objective", "regularization", with);
      if (const toml::node* v = t.get("main_beam_factor")) {
        const double f = Number(*v, "objective.main_beam_factor", "a number > 0");
        if (!(f > 0 && f <= 10))
          throw InputError(At(*v), "objective.main_beam_factor", FormatNumber(f),
                           "a number in (0, 10]: the free main beam in first-null radii of "
                           "the uniform excitation");
        o.main_beam_factor = f;
      }
      if (const toml::node* v = t.get("sidelobe_db"))
        o.sidelobe_db = NegativeDb(*v, "objective.sidelobe_db");
      if (const toml::node* m = t.get("mask")) {
        const toml::array* a = m->as_array();
        if (!a)
          throw InputError(At(*m), "objective.mask", Describe(*m),
                           "an array of { theta, phi, level_db } tables");
        for (std::size_t i = 0; i < a->size(); ++i) {
          const std::string key = "objective.mask[" + std::to_string(i) + "]";
          const toml::table* r = a->get(i)->as_table();
          if (!r)
            throw InputError(At(*a->get(i)), key, Describe(*a->get(i)),
                             "{ theta = [lo, hi], phi = [lo, hi], level_db = <dB> }");
          CheckKeys(*r, key, {"theta", "phi", "level_db"});
          MaskRegion region;
          region.where = At(*r);
          auto range = [&](std::string_view name, double max_deg, double& lo, double& hi) {
            const toml::node& v = *r->get(name);
            const toml::array* p = v.as_array();
            const std::string k2 = Join(key, name);
            if (!p || p->size() != 2)
              throw InputError(At(v), k2, Describe(v), "[lo, hi] in degrees");
            lo = Angle(*p->get(0), k2 + "[0]", max_deg);
            hi = Angle(*p->get(1), k2 + "[1]", max_deg);
            if (!(lo <= hi)) throw InputError(At(v), k2, "lo > hi", "lo <= hi");
          };
          Require(*r, key, "theta", "[lo, hi]");
          range("theta", 180, region.theta_min_deg, region.theta_max_deg);
          if (r->get("phi")) range("phi", 360, region.phi_min_deg, region.phi_max_deg);
          region.level_db =
              NegativeDb(Require(*r, key, "level_db", "<dB re the peak>"), Join(key, "level_db"));
          o.mask.push_back(region);
        }
      }
    }
    info.objective = o;
  }

  const toml::table& root_;
  double scale_;
  std::string_view unit_;
  const Array& array_;
  SourceLocation position_;
  std::optional<CircularSense> crossed_;  // [element] crossed_pair
  SourceLocation crossed_where_;
};

}  // namespace

GeneratedDipoles ReadDesignTables(const toml::table& root, const std::string& path,
                                  double metres_per_unit, std::string_view unit_name,
                                  const Array& array) {
  return DesignReader(root, path, metres_per_unit, unit_name, array).Read();
}

}  // namespace lobecast
