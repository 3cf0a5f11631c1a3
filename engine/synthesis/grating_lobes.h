// Grating lobes of a periodic lattice steered toward r_hat0 (a standard result
// of array theory; e.g. R. J. Mailloux, Phased Array Antenna Handbook, 2nd ed.,
// 2005, ch. 2, from memory). The array factor repeats wherever k r_hat differs
// from k r_hat0 by a reciprocal-lattice vector:
//   line of pitch d along a:  r_hat . a = r_hat0 . a + m lambda / d, m != 0;
//   panel with basis a1, a2:  (u, v) = (u0, v0) + lambda (p b1 + q b2), (p, q) != 0,
//     a_i . b_j = delta_ij, (u, v) the components in the lattice plane;
// a lobe is in visible space when |r_hat . a| <= 1 (line) or u^2 + v^2 <= 1 (panel).
// For a line the lobe is a cone about the axis; the direction reported is the
// cone's line in the plane of the axis and r_hat0. For a panel it is the one on
// r_hat0's side of the lattice plane (the mirror image across it is a lobe too).
// Rings are not periodic: none are reported.
#pragma once

#include <vector>

#include "engine/synthesis/lattice_generator.h"

namespace lobecast {

struct GratingLobe {
  Vec3 direction = Vec3::UnitZ();     // global, unit
  double theta_rad = 0, phi_rad = 0;  // of direction; phi in [0, 2 pi), 0 on the poles
  int order_1 = 0, order_2 = 0;       // m (line) or (p, q) (panel)
};

// Within `tolerance` of the edge of visible space counts as visible (a lobe at the
// horizon). Throws InvalidArgument on a wavelength <= 0.
std::vector<GratingLobe> VisibleGratingLobes(const LatticeSpec& lattice,
                                             const Vec3& steer_direction, double wavelength_m,
                                             double tolerance = 1e-12);

// The direction whose array factor is the main beam when nothing is steered: the
// panel's normal (global), or a direction perpendicular to a line.
Vec3 BroadsideOf(const LatticeSpec& lattice);

}  // namespace lobecast
