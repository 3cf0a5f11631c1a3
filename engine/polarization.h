// Polarization of a far-field phasor (E_theta, E_phi), exp(+j w t) convention.
// Sense and axial ratio as IEEE Std 145-2013: right-hand when the field rotates
// counter-clockwise about r_hat with the thumb along r_hat. With exp(+j w t) the
// RHCP unit vector is (theta_hat - j phi_hat)/sqrt2, so
//   E_R = (E_theta + j E_phi)/sqrt2,  E_L = (E_theta - j E_phi)/sqrt2.
// Co/cross-polarization: Ludwig's third definition (A. C. Ludwig, "The definition
// of cross polarization", IEEE Trans. Antennas Propag. AP-21, 1973) for a linear
// x or y reference; for a circular reference co is the chosen hand; along theta_hat
// ("theta": co = E_theta, cross = E_phi) or phi_hat ("phi": the reverse), the natural
// reference for beams near the horizon and for vertical or horizontal elements
// (CONVENTIONS §2). theta_hat and phi_hat are singular on the z axis, where the
// components follow the grid's phi (theta_hat = x, phi_hat = y at phi = 0).
#pragma once

#include <cstdint>
#include <optional>
#include <string_view>

#include "engine/types.h"

namespace lobecast {

struct Polarization {
  Complex e_right = 0.0;      // V, RHCP component
  Complex e_left = 0.0;       // V, LHCP component
  double s0 = 0.0;            // Stokes parameters, V^2: |Et|^2 + |Ep|^2
  double s1 = 0.0;            // |Et|^2 - |Ep|^2
  double s2 = 0.0;            // 2 Re(Et Ep*)
  double s3 = 0.0;            // 2 Im(Et Ep*) = |E_R|^2 - |E_L|^2 (positive for right-hand)
  double axial_ratio_db = 0;  // 0 dB circular, +inf linear, NaN where the field is zero
  // Major axis from theta_hat toward phi_hat, (-90, 90]; NaN (undefined) for a zero or
  // circular field.
  double tilt_deg = 0;
  std::int8_t sense = 0;  // +1 right, -1 left, 0 linear (or zero field)
};

// |E_R| and |E_L| closer than kLinearTolerance * (|E_R| + |E_L|) count as linear
// (AR = +inf, sense 0): below that the difference is the rounding of this function's
// own arithmetic.
inline constexpr double kLinearTolerance = 1e-12;

// floor_v: the numerical floor of the sum that made the field (FieldFloor_v,
// engine/rounding_floor.h; 0 for exact inputs). Decided by it: a field whose |E_R| or
// |E_L| is below the floor is exactly circular (AR 0 dB, tilt NaN, sense of the other
// hand); one whose | |E_R| - |E_L| | is below it exactly linear (AR +inf, sense 0);
// Stokes S1 and S2 below their rounding (2 floor (|Et| + |Ep|)) are exactly 0, so a tilt
// on an axis of the (theta_hat, phi_hat) frame is exactly 0, +-45 or 90 deg.
Polarization PolarizationOf(Complex e_theta, Complex e_phi, double floor_v = 0.0);

enum class PolarizationReference {
  kLinearX,
  kLinearY,
  kRightCircular,
  kLeftCircular,
  kTheta,  // co = E_theta, cross = E_phi
  kPhi,    // co = E_phi, cross = E_theta
};
// Every reference, in the order the names are listed to users.
inline constexpr PolarizationReference kAllPolarizationReferences[] = {
    PolarizationReference::kLinearX,       PolarizationReference::kLinearY,
    PolarizationReference::kRightCircular, PolarizationReference::kLeftCircular,
    PolarizationReference::kTheta,         PolarizationReference::kPhi};
std::string_view ToString(PolarizationReference r);
// Accepts "x", "y", "rhcp", "lhcp", "theta", "phi" (case-insensitive).
std::optional<PolarizationReference> PolarizationReferenceFromString(std::string_view s);

struct CoCross {
  Complex co;     // V
  Complex cross;  // V
};
// Ludwig-3 x reference: co = Et cos(phi) - Ep sin(phi), cross = Et sin(phi) + Ep cos(phi);
// y reference: co = Et sin(phi) + Ep cos(phi), cross = Et cos(phi) - Ep sin(phi);
// theta: co = Et, cross = Ep; phi: co = Ep, cross = Et (phi_rad unused).
// floor_v: as for PolarizationOf; a co or cross part below it (the combinations can
// cancel to rounding where the components do not) is exactly 0.
CoCross CoCrossOf(Complex e_theta, Complex e_phi, double phi_rad, PolarizationReference ref,
                  double floor_v = 0.0);

}  // namespace lobecast
