// PEC ground plane at z = 0 by image theory (CONVENTIONS §1; Balanis 4th ed.
// sec. 4.7): the image of a dipole at (x, y, z) sits at (x, y, -z), carries the
// same current, keeps its vertical orientation component and reverses the
// horizontal ones. Fields below the plane are exactly zero.
#pragma once

#include <cstddef>
#include <vector>

#include "engine/types.h"

namespace lobecast {

Dipole ImageOf(const Dipole& d);

// The sources that radiate in the upper half space: the dipoles themselves and,
// with a PEC ground, their images after them (dipole i's image is at i + N).
std::vector<Dipole> RadiatingSources(const Array& array);

// In RadiatingSources of an array of num_dipoles: where dipole i's image stands,
// and which dipole's current drives source s (itself, or the dipole it images).
inline std::size_t ImageIndexOf(std::size_t dipole, std::size_t num_dipoles) {
  return dipole + num_dipoles;
}
inline std::size_t DipoleOfSource(std::size_t source, std::size_t num_dipoles) {
  return source % num_dipoles;
}

// True when the field in direction theta is forced to zero by the ground.
inline bool BelowGround(Ground g, double theta_rad) {
  return g == Ground::kPec && theta_rad > 0.5 * kPi;
}

}  // namespace lobecast
