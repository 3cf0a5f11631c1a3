// Grating-lobe-free spacing of rectangular and triangular lattices over a scan
// region (a standard result of array theory: R. J. Mailloux, Phased Array Antenna
// Handbook, 2nd ed., 2005, ch. 2, from memory). In sine space (u, v) = (sin theta
// cos phi, sin theta sin phi) the array factor of a lattice steered to s repeats at
// s + lambda G for every reciprocal-lattice vector G != 0 (grating_lobes.h); a lobe
// is in visible space when |s + lambda G| <= 1. The scan region is the ellipse
// (u / sin theta_xz)^2 + (v / sin theta_yz)^2 <= 1, so the lattice is grating-lobe
// free over it when the distance from every -lambda G to the ellipse exceeds 1.
//
// Lattices as lattice_generator.h builds them: rectangular basis (dx, 0), (0, dy);
// triangular basis (dx, 0), (dx / 2, dy) (odd rows shifted by half a pitch), whose
// reciprocal vectors nearest the origin are (0, 1/dy) and (1/dx, +-1/(2 dy)).
// Spacings here are in wavelengths.
#pragma once

#include "engine/synthesis/lattice_generator.h"

namespace lobecast {

struct ScanRegion {
  double sin_xz = 0;  // semi-axis along u: sin of the scan limit in the xz plane
  double sin_yz = 0;  // semi-axis along v: sin of the scan limit in the yz plane
};

// Distance in sine space from the point p = (pu, pv) to the filled ellipse of the
// region (0 inside it).
double DistanceToRegion(double pu, double pv, const ScanRegion& region);

// The grating-lobe margin: min over G != 0 of the distance from lambda G to the
// region, minus 1. > 0: the nearest grating lobe stays this far (in sine space)
// outside visible space at the worst scan direction; < 0: one enters. kind is
// kRectangular or kTriangular; spacings in wavelengths.
double GratingLobeMargin(LatticeKind kind, double dx, double dy, const ScanRegion& region);

struct LatticeSpacing {
  double dx = 0, dy = 0;  // wavelengths
};

// The spacing of largest cell area dx dy (fewest elements per aperture) whose
// margin is at least `guard` (>= 0; 0: the lattice condition itself, the nearest
// grating lobe exactly on the edge of visible space at the worst scan direction).
// Rectangular, in closed form: dx = 1 / (1 + sin_xz + guard), dy = 1 / (1 + sin_yz +
// guard). Triangular: the reciprocal vector (0, 1/dy) bounds the row pitch, dy <=
// 1 / (1 + sin_yz + guard); for each row pitch the largest pitch dx along the rows that
// keeps the others far enough is found by bisection, and dy is searched for the
// largest dx dy (for a circular region this is the equilateral lattice, dx = 2 /
// (sqrt(3) (1 + s + guard)), dy = 1 / (1 + s + guard)). Throws InvalidArgument for a region
// outside [0, 1) or a negative guard.
LatticeSpacing LargestSpacing(LatticeKind kind, const ScanRegion& region, double guard);

}  // namespace lobecast
