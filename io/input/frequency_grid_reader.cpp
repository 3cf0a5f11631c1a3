// The frequency, a sweep's frequencies and the grid of an array description
// (frequency_grid_reader.h), split from array_reader.cpp.
#include "io/input/frequency_grid_reader.h"

#include <cmath>
#include <cstdint>
#include <set>
#include <string>
#include <vector>

#include "io/input/units.h"

namespace lobecast {

void FrequencyGridReader::ReadFrequency(const toml::table& root, Array& array) {
  const toml::node* n = root.get("frequency");
  if (!n) {
    throw InputError(
        SourceLocation{path_, 1, 1}, "frequency", "no frequency key",
        "frequency = <Hz> or \"<number> <unit>\" (unit " + std::string(kFrequencyUnitList) + ")");
  }
  array.frequency_hz = FrequencyValue(*n, "frequency");
  frequency_at_ = At(*n);
}

// One frequency: a number in Hz or a string with a unit, finite and > 0.
double FrequencyGridReader::FrequencyValue(const toml::node& n, const std::string& key) const {
  double f = 0.0;
  if (n.is_string()) {
    const std::string s = n.as_string()->get();
    const auto hz = FrequencyFromString(s);
    if (!hz) {
      throw InputError(At(n), key, Describe(n),
                       "a number followed by a unit, one of " + std::string(kFrequencyUnitList) +
                           " (e.g. \"433.92 MHz\")");
    }
    f = *hz;
    if (!std::isfinite(f)) throw InputError(At(n), key, Describe(n), "a finite frequency");
  } else {
    f = Number(n, key, "a frequency in Hz or a string such as \"433.92 MHz\"");
  }
  if (!(f > 0.0)) {
    throw InputError(At(n), key, n.is_string() ? Describe(n) : FormatNumber(f) + " Hz",
                     "a frequency > 0");
  }
  return f;
}

// `frequencies` (a sweep, CONVENTIONS §3 "Frequency sweeps"), instead of `frequency`:
//   frequencies = ["9.5 GHz", "10 GHz", 10.5e9]      a list; the first is the design
//                                                    frequency (steering, wavelengths)
//   frequencies = { start = "9 GHz", stop = "11 GHz", count = 21, design = "10 GHz" }
//                                                    count points from start to stop,
//                                                    evenly spaced (stop exact); the
//                                                    design frequency (default start) first
// Every frequency distinct and > 0; a list has at least one.
void FrequencyGridReader::ReadFrequencies(const toml::table& root, ArrayDescription& out) {
  const toml::node& n = *root.get("frequencies");
  if (const toml::node* f = root.get("frequency")) {
    throw InputError(At(*f), "frequency", "both 'frequency' and 'frequencies'",
                     "one of them: the first of 'frequencies' is the design frequency");
  }
  std::vector<double> list;
  std::vector<const toml::node*> where;
  if (const toml::array* a = n.as_array()) {
    if (a->empty()) {
      throw InputError(At(n), "frequencies", "an empty list",
                       "at least one frequency, e.g. [\"9.5 GHz\", \"10 GHz\"]");
    }
    if (a->size() > kMaxFrequencies) {
      throw InputError(At(n), "frequencies", std::to_string(a->size()) + " frequencies",
                       "at most " + std::to_string(kMaxFrequencies));
    }
    for (std::size_t i = 0; i < a->size(); ++i) {
      list.push_back(FrequencyValue(*a->get(i), "frequencies[" + std::to_string(i) + "]"));
      where.push_back(a->get(i));
    }
  } else if (const toml::table* t = n.as_table()) {
    CheckKeys(*t, "frequencies", {"start", "stop", "count", "design"});
    for (const char* k : {"start", "stop", "count"}) {
      if (!t->get(k)) {
        throw InputError(At(*t), Join("frequencies", k), std::string("no ") + k + " key",
                         "{ start = <f>, stop = <f>, count = <n> } (design optional)");
      }
    }
    const double start = FrequencyValue(*t->get("start"), "frequencies.start");
    const double stop = FrequencyValue(*t->get("stop"), "frequencies.stop");
    const toml::node& c = *t->get("count");
    const auto* ci = c.as_integer();
    if (!ci || ci->get() < 1 || ci->get() > static_cast<std::int64_t>(kMaxFrequencies)) {
      throw InputError(At(c), "frequencies.count", Describe(c),
                       "a whole number in [1, " + std::to_string(kMaxFrequencies) + "]");
    }
    const auto count = static_cast<std::size_t>(ci->get());
    if (count > 1 && !(stop > start)) {
      throw InputError(At(*t->get("stop")), "frequencies.stop", FormatNumber(stop) + " Hz",
                       "a stop above start (" + FormatNumber(start) + " Hz)");
    }
    std::optional<double> design;
    if (const toml::node* d = t->get("design")) design = FrequencyValue(*d, "frequencies.design");
    if (design) list.push_back(*design);
    for (std::size_t i = 0; i < count; ++i) {
      const double f = i + 1 == count && count > 1
                           ? stop
                           : start + (stop - start) * static_cast<double>(i) /
                                         static_cast<double>(count > 1 ? count - 1 : 1);
      if (design && std::abs(f - *design) <= 1e-9 * *design) continue;  // listed first
      list.push_back(f);
    }
    where.assign(list.size(), &n);
  } else {
    throw InputError(At(n), "frequencies", Describe(n),
                     "a list of frequencies, e.g. [\"9.5 GHz\", \"10 GHz\"], or "
                     "{ start = <f>, stop = <f>, count = <n> }");
  }
  // Within 1e-9 relative: the same frequency typed twice (9.5 GHz and 9500 MHz). The
  // first frequency that repeats an earlier one is named; the earlier ones are kept
  // sorted, so 100000 frequencies cost O(n log n), not 5e9 comparisons.
  std::multiset<double> earlier;
  for (std::size_t i = 0; i < list.size(); ++i) {
    // |f_i - f_j| <= 1e-9 f_j puts f_j in [f_i / (1 + 1e-9), f_i / (1 - 1e-9)]; the
    // search starts a little below that and tests each candidate exactly.
    for (auto j = earlier.lower_bound(list[i] / (1.0 + 1e-9) * (1.0 - 1e-12));
         j != earlier.end() && *j <= list[i] / (1.0 - 1e-9) * (1.0 + 1e-12); ++j) {
      if (std::abs(list[i] - *j) <= 1e-9 * *j) {
        throw InputError(At(*where[i]), "frequencies", FormatNumber(list[i]) + " Hz twice",
                         "distinct frequencies (the first is the design frequency)");
      }
    }
    earlier.insert(list[i]);
  }
  out.frequencies_hz = list;
  out.array.frequency_hz = list.front();
  frequency_at_ = At(*where.front());
  frequencies_at_ = At(n);
}

AngleRange FrequencyGridReader::Range(const toml::node& n, const std::string& key, double max_deg,
                                      std::vector<std::string>& warnings) const {
  const std::string bounds = "[0, " + FormatNumber(max_deg) + "] degrees";
  auto in_bounds = [&](const toml::node& v, const std::string& k) {
    const double x = Number(v, k, "an angle in degrees");
    if (x < 0.0 || x > max_deg)
      throw InputError(At(v), k, FormatNumber(x), "an angle in " + bounds);
    return x;
  };
  AngleRange r;
  if (n.is_number()) {
    r.start_deg = r.stop_deg = in_bounds(n, key);
    return r;
  }
  const toml::table* t = n.as_table();
  if (!t) {
    throw InputError(At(n), key, Describe(n),
                     "{ start = <deg>, stop = <deg>, step = <deg> } or one angle in degrees");
  }
  CheckKeys(*t, key, {"start", "stop", "step"});
  const toml::node* start = t->get("start");
  const toml::node* stop = t->get("stop");
  for (auto [node, name] : {std::pair{start, "start"}, std::pair{stop, "stop"}}) {
    if (!node) {
      throw InputError(At(*t), Join(key, name), std::string("no ") + name + " key",
                       "{ start = <deg>, stop = <deg>, step = <deg> } (step optional, default 1)");
    }
  }
  r.start_deg = in_bounds(*start, Join(key, "start"));
  r.stop_deg = in_bounds(*stop, Join(key, "stop"));
  if (r.stop_deg < r.start_deg) {
    throw InputError(At(*stop), Join(key, "stop"), FormatNumber(r.stop_deg),
                     "stop >= start (" + FormatNumber(r.start_deg) + ")");
  }
  if (const toml::node* step = t->get("step")) {
    r.step_deg = Positive(*step, Join(key, "step"), "a number (degrees)", "a step");
    if ((r.stop_deg - r.start_deg) / r.step_deg > kMaxDirections) {
      throw InputError(At(*step), Join(key, "step"), FormatNumber(r.step_deg),
                       "a step giving at most " + FormatNumber(kMaxDirections) + " angles");
    }
  }
  // Same tolerance as AngleRange::Values (1e-9 of a step).
  const double n_steps = (r.stop_deg - r.start_deg) / r.step_deg;
  const double whole = std::floor(n_steps + 1e-9);
  if (n_steps - whole > 1e-9) {
    warnings.push_back(At(*stop).ToString() + ": warning: key '" + Join(key, "stop") + "': " +
                       FormatNumber(r.stop_deg) + " is not start + n * step; the last angle is " +
                       FormatNumber(r.start_deg + whole * r.step_deg));
  }
  return r;
}

void FrequencyGridReader::ReadGrid(const toml::table& root, ArrayDescription& out) {
  out.theta = AngleRange{0.0, 180.0, 1.0};
  out.phi = AngleRange{0.0, 360.0, 1.0};
  if (const toml::node* g = root.get("grid")) {
    const toml::table* t = g->as_table();
    if (!t) throw InputError(At(*g), "grid", Describe(*g), "a [grid] table");
    CheckKeys(*t, "grid", {"theta", "phi"});
    if (const toml::node* n = t->get("theta"))
      out.theta = Range(*n, "grid.theta", 180.0, out.warnings);
    if (const toml::node* n = t->get("phi")) out.phi = Range(*n, "grid.phi", 360.0, out.warnings);
    auto count = [](const AngleRange& r) {
      return std::floor((r.stop_deg - r.start_deg) / r.step_deg + 1e-9) + 1.0;
    };
    if (count(out.theta) * count(out.phi) > kMaxDirections) {
      throw InputError(
          At(*g), "grid", FormatNumber(count(out.theta) * count(out.phi)) + " directions",
          "at most " + FormatNumber(kMaxDirections) + " directions (use a coarser step)");
    }
  }
  out.grid = AngularGrid::FromRanges(out.theta, out.phi);
  // A sweep keeps the directivity of every direction at every frequency.
  const double stored =
      static_cast<double>(out.frequencies_hz.size()) * static_cast<double>(out.grid.size());
  if (stored > kMaxDirections) {
    throw InputError(frequencies_at_, "frequencies",
                     std::to_string(out.frequencies_hz.size()) + " frequencies x " +
                         std::to_string(out.grid.size()) + " directions",
                     "at most " + FormatNumber(kMaxDirections) +
                         " directions over all frequencies (fewer frequencies or a coarser "
                         "grid)");
  }
}

}  // namespace lobecast
