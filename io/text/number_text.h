// Locale-independent text for numbers that must survive a round trip through a
// file (exports, JSON): the shortest decimal that parses back to the same double
// (std::to_chars), always with '.' as the decimal point, whatever the C locale.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace lobecast {

// Appends "0.1", "1e-30", "-inf", "inf", "nan": the shortest text that
// std::strtod and Python's float() read back exactly.
void AppendShortest(std::string& out, double value);

// The whole of `s` (no blanks, an optional leading '+') as a finite double, read
// with std::from_chars (locale-independent); std::nullopt otherwise, also for
// inf, nan and values out of range.
std::optional<double> ParseFiniteNumber(std::string_view s);

}  // namespace lobecast
