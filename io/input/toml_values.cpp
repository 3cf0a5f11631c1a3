#include "io/input/toml_values.h"

#include <algorithm>
#include <cmath>
#include <vector>

#include "io/input/units.h"

namespace lobecast {
namespace {

std::string JoinList(std::initializer_list<std::string_view> names) {
  std::string out;
  for (std::string_view n : names) {
    if (!out.empty()) out += ", ";
    out += n;
  }
  return out;
}

// Edit distance counting a swap of neighbours as one edit (optimal string
// alignment), for "did you mean" hints on unknown keys: "stpe" is one edit from "step".
std::size_t EditDistance(std::string_view a, std::string_view b) {
  std::vector<std::vector<std::size_t>> d(a.size() + 1, std::vector<std::size_t>(b.size() + 1));
  for (std::size_t i = 0; i <= a.size(); ++i) d[i][0] = i;
  for (std::size_t j = 0; j <= b.size(); ++j) d[0][j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    for (std::size_t j = 1; j <= b.size(); ++j) {
      d[i][j] = std::min(
          {d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1)});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[a.size()][b.size()];
}

}  // namespace

std::string Quoted(std::string_view s) { return '"' + EchoText(s) + '"'; }

// What a node holds, for "found X".
std::string Describe(const toml::node& n) {
  switch (n.type()) {
    case toml::node_type::string:
      return "string " + Quoted(n.as_string()->get());
    case toml::node_type::integer:
      return "integer " + std::to_string(n.as_integer()->get());
    case toml::node_type::floating_point:
      return "float " + FormatNumber(n.as_floating_point()->get());
    case toml::node_type::boolean:
      return n.as_boolean()->get() ? "boolean true" : "boolean false";
    case toml::node_type::array: {
      const std::size_t size = n.as_array()->size();
      return "an array of " + std::to_string(size) + (size == 1 ? " element" : " elements");
    }
    case toml::node_type::table:
      return "a table";
    case toml::node_type::date:
      return "a date";
    case toml::node_type::time:
      return "a time";
    case toml::node_type::date_time:
      return "a date-time";
    default:
      return "nothing";
  }
}

SourceLocation TomlValues::At(const toml::source_region& r) const {
  return SourceLocation{path_, static_cast<int>(r.begin.line), static_cast<int>(r.begin.column)};
}

std::string TomlValues::Join(std::string_view prefix, std::string_view key) {
  if (prefix.empty()) return std::string(key);
  return std::string(prefix) + "." + std::string(key);
}

void TomlValues::CheckKeys(const toml::table& t, std::string_view prefix,
                           std::initializer_list<std::string_view> allowed) const {
  const toml::key* worst = nullptr;
  for (const auto& [k, v] : t) {
    if (std::find(allowed.begin(), allowed.end(), k.str()) != allowed.end()) continue;
    const auto before = [](const toml::source_position& a, const toml::source_position& b) {
      return a.line != b.line ? a.line < b.line : a.column < b.column;
    };
    if (!worst || before(k.source().begin, worst->source().begin)) worst = &k;
  }
  if (!worst) return;
  std::string expected = "one of " + JoinList(allowed);
  std::string_view best;
  std::size_t best_distance = 3;  // hint only for close matches
  for (std::string_view a : allowed) {
    const std::size_t d = EditDistance(worst->str(), a);
    if (d < best_distance) {
      best_distance = d;
      best = a;
    }
  }
  if (!best.empty()) expected += " (did you mean '" + std::string(best) + "'?)";
  SourceLocation where = At(worst->source());
  if (where.line == 0) where = At(*t.get(worst->str()));
  throw InputError(where, Join(prefix, worst->str()), "unknown key", expected);
}

LengthUnit TomlValues::ReadLengthUnit(const toml::table& root) const {
  const toml::node* n = root.get("length_unit");
  if (!n) return LengthUnit::kMetre;
  const std::string s = String(*n, "length_unit");
  const auto u = LengthUnitFromString(s);
  if (!u)
    throw InputError(At(*n), "length_unit", Quoted(s), "one of " + std::string(kLengthUnitList));
  return *u;
}

std::string TomlValues::String(const toml::node& n, const std::string& key) const {
  if (!n.is_string()) throw InputError(At(n), key, Describe(n), "a string");
  return n.as_string()->get();
}

double TomlValues::Number(const toml::node& n, const std::string& key,
                          std::string_view what) const {
  if (n.is_integer()) return static_cast<double>(n.as_integer()->get());
  if (n.is_floating_point()) {
    const double v = n.as_floating_point()->get();
    if (!std::isfinite(v)) throw InputError(At(n), key, Describe(n), "a finite number");
    return v;
  }
  throw InputError(At(n), key, Describe(n), std::string(what));
}

double TomlValues::Positive(const toml::node& n, const std::string& key, std::string_view type,
                            std::string_view what) const {
  const double v = Number(n, key, type);
  if (!(v > 0.0)) throw InputError(At(n), key, FormatNumber(v), std::string(what) + " > 0");
  return v;
}

Vec3 TomlValues::Vector3(const toml::node& n, const std::string& key, std::string_view what) const {
  const std::string expected = "an array of 3 numbers " + std::string(what);
  const toml::array* a = n.as_array();
  if (!a || a->size() != 3) throw InputError(At(n), key, Describe(n), expected);
  Vec3 v;
  for (std::size_t i = 0; i < 3; ++i) {
    v[static_cast<Eigen::Index>(i)] = Number(*a->get(i), key + "[" + std::to_string(i) + "]");
  }
  return v;
}

Wire TomlValues::ReadWire(const toml::table& t, const std::string& key, double length_m,
                          const std::string& unit, double metres_per_unit) const {
  Wire w;
  if (const toml::node* v = t.get("radius")) {
    w.radius_m = Positive(*v, Join(key, "radius"), "a number (the wire radius in " + unit + ")",
                          "a radius") *
                 metres_per_unit;
    if (w.radius_m >= 0.5 * length_m) {
      throw InputError(
          At(*v), Join(key, "radius"), FormatApprox(w.radius_m) + " m",
          "a radius below half the length (" + FormatApprox(0.5 * length_m) + " m): a thin wire");
    }
  }
  if (const toml::node* v = t.get("self_reactance"))
    w.reactance_ohm = Number(*v, Join(key, "self_reactance"), "a self reactance in ohm");
  if (const toml::node* v = t.get("conductivity")) {
    w.conductivity_s_m = Positive(*v, Join(key, "conductivity"),
                                  "a conductivity in S/m (copper about 5.8e7)", "a conductivity");
    if (!(w.radius_m > 0)) {
      throw InputError(At(*v), Join(key, "conductivity"), "a conductivity without a radius",
                       "radius = <wire radius> as well (the loss depends on it)");
    }
  }
  return w;
}

}  // namespace lobecast
