#include "engine/synthesis/steering.h"

#include <cmath>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/text_case.h"

namespace lobecast {

Eigen::VectorXcd SteeringPhasors(const Array& array, double theta0_rad, double phi0_rad) {
  const Vec3 r0 = UnitVectorAt(theta0_rad, phi0_rad);
  const double k = array.wavenumber_rad_m();
  Eigen::VectorXcd out(static_cast<Eigen::Index>(array.size()));
  for (std::size_t n = 0; n < array.size(); ++n)
    out[static_cast<Eigen::Index>(n)] = std::polar(1.0, -k * r0.dot(array.dipoles[n].position_m));
  return out;
}

std::string_view ToString(SteeringMode m) { return m == SteeringMode::kPhase ? "phase" : "delay"; }

std::optional<SteeringMode> SteeringModeFromString(std::string_view s) {
  for (SteeringMode m : {SteeringMode::kPhase, SteeringMode::kDelay})
    if (EqualsIgnoreCase(s, ToString(m))) return m;
  return std::nullopt;
}

std::vector<double> SteeringDelays(const std::vector<Vec3>& positions_m, const Vec3& direction) {
  std::vector<double> tau(positions_m.size());
  for (std::size_t n = 0; n < positions_m.size(); ++n)
    tau[n] = direction.dot(positions_m[n]) / kSpeedOfLight_m_s;
  return tau;
}

Eigen::VectorXcd SteeringPhasorsAt(const std::vector<Vec3>& positions_m, const Steering& steering,
                                   double frequency_hz) {
  if (!(frequency_hz > 0) || !(steering.design_frequency_hz > 0))
    throw InvalidArgument("steering needs frequencies > 0");
  Eigen::VectorXcd out(static_cast<Eigen::Index>(positions_m.size()));
  if (steering.mode == SteeringMode::kPhase) {
    // The same expression as Array::wavenumber_rad_m at the design frequency.
    const double k = 2.0 * kPi * steering.design_frequency_hz / kSpeedOfLight_m_s;
    for (std::size_t n = 0; n < positions_m.size(); ++n)
      out[static_cast<Eigen::Index>(n)] =
          std::polar(1.0, -k * steering.direction.dot(positions_m[n]));
  } else {
    const std::vector<double> tau = SteeringDelays(positions_m, steering.direction);
    for (std::size_t n = 0; n < positions_m.size(); ++n)
      out[static_cast<Eigen::Index>(n)] = std::polar(1.0, -2.0 * kPi * frequency_hz * tau[n]);
  }
  return out;
}

}  // namespace lobecast
