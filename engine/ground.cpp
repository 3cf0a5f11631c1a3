// PEC ground plane by image theory (ground.h).
#include "engine/ground.h"

namespace lobecast {

Dipole ImageOf(const Dipole& d) {
  Dipole image = d;
  image.position_m.z() = -d.position_m.z();
  image.orientation.x() = -d.orientation.x();
  image.orientation.y() = -d.orientation.y();
  return image;
}

std::vector<Dipole> RadiatingSources(const Array& array) {
  std::vector<Dipole> sources = array.dipoles;
  if (array.ground == Ground::kPec) {
    for (const Dipole& d : array.dipoles) sources.push_back(ImageOf(d));
  }
  return sources;
}

}  // namespace lobecast
