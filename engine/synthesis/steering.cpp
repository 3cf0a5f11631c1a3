#include "engine/synthesis/steering.h"

#include <cmath>

namespace lobecast {

Eigen::VectorXcd SteeringPhasors(const Array& array, double theta0_rad, double phi0_rad) {
  const Vec3 r0(std::sin(theta0_rad) * std::cos(phi0_rad),
                std::sin(theta0_rad) * std::sin(phi0_rad), std::cos(theta0_rad));
  const double k = array.wavenumber_rad_m();
  Eigen::VectorXcd out(static_cast<Eigen::Index>(array.size()));
  for (std::size_t n = 0; n < array.size(); ++n)
    out[static_cast<Eigen::Index>(n)] = std::polar(1.0, -k * r0.dot(array.dipoles[n].position_m));
  return out;
}

}  // namespace lobecast
