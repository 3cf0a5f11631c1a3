#include "engine/synthesis/field_map.h"

#include <cmath>
#include <sstream>

#include "engine/error.h"

namespace lobecast {

PolarizationVector PolarizationVector::LudwigX(double phi_rad) {
  return {std::cos(phi_rad), -std::sin(phi_rad)};
}
PolarizationVector PolarizationVector::LudwigY(double phi_rad) {
  return {std::sin(phi_rad), std::cos(phi_rad)};
}
PolarizationVector PolarizationVector::RightCircular() {
  return {1.0 / std::sqrt(2.0), Complex(0.0, -1.0 / std::sqrt(2.0))};
}
PolarizationVector PolarizationVector::LeftCircular() {
  return {1.0 / std::sqrt(2.0), Complex(0.0, 1.0 / std::sqrt(2.0))};
}

void PolarizationVector::Validate() const {
  const double n2 = std::norm(theta) + std::norm(phi);
  if (!std::isfinite(n2) || std::abs(std::sqrt(n2) - 1.0) > 1e-9) {
    std::ostringstream m;
    m << "polarization: found a vector of length " << std::sqrt(n2)
      << "; expected a unit vector (|p_theta|^2 + |p_phi|^2 = 1)";
    throw InvalidArgument(m.str());
  }
}

Eigen::MatrixXcd FieldMap(const FieldPlan& plan) {
  const auto k = static_cast<Eigen::Index>(plan.num_directions());
  Eigen::MatrixXcd a(2 * k, static_cast<Eigen::Index>(plan.num_dipoles()));
  FarField unit;
  unit.e_theta = Eigen::VectorXcd::Zero(k);
  unit.e_phi = Eigen::VectorXcd::Zero(k);
  // Row i of A is the conjugate transpose of A^H e_i.
  for (Eigen::Index i = 0; i < k; ++i) {
    unit.e_theta[i] = 1.0;
    a.row(i) = plan.ExecuteAdjoint(unit).values.adjoint();
    unit.e_theta[i] = 0.0;
    unit.e_phi[i] = 1.0;
    a.row(k + i) = plan.ExecuteAdjoint(unit).values.adjoint();
    unit.e_phi[i] = 0.0;
  }
  return a;
}

Eigen::MatrixXcd FieldMap(const Array& array, const Directions& directions) {
  FieldOptions direct;
  direct.method = FieldMethod::kDirect;
  if (directions.size() <= kAdjointMapLimit) return FieldMap(FieldPlan(array, directions, direct));
  direct.num_threads = 1;
  const auto k = static_cast<Eigen::Index>(directions.size());
  Eigen::MatrixXcd a(2 * k, static_cast<Eigen::Index>(array.size()));
  Array one = array;
  const Eigen::VectorXcd unit = Eigen::VectorXcd::Ones(1);
  for (std::size_t n = 0; n < array.size(); ++n) {
    one.dipoles.assign(1, array.dipoles[n]);
    const FarField f = FieldPlan(one, directions, direct).Execute(unit);
    a.col(static_cast<Eigen::Index>(n)) << f.e_theta, f.e_phi;
  }
  return a;
}

Eigen::RowVectorXcd PolarizedFieldRow(const Array& array, const Direction& direction,
                                      const PolarizationVector& polarization) {
  polarization.Validate();
  const Eigen::MatrixXcd a =
      FieldMap(array, Directions::FromAngles({direction.theta_rad}, {direction.phi_rad}));
  return std::conj(polarization.theta) * a.row(0) + std::conj(polarization.phi) * a.row(1);
}

}  // namespace lobecast
