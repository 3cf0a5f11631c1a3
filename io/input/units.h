// Quantity strings in array descriptions: numbers with a unit ("433.92 MHz"),
// length units, and the number formatting used in messages.
//
// Unit spellings are exact and case-sensitive on purpose: "mHz" (millihertz) and
// "MHz" differ by nine orders of magnitude, and "Mm" is not "mm". Anything else is
// rejected with the list of accepted spellings rather than guessed at.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace lobecast {

// The shortest text that reads back as the same double ("0.01", "433920000",
// "nan", "-inf").
std::string FormatNumber(double value);

// `value` to `digits` significant digits ("0.0491463"), for derived values in
// messages where the full round-trip text would only be noise.
std::string FormatApprox(double value, int digits = 6);

// The whole of `text` (surrounding blanks ignored, a leading '+' allowed) as a
// decimal floating-point number; std::nullopt if anything else is left over.
// "nan" and "inf" parse; callers check finiteness so they can say so.
std::optional<double> ParseNumber(std::string_view text);

// A number followed by a unit, blanks between them optional: "2.45 GHz", "915e6Hz".
struct Quantity {
  double value = 0.0;
  std::string unit;  // empty when the text is a bare number
};
// std::nullopt when the text does not start with a number.
std::optional<Quantity> SplitQuantity(std::string_view text);

// Accepted frequency units and their size in Hz: Hz, kHz, MHz, GHz, THz.
inline constexpr std::string_view kFrequencyUnitList = "Hz, kHz, MHz, GHz, THz";
std::optional<double> HertzPerUnit(std::string_view unit);

// A frequency string ("433.92 MHz") in Hz. A unit is required: a bare number in a
// string is more likely a slip than a choice. std::nullopt if the text does not
// parse; the value is returned as written (the caller checks finite and > 0).
std::optional<double> FrequencyFromString(std::string_view text);

// The unit of positions and lengths in an array description (top-level key
// `length_unit`). kWavelength scales by the free-space wavelength c0 / f.
enum class LengthUnit { kMetre, kCentimetre, kMillimetre, kWavelength };
inline constexpr std::string_view kLengthUnitList = "m, cm, mm, wavelength";
std::string_view ToString(LengthUnit unit);
// Exact spellings "m", "cm", "mm", "wavelength"; std::nullopt otherwise.
std::optional<LengthUnit> LengthUnitFromString(std::string_view text);
// Metres per one `unit`; wavelength_m is used only for kWavelength.
double MetresPer(LengthUnit unit, double wavelength_m);

}  // namespace lobecast
