// Free-space constants, SI. See CONVENTIONS §1: mu0 is CODATA 2018, never 4e-7*pi,
// and eta0 is mu0*c0, never 120*pi.
#pragma once

#include <cmath>
#include <numbers>

namespace lobecast {

inline constexpr double kPi = std::numbers::pi;
inline constexpr double kSpeedOfLight_m_s = 299792458.0;  // exact (SI 2019)
inline constexpr double kMu0_H_m = 1.25663706212e-6;      // CODATA 2018
inline constexpr double kEps0_F_m = 1.0 / (kMu0_H_m * kSpeedOfLight_m_s * kSpeedOfLight_m_s);
inline constexpr double kEta0_ohm = kMu0_H_m * kSpeedOfLight_m_s;  // ~376.730 ohm
inline constexpr double kDegree = kPi / 180.0;                     // radians per degree

// A phase in degrees in (-180, 180], from radians.
inline double WrappedDegrees(double rad) {
  double deg = std::remainder(rad / kDegree, 360.0);
  if (deg <= -180.0) deg += 360.0;
  return deg;
}

}  // namespace lobecast
