#include "engine/synthesis/synthesis_common.h"

#include <cmath>
#include <limits>
#include <sstream>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/field/far_field.h"
#include "engine/power/power_large.h"
#include "engine/power/power_quadrature.h"
#include "engine/power/radiated_power.h"

namespace lobecast::synthesis_detail {

Eigen::MatrixXcd ExactFieldMap(const Array& array, const Direction& direction) {
  return FieldMap(array, Directions::FromAngles({direction.theta_rad}, {direction.phi_rad}));
}

double DepthDb(double field, double reference, double floor) {
  if (field < floor) return -std::numeric_limits<double>::infinity();
  return AmplitudeToDb(field / reference);
}

PowerOf::PowerOf(const Array& array, int num_threads) : array_(array), num_threads_(num_threads) {
  quadrature_.num_threads = num_threads;
  if (array.size() <= kDensePowerLimit) {
    r_ = ResistanceMatrix(array, num_threads);
    return;
  }
  route_ = ChoosePowerRoute(array, PowerMethod::kAuto, false, false, quadrature_).route;
}

double PowerOf::operator()(const Eigen::VectorXcd& currents_a) const {
  if (r_) return RadiatedPower(*r_, currents_a);
  if (route_ == PowerRoute::kQuadrature)
    return RadiatedPowerByQuadrature(array_, currents_a, quadrature_).radiated_power_w;
  return 0.5 * currents_a.dot(Product(currents_a)).real();
}

Eigen::VectorXcd PowerOf::Product(const Eigen::VectorXcd& x) const {
  if (r_) {
    Eigen::VectorXcd out(x.size());
    out.real() = *r_ * x.real();
    out.imag() = *r_ * x.imag();
    return out;
  }
  if (route_ == PowerRoute::kQuadrature)
    return ResistanceProductByQuadrature(array_, x, quadrature_).values;
  return ResistanceProductStreamed(array_, x, num_threads_);
}

double FieldSquared(const Eigen::MatrixXcd& map, Eigen::Index i, const Eigen::VectorXcd& currents) {
  const Eigen::Index k = map.rows() / 2;
  return std::norm((map.row(i) * currents)(0)) + std::norm((map.row(k + i) * currents)(0));
}

std::string DegreesText(double theta_rad, double phi_rad) {
  std::ostringstream s;
  s << "(theta " << theta_rad / kDegree << ", phi " << phi_rad / kDegree << ") deg";
  return s.str();
}

void NormalizeCurrents(Eigen::VectorXcd& x, Complex reference_field) {
  const double m = x.cwiseAbs().maxCoeff();
  const Complex phase =
      std::abs(reference_field) > 0 ? reference_field / std::abs(reference_field) : Complex(1.0);
  x *= std::conj(phase) / m;
}

}  // namespace lobecast::synthesis_detail
