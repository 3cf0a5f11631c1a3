// Where an array's far field begins: the Fraunhofer distance 2 D^2 / lambda with D
// the largest dimension of the radiating structure (C. A. Balanis, Antenna Theory,
// 4th ed., 2016, sec. 2.2.4, field regions; from memory), and a few wavelengths for
// electrically small arrays, where 2 D^2 / lambda is tiny but the reactive 1/r^2 and
// 1/r^3 terms are not (common practice). Below either the far-field figures (gain,
// path loss, power density) are not to be trusted.
#pragma once

#include "engine/types.h"

namespace lobecast {

// The "few wavelengths" of common practice: at 3 lambda the first near-field term is
// 1 / (k r) = 5 % of the far field.
inline constexpr double kFarFieldMinWavelengths = 3.0;

struct FarFieldRegion {
  // Largest distance between two points of the radiating structure (m): both ends of
  // every dipole (r_n +- l_n u_n / 2), and over PEC ground their images too, which
  // radiate as part of the pattern.
  double largest_dimension_m = 0;
  double fraunhofer_m = 0;       // 2 D^2 / lambda
  double few_wavelengths_m = 0;  // kFarFieldMinWavelengths lambda
  // The larger of the two: the distance from which far-field figures hold.
  double start_m() const {
    return fraunhofer_m > few_wavelengths_m ? fraunhofer_m : few_wavelengths_m;
  }
};

// Exact (all pairs of points) up to kExactDimensionPoints points; above that, the
// diagonal of the bounding box, which is never smaller (a bound, said in
// largest_dimension_is_bound).
inline constexpr std::size_t kExactDimensionPoints = 16384;
struct FarFieldRegionResult {
  FarFieldRegion region;
  bool largest_dimension_is_bound = false;
};
FarFieldRegionResult FarFieldRegionOf(const Array& array);

}  // namespace lobecast
