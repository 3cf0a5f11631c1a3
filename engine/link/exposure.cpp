#include "engine/link/exposure.h"

#include <cmath>
#include <string>

#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {
namespace {

void RequireEirp(double eirp_w) {
  if (!(std::isfinite(eirp_w) && eirp_w >= 0)) {
    throw InvalidArgument("EIRP: found " + std::to_string(eirp_w) +
                          " W, expected a finite value >= 0");
  }
}

}  // namespace

double PowerDensity(double eirp_w, double distance_m) {
  RequireEirp(eirp_w);
  if (!(std::isfinite(distance_m) && distance_m > 0)) {
    throw InvalidArgument("distance: found " + std::to_string(distance_m) +
                          " m, expected a finite value > 0");
  }
  return eirp_w / (4 * kPi * distance_m * distance_m);
}

double DistanceToDensity(double eirp_w, double density_w_m2) {
  RequireEirp(eirp_w);
  if (!(std::isfinite(density_w_m2) && density_w_m2 > 0)) {
    throw InvalidArgument("power density: found " + std::to_string(density_w_m2) +
                          " W/m^2, expected a finite value > 0");
  }
  return std::sqrt(eirp_w / (4 * kPi * density_w_m2));
}

}  // namespace lobecast
