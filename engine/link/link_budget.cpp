#include "engine/link/link_budget.h"

#include <cmath>
#include <string>

#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {
namespace {

void RequirePositive(double v, const char* what) {
  if (!(std::isfinite(v) && v > 0)) {
    throw InvalidArgument(std::string(what) + ": found " + std::to_string(v) +
                          ", expected a finite value > 0");
  }
}

}  // namespace

double FreeSpacePathLoss(double distance_m, double wavelength_m) {
  RequirePositive(distance_m, "distance (m)");
  RequirePositive(wavelength_m, "wavelength (m)");
  const double x = 4 * kPi * distance_m / wavelength_m;
  return x * x;
}

LinkBudget Friis(const LinkInputs& in) {
  RequirePositive(in.power_w, "transmit power (W)");
  for (const auto& [v, what] :
       {std::pair{in.tx_gain, "transmit gain"}, std::pair{in.rx_gain, "receive gain"}}) {
    if (!(std::isfinite(v) && v >= 0)) {
      throw InvalidArgument(std::string(what) + ": found " + std::to_string(v) +
                            ", expected a finite value >= 0 (linear)");
    }
  }
  const double plf = in.polarization_loss_factor;
  if (!std::isnan(plf) && !(plf >= 0 && plf <= 1)) {
    throw InvalidArgument("polarization loss factor: found " + std::to_string(plf) +
                          ", expected 0 .. 1");
  }
  LinkBudget b;
  b.path_loss = FreeSpacePathLoss(in.distance_m, in.wavelength_m);
  b.eirp_w = in.power_w * in.tx_gain;
  // No field at one end: nothing is received, whatever the (then undefined) PLF.
  b.received_w = b.eirp_w == 0 || in.rx_gain == 0 ? 0.0 : b.eirp_w * in.rx_gain * plf / b.path_loss;
  return b;
}

double PolarizationLossFactor(const Eigen::Vector3cd& incident_v, double incident_floor_v,
                              const Eigen::Vector3cd& rx_transmit_v, double rx_floor_v) {
  const double w = incident_v.norm(), h = rx_transmit_v.norm();
  if (!(w > incident_floor_v) || !(h > rx_floor_v)) return std::nan("");
  // Plain (bilinear) product: Eigen's dot() would conjugate its left operand.
  const Complex p = (incident_v.array() * rx_transmit_v.array()).sum();
  if (std::abs(p) <= w * rx_floor_v + h * incident_floor_v) return 0.0;
  const double plf = std::norm(p) / (w * w * h * h);
  return plf > 1.0 ? 1.0 : plf;  // Cauchy-Schwarz: above 1 only by rounding
}

double PolarizationLossFactor(Complex co_v, Complex cross_v) {
  const double co = std::norm(co_v), total = co + std::norm(cross_v);
  if (!(total > 0)) return std::nan("");
  return co / total;
}

}  // namespace lobecast
