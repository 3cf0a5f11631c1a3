// Small pieces of terminal text shared by the compute summary, the report and
// the export notes: printf into a std::string, and the names shown for a
// polarization reference and sense.
#pragma once

#include <cstdio>
#include <string>

#include "engine/polarization.h"

namespace lobecast::text {

// std::snprintf into a string, of any length.
inline std::string Printf(const char* fmt, auto... args) {
  // Any length: a fixed buffer would cut long sentences short.
  char buf[256];
  const int n = std::snprintf(buf, sizeof buf, fmt, args...);
  if (n < 0) return {};
  if (static_cast<std::size_t>(n) < sizeof buf) return std::string(buf, n);
  std::string out(static_cast<std::size_t>(n) + 1, '\0');
  std::snprintf(out.data(), out.size(), fmt, args...);
  out.resize(static_cast<std::size_t>(n));
  return out;
}

// A finite value with two decimals, and no sign on a value that rounds to zero: a level
// a hair below 0 dB by rounding (a mirror lobe as high as the peak) prints "0.00", as its
// twin a hair above does, not "-0.00".
inline std::string Fixed2(double v) {
  std::string s = Printf("%.2f", v);
  if (s == "-0.00") s.erase(0, 1);
  return s;
}

// "x (Ludwig-3)", "y (Ludwig-3)", "RHCP", "LHCP", "theta_hat", "phi_hat".
inline std::string ReferenceName(PolarizationReference r) {
  switch (r) {
    case PolarizationReference::kLinearX:
      return "x (Ludwig-3)";
    case PolarizationReference::kLinearY:
      return "y (Ludwig-3)";
    case PolarizationReference::kRightCircular:
      return "RHCP";
    case PolarizationReference::kLeftCircular:
      return "LHCP";
    case PolarizationReference::kTheta:
      return "theta_hat (co E_theta)";
    case PolarizationReference::kPhi:
      return "phi_hat (co E_phi)";
  }
  return "?";
}

// "right-hand", "left-hand" or "linear" for a sense of +1, -1 or 0.
inline std::string SenseName(int sense) {
  return sense > 0 ? "right-hand" : sense < 0 ? "left-hand" : "linear";
}

}  // namespace lobecast::text
