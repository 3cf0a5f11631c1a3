// What the synthesis files share (internal to engine/synthesis): the exact field
// map of a few directions, depths against the numerical floor, the power of a current
// vector by the route that fits the array's size, and the scaling of results.
#pragma once

#include <cstddef>
#include <optional>
#include <string>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/power/power_cost.h"
#include "engine/power/power_quadrature.h"
#include "engine/rounding_floor.h"
#include "engine/synthesis/field_map.h"
#include "engine/types.h"

namespace lobecast::synthesis_detail {

// Dense resistance matrix up to this many dipoles, streamed products above.
inline constexpr std::size_t kDensePowerLimit = 4096;

// The field map (field_map.h) of one direction: rows E_theta, E_phi.
Eigen::MatrixXcd ExactFieldMap(const Array& array, const Direction& direction);

// 20 log10(field / reference), -inf when field is below the floor (the numerical floor
// of CONVENTIONS §1, FieldFloor_v in engine/rounding_floor.h, the one every output uses).
double DepthDb(double field, double reference, double floor);

// P = 1/2 I^H R I and R x on one array: from the matrix (built once) for arrays up
// to kDensePowerLimit; above it by the route the pattern job's auto takes
// (ChoosePowerRoute, chosen once): the band-limited quadrature (power_quadrature.h,
// error bound about 1e-10 relative) where its cost is estimated well below the
// closed form's, else the closed form streamed (power_large.h). A 128 x 128 lattice
// at half a wavelength: R x in 0.23 s CPU by quadrature, 5.9 s streamed.
class PowerOf {
 public:
  PowerOf(const Array& array, int num_threads);
  double operator()(const Eigen::VectorXcd& currents_a) const;
  Eigen::VectorXcd Product(const Eigen::VectorXcd& x) const;  // R x (ohm x units of x)
  PowerRoute route() const { return route_; }

 private:
  const Array& array_;
  int num_threads_;
  std::optional<Eigen::MatrixXd> r_;
  PowerRoute route_ = PowerRoute::kMatrix;
  PowerQuadratureOptions quadrature_;
};

// |E|^2 = |row_theta I|^2 + |row_phi I|^2 at direction i of a field map with k directions.
double FieldSquared(const Eigen::MatrixXcd& map, Eigen::Index i, const Eigen::VectorXcd& currents);

// "(40, 180) deg" for messages.
std::string DegreesText(double theta_rad, double phi_rad);

// Scales x so that max |x_n| = 1 and the phase of reference . x is 0.
void NormalizeCurrents(Eigen::VectorXcd& x, Complex reference_field);

}  // namespace lobecast::synthesis_detail
