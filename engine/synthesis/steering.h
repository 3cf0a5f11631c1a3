// Steering (CONVENTIONS §3, design files): the main beam toward r_hat0 =
// (theta0, phi0) by I_n = a_n exp(-j k r_hat0 . r_n) at the design frequency, with
// exp(+jwt): the far-field terms exp(+j k r_hat . r_n) then add in phase at r_hat0.
// With true time delay the delay tau_n = r_hat0 . r_n / c0 is kept when the
// frequency changes (no squint); phase steering keeps the phases instead, so its
// beam moves with frequency as the array factor says.
#pragma once

#include <optional>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// exp(-j k r_hat0 . r_n) per dipole (unit magnitude), angles in radians.
Eigen::VectorXcd SteeringPhasors(const Array& array, double theta0_rad, double phi0_rad);

enum class SteeringMode { kPhase, kDelay };

std::string_view ToString(SteeringMode m);
std::optional<SteeringMode> SteeringModeFromString(std::string_view s);  // case-insensitive

struct Steering {
  Vec3 direction = Vec3::UnitZ();  // r_hat0, unit
  SteeringMode mode = SteeringMode::kPhase;
  double design_frequency_hz = 0;  // where phase steering is exact
};

// tau_n = r_hat0 . r_n / c0 (seconds) per position.
std::vector<double> SteeringDelays(const std::vector<Vec3>& positions_m, const Vec3& direction);

// The steering phasors at `frequency_hz`: phase mode exp(-j k_design r_hat0 . r_n)
// whatever the frequency; delay mode exp(-j 2 pi f tau_n). Both equal the design
// phasors at the design frequency. Throws InvalidArgument on a frequency <= 0.
Eigen::VectorXcd SteeringPhasorsAt(const std::vector<Vec3>& positions_m, const Steering& steering,
                                   double frequency_hz);

}  // namespace lobecast
