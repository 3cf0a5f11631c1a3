// The frequency (`frequency`), a sweep's frequencies (`frequencies`) and the grid
// (`[grid]`) of an array or design description, with located errors; the base of
// the array reader (array_reader.cpp), which reads the rest. Internal to io/input.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <toml++/toml.h>

#include "engine/grid.h"
#include "engine/types.h"
#include "io/input/array_description.h"
#include "io/input/toml_values.h"

namespace lobecast {

// Grids beyond this many directions are almost certainly a mistyped step; they would
// need gigabytes before the first field value. A sweep's directions over all its
// frequencies are bounded alike (it keeps the directivity of each).
inline constexpr double kMaxDirections = 1e8;
// The most frequencies of a sweep (a list or a count): each is a whole job.
inline constexpr std::size_t kMaxFrequencies = 100000;

class FrequencyGridReader : protected TomlValues {
 protected:
  explicit FrequencyGridReader(std::string path) : TomlValues(std::move(path)) {}

  // `frequency`: required unless `frequencies` is given.
  void ReadFrequency(const toml::table& root, Array& array);
  // One frequency: a number in Hz or a string with a unit, finite and > 0.
  double FrequencyValue(const toml::node& n, const std::string& key) const;
  // `frequencies` (a sweep): a list or { start, stop, count, design }, every
  // frequency distinct; the first is the design frequency.
  void ReadFrequencies(const toml::table& root, ArrayDescription& out);
  // One angle range of [grid] in [0, max_deg]; a stop off the step is a warning.
  AngleRange Range(const toml::node& n, const std::string& key, double max_deg,
                   std::vector<std::string>& warnings) const;
  // [grid] (default 1 deg everywhere), at most kMaxDirections directions, also over
  // all the frequencies of a sweep (read first).
  void ReadGrid(const toml::table& root, ArrayDescription& out);

  SourceLocation frequency_at_;    // the design frequency's value
  SourceLocation frequencies_at_;  // the key of a sweep
};

}  // namespace lobecast
