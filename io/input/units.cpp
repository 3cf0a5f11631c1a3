#include "io/input/units.h"

#include <array>
#include <charconv>
#include <cmath>
#include <utility>

namespace lobecast {
namespace {

constexpr std::string_view kBlanks = " \t";

std::string_view Trim(std::string_view s) {
  const auto first = s.find_first_not_of(kBlanks);
  if (first == std::string_view::npos) return {};
  const auto last = s.find_last_not_of(kBlanks);
  return s.substr(first, last - first + 1);
}

// Parses the longest number at the start of `s`; returns the characters used (0: none).
std::size_t ParseLeadingNumber(std::string_view s, double& value) {
  std::size_t skip = 0;
  if (!s.empty() && s.front() == '+') {
    skip = 1;
    s.remove_prefix(1);
    if (!s.empty() && (s.front() == '+' || s.front() == '-')) return 0;
  }
  const char* end = s.data() + s.size();
  const auto result = std::from_chars(s.data(), end, value, std::chars_format::general);
  if (result.ec != std::errc() && result.ec != std::errc::result_out_of_range) return 0;
  if (result.ec == std::errc::result_out_of_range) {
    // from_chars says "out of range" for underflow too: read it in long double
    // (subnormals and 1e-400 become what the double nearest is, 0 at worst);
    // beyond even that, a negative exponent is underflow. Overflow reads as
    // infinity so the caller can report a non-finite value.
    const bool negative = s.front() == '-';
    long double wide = 0;
    const auto w = std::from_chars(s.data(), result.ptr, wide, std::chars_format::general);
    if (w.ec == std::errc()) {
      value = static_cast<double>(wide);
    } else {
      const std::string_view text(s.data(), static_cast<std::size_t>(result.ptr - s.data()));
      const std::size_t e = text.find_first_of("eE");
      const bool tiny = e != std::string_view::npos && e + 1 < text.size() && text[e + 1] == '-';
      value = tiny ? (negative ? -0.0 : 0.0) : (negative ? -HUGE_VAL : HUGE_VAL);
    }
  }
  return skip + static_cast<std::size_t>(result.ptr - s.data());
}

}  // namespace

std::string FormatNumber(double value) {
  std::array<char, 64> buf{};
  const auto result = std::to_chars(buf.data(), buf.data() + buf.size(), value);
  return std::string(buf.data(), result.ptr);
}

std::string FormatApprox(double value, int digits) {
  std::array<char, 64> buf{};
  const auto result =
      std::to_chars(buf.data(), buf.data() + buf.size(), value, std::chars_format::general, digits);
  return std::string(buf.data(), result.ptr);
}

std::optional<double> ParseNumber(std::string_view text) {
  text = Trim(text);
  if (text.empty()) return std::nullopt;
  double value = 0.0;
  const std::size_t used = ParseLeadingNumber(text, value);
  if (used == 0 || used != text.size()) return std::nullopt;
  return value;
}

std::optional<Quantity> SplitQuantity(std::string_view text) {
  text = Trim(text);
  double value = 0.0;
  const std::size_t used = ParseLeadingNumber(text, value);
  if (used == 0) return std::nullopt;
  return Quantity{value, std::string(Trim(text.substr(used)))};
}

std::optional<double> HertzPerUnit(std::string_view unit) {
  static constexpr std::array<std::pair<std::string_view, double>, 5> kUnits = {
      {{"Hz", 1.0}, {"kHz", 1e3}, {"MHz", 1e6}, {"GHz", 1e9}, {"THz", 1e12}}};
  for (const auto& [name, scale] : kUnits) {
    if (unit == name) return scale;
  }
  return std::nullopt;
}

std::optional<double> FrequencyFromString(std::string_view text) {
  const auto q = SplitQuantity(text);
  if (!q || q->unit.empty()) return std::nullopt;
  const auto scale = HertzPerUnit(q->unit);
  if (!scale) return std::nullopt;
  return q->value * *scale;
}

std::string_view ToString(LengthUnit unit) {
  switch (unit) {
    case LengthUnit::kMetre:
      return "m";
    case LengthUnit::kCentimetre:
      return "cm";
    case LengthUnit::kMillimetre:
      return "mm";
    case LengthUnit::kWavelength:
      return "wavelength";
  }
  return "?";
}

std::optional<LengthUnit> LengthUnitFromString(std::string_view text) {
  for (LengthUnit u : {LengthUnit::kMetre, LengthUnit::kCentimetre, LengthUnit::kMillimetre,
                       LengthUnit::kWavelength}) {
    if (text == ToString(u)) return u;
  }
  return std::nullopt;
}

double MetresPer(LengthUnit unit, double wavelength_m) {
  switch (unit) {
    case LengthUnit::kMetre:
      return 1.0;
    case LengthUnit::kCentimetre:
      return 1e-2;
    case LengthUnit::kMillimetre:
      return 1e-3;
    case LengthUnit::kWavelength:
      return wavelength_m;
  }
  return 1.0;
}

}  // namespace lobecast
