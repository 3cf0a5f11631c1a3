// Angular grids and direction lists. Angles are degrees at this interface (they come
// straight from files) and radians inside Directions.
#pragma once

#include <cstddef>
#include <vector>

#include "engine/types.h"

namespace lobecast {

// start, start + step, ..., up to and including stop (within 1e-9 of a step).
struct AngleRange {
  double start_deg = 0.0;
  double stop_deg = 0.0;
  double step_deg = 1.0;

  // Throws InvalidArgument if step <= 0, a value is not finite, or stop < start.
  std::vector<double> Values() const;
};

// A theta-phi grid. Flattened index of (theta i, phi j) is i * phi_deg.size() + j
// (theta-major), the layout of every (Nt, Np) dataset.
struct AngularGrid {
  std::vector<double> theta_deg;
  std::vector<double> phi_deg;

  static AngularGrid FromRanges(const AngleRange& theta, const AngleRange& phi);
  std::size_t size() const { return theta_deg.size() * phi_deg.size(); }
};

// The spherical unit vectors at (theta, phi), radians: r_hat, theta_hat and phi_hat
// of the right-handed frame (CONVENTIONS §1). On a pole theta_hat and phi_hat take
// the given phi.
Vec3 UnitVectorAt(double theta_rad, double phi_rad);
Vec3 ThetaHatAt(double theta_rad, double phi_rad);
Vec3 PhiHatAt(double phi_rad);

// An ordered list of observation directions: (theta, phi) pairs in radians, with
// their unit vectors computed on demand. What the field needs per direction (k r_hat
// and the projection vectors) is precomputed once by the FieldPlan that takes them.
class Directions {
 public:
  Directions() = default;
  // Theta-major, the grid's flattened order.
  static Directions FromGrid(const AngularGrid& grid);
  // theta_rad[i] with phi_rad[i]; the two lists have the same length (checked).
  static Directions FromAngles(const std::vector<double>& theta_rad,
                               const std::vector<double>& phi_rad);

  std::size_t size() const { return theta_rad_.size(); }
  double theta_rad(std::size_t i) const { return theta_rad_[i]; }
  double phi_rad(std::size_t i) const { return phi_rad_[i]; }
  Vec3 r_hat(std::size_t i) const;
  Vec3 theta_hat(std::size_t i) const;
  Vec3 phi_hat(std::size_t i) const;

 private:
  std::vector<double> theta_rad_;
  std::vector<double> phi_rad_;
};

}  // namespace lobecast
