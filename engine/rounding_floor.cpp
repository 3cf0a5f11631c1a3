// The numerical floor (rounding_floor.h).
#include "engine/rounding_floor.h"

#include "engine/check.h"
#include "engine/constants.h"

namespace lobecast {

double FieldFloor_v(const Array& array, const Eigen::VectorXcd& currents_a) {
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(currents_a.size()), array.size());
  double sum = 0.0;
  for (std::size_t n = 0; n < array.size(); ++n)
    sum +=
        std::abs(currents_a[static_cast<Eigen::Index>(n)]) * array.dipoles[n].effective_length_m();
  // A PEC image carries its dipole's current and length: the same magnitude again.
  if (array.ground == Ground::kPec) sum *= 2.0;
  return kRoundingFloorRelative * array.angular_frequency_rad_s() * kMu0_H_m / (4.0 * kPi) * sum;
}

}  // namespace lobecast
