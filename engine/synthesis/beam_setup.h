// What the excitation synthesis of a design needs besides the solvers: the beam of
// an unsteered lattice, the polarization the elements radiate toward it, and the
// side-lobe directions an envelope is met on (the main beam left out). Pure
// geometry; the design reader (io/input/excitation_synthesis.h) calls it.
#pragma once

#include <vector>

#include "engine/constants.h"
#include "engine/grid.h"
#include "engine/synthesis/field_map.h"
#include "engine/synthesis/lattice_generator.h"
#include "engine/types.h"

namespace lobecast {

// (theta, phi) of a unit vector, radians.
Direction ToDirection(const Vec3& r_hat);

// The beam of an unsteered design: the lattice's broadside (grating_lobes.h), except
// that a line's broadside is a whole plane, in which the direction perpendicular to
// the elements too is the one they radiate best (z dipoles along x: +-y, not z);
// the sign makes the largest component positive.
Vec3 UnsteeredBeam(const LatticeSpec& lattice, const Vec3& element);

// The unit vector of r_hat x (r_hat x u) in (theta_hat, phi_hat) at the beam: what
// parallel elements along u radiate there. Throws InvalidArgument when the beam lies
// along u (they radiate nothing there).
PolarizationVector ElementPolarization(const Vec3& u, const Direction& beam);

// Covariance of a set of positions (m^2): the aperture's spread per direction.
Eigen::Matrix3d PositionCovariance(const std::vector<Vec3>& positions);

// Side-lobe samples for an envelope: rings of constant theta about every ~step (phi
// spacing step / sin theta), above the ground plane, at most about
// kMaxEnvelopeSamples, leaving out the free main beam: directions s with
// k sqrt((s - s0)^T C (s - s0)) < main_beam_factor * kFirstNullSpread (C the
// positions' covariance), where the uniform excitation's main lobe lies, widened by
// the factor for the taper an optimum needs. In direction cosines this is an ellipse
// for a panel and a band about the cone of a line.
inline constexpr double kMaxEnvelopeSamples = 3000;
// k sigma of a uniform line at its first null: k du L = 2 pi with sigma = L / sqrt(12)
// (a uniform disc gives 1.92 = 3.83 / 2); the free main beam's unit.
inline constexpr double kFirstNullSpread = 2.0 * kPi / 3.4641016151377544;  // 2 pi / sqrt(12)
struct SideLobeSamples {
  Directions directions;
  std::vector<double> theta_deg, phi_deg;
};
SideLobeSamples SampleSideLobes(const Array& array, const Direction& beam, double main_beam_factor);

}  // namespace lobecast
