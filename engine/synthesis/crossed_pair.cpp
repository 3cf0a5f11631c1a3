#include "engine/synthesis/crossed_pair.h"
#include "engine/decibels.h"

#include <cmath>
#include <limits>

#include <Eigen/Geometry>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(CircularSense s) { return s == CircularSense::kRight ? "rhcp" : "lhcp"; }

std::optional<CircularSense> CircularSenseFromString(std::string_view s) {
  for (CircularSense c : {CircularSense::kRight, CircularSense::kLeft})
    if (EqualsIgnoreCase(s, ToString(c))) return c;
  return std::nullopt;
}

PolarizationVector CircularPolarizationOf(CircularSense s) {
  return s == CircularSense::kRight ? PolarizationVector::RightCircular()
                                    : PolarizationVector::LeftCircular();
}

Vec3 LatticeNormal(const LatticeSpec& lattice) {
  if (lattice.kind == LatticeKind::kLine)
    throw InvalidArgument(
        "crossed pairs need a lattice plane (rectangular, triangular or ring), not a line");
  return (lattice.rotation * Vec3::UnitZ()).normalized();
}

CrossedPair CrossedPairFor(const LatticeSpec& lattice, const Vec3& first, const Vec3& beam,
                           CircularSense sense) {
  const Vec3 n = LatticeNormal(lattice);
  const double len = first.stableNorm();
  if (!(len > 0)) throw InvalidArgument("the crossed pair's first orientation is the zero vector");
  const Vec3 u = first / len;
  if (!(std::abs(u.dot(n)) <= 1e-9))
    throw InvalidArgument(
        "crossed pairs lie in the lattice plane: the element orientation must be "
        "perpendicular to the lattice's normal");
  const double side = beam.dot(n);
  if (!(std::abs(side) >= 1e-9))
    throw InvalidArgument(
        "the beam lies in the plane of the crossed pairs, where their field is linear");
  CrossedPair p;
  p.first = first;
  p.second = n.cross(u);
  const bool behind = (sense == CircularSense::kRight) == (side > 0);
  p.second_phase_deg = behind ? -90.0 : 90.0;
  return p;
}

double CrossedPairPowerPattern(const Vec3& normal, const Vec3& r) {
  const double c = r.dot(normal);
  return 0.5 * (1.0 + c * c);
}

double CrossedPairAxialRatioDb(double theta_deg) {
  const double c = std::abs(std::cos(theta_deg * kDegree));
  if (!(c > 1e-15)) return std::numeric_limits<double>::infinity();
  return -AmplitudeToDb(c);
}

}  // namespace lobecast
