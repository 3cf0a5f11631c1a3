// Radiation intensity and directivity of a far field (CONVENTIONS §1):
// U = |rE|^2 / (2 eta0) for peak phasors, W/sr, and D = 4 pi U / P. The one
// place these expressions live: the grid job, the exact off-grid samples of an
// export and the analysis's probe all evaluate them the same way, so a value
// computed twice comes out bit for bit the same.
#pragma once

#include <complex>

#include "engine/constants.h"
#include "engine/types.h"

namespace lobecast {

// U = (|rE_theta|^2 + |rE_phi|^2) / (2 eta0), W/sr; components in V (peak).
inline double RadiationIntensity(Complex e_theta_v, Complex e_phi_v) {
  return (std::norm(e_theta_v) + std::norm(e_phi_v)) / (2.0 * kEta0_ohm);
}

// 4 pi / P, 1/W: D = DirectivityPerIntensity(P) * U.
inline double DirectivityPerIntensity(double radiated_power_w) {
  return 4.0 * kPi / radiated_power_w;
}

// 4 pi / (2 eta0 P), 1/V^2: the directivity of one field component c is this times
// |c|^2 (the co- and cross-polar parts, E_theta or E_phi alone).
inline double DirectivityPerSquaredField(double radiated_power_w) {
  return 4.0 * kPi / (2.0 * kEta0_ohm * radiated_power_w);
}

}  // namespace lobecast
