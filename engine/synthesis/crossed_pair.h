// Crossed pairs: two short dipoles at one lattice site, perpendicular to each other in
// the lattice plane and fed a quarter period apart, for circular polarization
// (design files: [element] crossed_pair; sizing: polarization = "rhcp" or "lhcp").
//
// The pair: the first dipole along the template's orientation u, the second along
// n x u (n the lattice plane's normal, rotation * z), with current I2 = c I1,
// c = -j or +j. Sense (IEEE Std 145-2013 with exp(+jwt), CONVENTIONS §2): the real
// current vector Re[(u + c n x u) exp(jwt)] is u cos wt + (n x u) sin wt for c = -j,
// turning from u toward n x u, i.e. counter-clockwise about u x (n x u) = n. Seen along
// a direction r the far field (the part of that vector across r) turns the same way
// about r when r . n > 0 and the other way when r . n < 0. So c = -j gives right-hand
// circular polarization toward every r with r . n > 0 (left-hand below the plane),
// c = +j left-hand; the beam's side of the plane picks c. In the plane itself
// (r . n = 0) the field is linear.
//
// Power pattern of one pair (CONVENTIONS §1 far field: rE ~ sum I_n r x (r x u_n)):
// |P(u) + c P(v)|^2 = |P(u)|^2 + |P(v)|^2 + 2 Re(c*) P(u) . P(v) with P(w) = w - r (r . w)
// real, and Re(c*) = 0 for c = -+j, so the cross term vanishes:
//   |E|^2 ~ (1 - (r . u)^2) + (1 - (r . v)^2) = 1 + (r . n)^2,
// the turnstile pattern (1 + cos^2 theta for a pair in the xz..yz plane), against one
// dipole's 1 - (r . u)^2. Axial ratio in the principal plane of u at angle theta from
// n: E along theta_hat ~ cos theta (from u), along phi_hat ~ 1 (from v), so
// AR = 1 / |cos theta| (20 log10, dB): 3.01 dB at 45 deg. Any ground image factor of
// horizontal pairs multiplies both dipoles alike (both images reversed), so the sense
// and the axial ratio in the upper half space are those of free space.
#pragma once

#include <optional>
#include <string_view>

#include "engine/synthesis/field_map.h"
#include "engine/synthesis/lattice_generator.h"
#include "engine/types.h"

namespace lobecast {

enum class CircularSense { kRight, kLeft };
std::string_view ToString(CircularSense s);                                // "rhcp", "lhcp"
std::optional<CircularSense> CircularSenseFromString(std::string_view s);  // case-insensitive

// RightCircular or LeftCircular (field_map.h).
PolarizationVector CircularPolarizationOf(CircularSense s);

struct CrossedPair {
  Vec3 first = Vec3::UnitX();     // the template's orientation (unit)
  Vec3 second = Vec3::UnitY();    // n x first
  double second_phase_deg = -90;  // I2 = I1 exp(j phase): -90 (behind) or +90 (ahead)
};

// The lattice plane's unit normal (global): rotation * z. Throws InvalidArgument for a
// line, which has no plane.
Vec3 LatticeNormal(const LatticeSpec& lattice);

// The pair of a site for a template orientation `first` (global, any non-zero length)
// giving `sense` toward `beam` (global unit vector). Throws InvalidArgument for a line
// lattice, a template off the lattice plane (|u . n| > 1e-9 |u|), or a beam in the
// plane (|beam . n| < 1e-9: linear there).
CrossedPair CrossedPairFor(const LatticeSpec& lattice, const Vec3& first, const Vec3& beam,
                           CircularSense sense);

// The pair's power pattern toward unit vector r relative to its value along the normal:
// (1 + (r . n)^2) / 2 (header), n unit.
double CrossedPairPowerPattern(const Vec3& normal, const Vec3& r);

// Its axial ratio (dB) in a principal plane of the pair at angle theta from the normal:
// 20 log10(1 / |cos theta|); +inf at 90 deg.
double CrossedPairAxialRatioDb(double theta_deg);

}  // namespace lobecast
