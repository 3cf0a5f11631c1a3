// Angular grids and direction lists (grid.h).
#include "engine/grid.h"

#include <cmath>
#include <sstream>

#include "engine/check.h"
#include "engine/error.h"

namespace lobecast {

std::vector<double> AngleRange::Values() const {
  if (!std::isfinite(start_deg) || !std::isfinite(stop_deg) || !std::isfinite(step_deg)) {
    throw InvalidArgument("angle range: start, stop and step must be finite");
  }
  if (step_deg <= 0) {
    std::ostringstream s;
    s << "angle range: step found " << step_deg << " deg, expected > 0";
    throw InvalidArgument(s.str());
  }
  if (stop_deg < start_deg) {
    std::ostringstream s;
    s << "angle range: stop " << stop_deg << " deg is below start " << start_deg << " deg";
    throw InvalidArgument(s.str());
  }
  const double span = (stop_deg - start_deg) / step_deg;
  const auto n = static_cast<std::size_t>(std::floor(span + 1e-9)) + 1;
  std::vector<double> v(n);
  for (std::size_t i = 0; i < n; ++i) v[i] = start_deg + static_cast<double>(i) * step_deg;
  // Land exactly on an inclusive stop despite rounding in i * step.
  if (std::abs(v.back() - stop_deg) <= 1e-9 * step_deg) v.back() = stop_deg;
  return v;
}

AngularGrid AngularGrid::FromRanges(const AngleRange& theta, const AngleRange& phi) {
  return AngularGrid{theta.Values(), phi.Values()};
}

Directions Directions::FromGrid(const AngularGrid& grid) {
  Directions d;
  d.theta_rad_.reserve(grid.size());
  d.phi_rad_.reserve(grid.size());
  for (double t : grid.theta_deg) {
    for (double p : grid.phi_deg) {
      d.theta_rad_.push_back(t * kDegree);
      d.phi_rad_.push_back(p * kDegree);
    }
  }
  return d;
}

Directions Directions::FromAngles(const std::vector<double>& theta_rad,
                                  const std::vector<double>& phi_rad) {
  LOBECAST_CHECK_EQ(theta_rad.size(), phi_rad.size());
  Directions d;
  d.theta_rad_ = theta_rad;
  d.phi_rad_ = phi_rad;
  return d;
}

Vec3 UnitVectorAt(double t, double p) {
  return {std::sin(t) * std::cos(p), std::sin(t) * std::sin(p), std::cos(t)};
}

Vec3 ThetaHatAt(double t, double p) {
  return {std::cos(t) * std::cos(p), std::cos(t) * std::sin(p), -std::sin(t)};
}

Vec3 PhiHatAt(double p) { return {-std::sin(p), std::cos(p), 0.0}; }

Vec3 Directions::r_hat(std::size_t i) const { return UnitVectorAt(theta_rad_[i], phi_rad_[i]); }

Vec3 Directions::theta_hat(std::size_t i) const { return ThetaHatAt(theta_rad_[i], phi_rad_[i]); }

Vec3 Directions::phi_hat(std::size_t i) const { return PhiHatAt(phi_rad_[i]); }

}  // namespace lobecast
