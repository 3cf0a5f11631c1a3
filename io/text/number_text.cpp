#include "io/text/number_text.h"

#include <charconv>
#include <cmath>
#include <system_error>

namespace lobecast {

void AppendShortest(std::string& out, double value) {
  if (std::isnan(value)) {
    out += "nan";
    return;
  }
  if (std::isinf(value)) {
    out += value > 0 ? "inf" : "-inf";
    return;
  }
  char buf[32];  // the longest shortest form of a double is 24 characters
  const std::to_chars_result r = std::to_chars(buf, buf + sizeof buf, value);
  out.append(buf, r.ptr);
}

std::optional<double> ParseFiniteNumber(std::string_view s) {
  if (!s.empty() && s.front() == '+') {
    s.remove_prefix(1);
    if (!s.empty() && (s.front() == '+' || s.front() == '-')) return std::nullopt;  // "+-5"
  }
  double v = 0;
  const auto r = std::from_chars(s.data(), s.data() + s.size(), v);
  if (s.empty() || r.ec != std::errc() || r.ptr != s.data() + s.size() || !std::isfinite(v)) {
    return std::nullopt;
  }
  return v;
}

double ReportedAngleDeg(double angle_deg) {
  if (!std::isfinite(angle_deg)) return angle_deg;
  // Times and over the exact 1e9: the nearest double to the rounded decimal, which
  // prints as that decimal (times 1e-9 would not).
  constexpr double kPerDeg = 1e9;
  static_assert(kReportedAngle_deg == 1.0 / kPerDeg);
  const double r = std::round(angle_deg * kPerDeg) / kPerDeg;
  return r == 0.0 ? 0.0 : r;  // no -0
}

}  // namespace lobecast
