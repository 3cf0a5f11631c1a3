// Phase steering (CONVENTIONS §3, design files): the main beam toward r_hat0 =
// (theta0, phi0) by I_n = a_n exp(-j k r_hat0 . r_n) at the design frequency, with
// exp(+jwt): the far-field terms exp(+j k r_hat . r_n) then add in phase at r_hat0.
#pragma once

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// exp(-j k r_hat0 . r_n) per dipole (unit magnitude), angles in radians.
Eigen::VectorXcd SteeringPhasors(const Array& array, double theta0_rad, double phi0_rad);

}  // namespace lobecast
