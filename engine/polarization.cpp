// Polarization ellipse, Stokes parameters and co/cross decomposition (polarization.h).
#include "engine/polarization.h"

#include <cmath>
#include <limits>
#include <string>

#include "engine/decibels.h"
#include "engine/rounding_floor.h"
#include "engine/text_case.h"

namespace lobecast {

Polarization PolarizationOf(Complex et, Complex ep, double floor_v) {
  constexpr double kInvSqrt2 = 0.70710678118654752440;
  const Complex j(0.0, 1.0);
  Polarization p;
  p.e_right = Floored((et + j * ep) * kInvSqrt2, floor_v);
  p.e_left = Floored((et - j * ep) * kInvSqrt2, floor_v);
  const double at = std::norm(et), ap = std::norm(ep);
  const Complex cross = et * std::conj(ep);
  // S1 and S2 are differences of products of fields known to floor_v each: below
  // 2 floor (|Et| + |Ep|) they are rounding, exactly 0.
  const double s_floor = 2.0 * floor_v * (std::abs(et) + std::abs(ep));
  p.s0 = at + ap;
  p.s1 = std::abs(at - ap) < s_floor ? 0.0 : at - ap;
  p.s2 = std::abs(2.0 * cross.real()) < s_floor ? 0.0 : 2.0 * cross.real();
  p.s3 = 2.0 * cross.imag();  // = |E_R|^2 - |E_L|^2

  const double r = std::abs(p.e_right), l = std::abs(p.e_left);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  if (r + l == 0.0) {
    p.axial_ratio_db = nan;
    p.tilt_deg = nan;
    p.sense = 0;
    return p;
  }
  // Exactly circular: one hand is zero (up to the floor); the tilt is undefined.
  if (r == 0.0 || l == 0.0) {
    p.axial_ratio_db = 0.0;
    p.tilt_deg = nan;
    p.sense = r > l ? 1 : -1;
    return p;
  }
  // IEEE Std 145-2013: AR = (|E_R| + |E_L|) / | |E_R| - |E_L| |.
  const double diff = std::abs(r - l);
  if (diff < floor_v || diff <= kLinearTolerance * (r + l)) {
    p.axial_ratio_db = std::numeric_limits<double>::infinity();
    p.sense = 0;
  } else {
    p.axial_ratio_db = AmplitudeToDb((r + l) / diff);
    p.sense = r > l ? 1 : -1;
  }
  // tau = 1/2 atan2(S2, S1), folded into (-90, 90]; on the frame's axes exactly.
  if (p.s2 == 0.0 && p.s1 == 0.0) {
    p.tilt_deg = nan;  // circular to the floor in S1 and S2
  } else if (p.s2 == 0.0) {
    p.tilt_deg = p.s1 > 0.0 ? 0.0 : 90.0;
  } else if (p.s1 == 0.0) {
    p.tilt_deg = p.s2 > 0.0 ? 45.0 : -45.0;
  } else {
    double tau = 0.5 * std::atan2(p.s2, p.s1) / kDegree;
    if (tau <= -90.0) tau += 180.0;
    p.tilt_deg = tau;
  }
  return p;
}

std::string_view ToString(PolarizationReference r) {
  switch (r) {
    case PolarizationReference::kLinearX:
      return "x";
    case PolarizationReference::kLinearY:
      return "y";
    case PolarizationReference::kRightCircular:
      return "rhcp";
    case PolarizationReference::kLeftCircular:
      return "lhcp";
    case PolarizationReference::kTheta:
      return "theta";
    case PolarizationReference::kPhi:
      return "phi";
  }
  return "x";
}

std::optional<PolarizationReference> PolarizationReferenceFromString(std::string_view s) {
  const std::string lower = Lower(s);
  if (lower == "x") return PolarizationReference::kLinearX;
  if (lower == "y") return PolarizationReference::kLinearY;
  if (lower == "rhcp") return PolarizationReference::kRightCircular;
  if (lower == "lhcp") return PolarizationReference::kLeftCircular;
  if (lower == "theta") return PolarizationReference::kTheta;
  if (lower == "phi") return PolarizationReference::kPhi;
  return std::nullopt;
}

CoCross CoCrossOf(Complex et, Complex ep, double phi_rad, PolarizationReference ref,
                  double floor_v) {
  const double c = std::cos(phi_rad), s = std::sin(phi_rad);
  switch (ref) {
    case PolarizationReference::kLinearX:
      return {Floored(et * c - ep * s, floor_v), Floored(et * s + ep * c, floor_v)};
    case PolarizationReference::kLinearY:
      return {Floored(et * s + ep * c, floor_v), Floored(et * c - ep * s, floor_v)};
    case PolarizationReference::kRightCircular:
    case PolarizationReference::kLeftCircular: {
      const Polarization p = PolarizationOf(et, ep, floor_v);
      return ref == PolarizationReference::kRightCircular ? CoCross{p.e_right, p.e_left}
                                                          : CoCross{p.e_left, p.e_right};
    }
    case PolarizationReference::kTheta:
      return {Floored(et, floor_v), Floored(ep, floor_v)};
    case PolarizationReference::kPhi:
      return {Floored(ep, floor_v), Floored(et, floor_v)};
  }
  return {et, ep};
}

}  // namespace lobecast
