// The numerical floor (CONVENTIONS §1): a far field is a sum whose rounding error is
// about eps * (w mu0 / 4 pi) * sum_s |I_s Le_s| over the radiating sources (a PEC
// image is a source too). A field, level or ratio decided by a quantity below
// kRoundingFloorRelative of that sum is rounding, not physics: it is an exact zero
// (-inf dB; a ratio against it is +-inf; "below rounding" in text).
//
// The floor is computed once here, carried with the pattern result
// (PatternResult::field_floor_v) and computed again, identically, when a result file
// is read back (from the stored array and currents). Every output applies it through
// the functions below: field components (Floored), derived components (the Ludwig-3
// and circular co/cross parts, CoCrossOf's floor_v), polarization (PolarizationOf's
// floor_v) and, through them, intensity, directivity, nulls and ratios.
#pragma once

#include <complex>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// 1e-13 of the sum of the magnitudes: ~450 eps, well above the rounding of sums of
// up to millions of terms (which grows like sqrt(N) eps in practice), and 260 dB
// below the strongest field the sources can make.
inline constexpr double kRoundingFloorRelative = 1e-13;

// kRoundingFloorRelative * (w mu0 / 4 pi) * sum_s |I_s Le_s|, V (rE, as the far field
// is reported), the sum over the dipoles and, with a PEC ground, their images.
// currents_a: one per dipole (the sizes must agree: checked).
double FieldFloor_v(const Array& array, const Eigen::VectorXcd& currents_a);

// c, or exactly 0 when |c| is below the floor (a field component that is rounding).
inline Complex Floored(Complex c, double floor_v) {
  return std::abs(c) < floor_v ? Complex(0.0) : c;
}

}  // namespace lobecast
