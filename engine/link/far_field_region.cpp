#include "engine/link/far_field_region.h"

#include <algorithm>
#include <cmath>
#include <vector>

#include "engine/ground.h"

namespace lobecast {

FarFieldRegionResult FarFieldRegionOf(const Array& array) {
  std::vector<Vec3> points;
  auto add = [&points](const Dipole& d) {
    points.push_back(d.position_m + 0.5 * d.length_m * d.orientation);
    points.push_back(d.position_m - 0.5 * d.length_m * d.orientation);
  };
  for (const Dipole& d : array.dipoles) {
    add(d);
    if (array.ground == Ground::kPec) add(ImageOf(d));
  }
  FarFieldRegionResult out;
  double d2 = 0;
  if (points.size() <= kExactDimensionPoints) {
    for (std::size_t m = 0; m < points.size(); ++m) {
      for (std::size_t n = m + 1; n < points.size(); ++n) {
        d2 = std::max(d2, (points[m] - points[n]).squaredNorm());
      }
    }
  } else {
    Vec3 lo = points.front(), hi = points.front();
    for (const Vec3& p : points) lo = lo.cwiseMin(p), hi = hi.cwiseMax(p);
    d2 = (hi - lo).squaredNorm();
    out.largest_dimension_is_bound = true;
  }
  const double lambda = array.wavelength_m();
  out.region.largest_dimension_m = std::sqrt(d2);
  out.region.fraunhofer_m = 2 * d2 / lambda;
  out.region.few_wavelengths_m = kFarFieldMinWavelengths * lambda;
  return out;
}

}  // namespace lobecast
