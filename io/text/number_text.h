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

// An analysed angle (deg) as the JSON report gives it: rounded to kReportedAngle_deg.
// The analysis refines directions to 1e-6 deg (AnalysisOptions::refine_tolerance_deg),
// so the digits beyond 1e-9 deg are rounding of the search, not physics: without the
// rounding an exact horizon crossing would read 89.99999999995661. Infinities and NaN
// pass through.
inline constexpr double kReportedAngle_deg = 1e-9;
double ReportedAngleDeg(double angle_deg);

}  // namespace lobecast
