// Reading TOML values with located errors, for the array reader: every value
// checked for type and range, every message "FILE:LINE:COL: key 'K': found X,
// expected Y" (io/input_error.h), unknown keys refused with a "did you mean" hint.
// Internal to io/input.
#pragma once

#include <initializer_list>
#include <string>
#include <string_view>

#include <toml++/toml.h>

#include "engine/coupling/coupling.h"
#include "engine/types.h"
#include "io/input/units.h"
#include "io/input_error.h"

namespace lobecast {

// "\"s\"".
std::string Quoted(std::string_view s);
// What a TOML value is, for "found ...": "integer 3", "string \"x\"", "an array".
std::string Describe(const toml::node& n);

class TomlValues {
 protected:
  explicit TomlValues(std::string path) : path_(std::move(path)) {}

  SourceLocation At(const toml::source_region& r) const;
  SourceLocation At(const toml::node& n) const { return At(n.source()); }
  // "prefix.key" (or "key" without a prefix).
  static std::string Join(std::string_view prefix, std::string_view key);

  // Unknown keys are errors (a typo must never fall back to a default). The first
  // unknown key in file order is reported.
  void CheckKeys(const toml::table& t, std::string_view prefix,
                 std::initializer_list<std::string_view> allowed) const;
  std::string String(const toml::node& n, const std::string& key) const;
  // An integer or float; `what` completes "expected ..." for a wrong type.
  double Number(const toml::node& n, const std::string& key,
                std::string_view what = "a number") const;
  // A number > 0: `type` completes "expected ..." for a wrong type, `what` names the
  // quantity in "expected <what> > 0".
  double Positive(const toml::node& n, const std::string& key, std::string_view type,
                  std::string_view what) const;
  Vec3 Vector3(const toml::node& n, const std::string& key, std::string_view what) const;
  // The file's `length_unit` key (m, cm, mm, wavelength); metres when absent.
  LengthUnit ReadLengthUnit(const toml::table& root) const;
  // The wire keys of a dipole table (or a design's [element]): radius (length unit,
  // below half the dipole's length), self_reactance (ohm), conductivity (S/m, needs a
  // radius); all optional.
  Wire ReadWire(const toml::table& t, const std::string& key, double length_m,
                const std::string& unit, double metres_per_unit) const;

  std::string path_;  // the file, for messages
};

}  // namespace lobecast
