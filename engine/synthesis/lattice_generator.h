// Lattice generators for design files (CONVENTIONS §3, design files): the element
// positions of a line, a rectangular or triangular panel, or concentric rings,
// centred, rotated as a whole and thinned by a list of removed elements.
//
// The lattice frame: a line lies along its axis (x, y or z), panels and rings in
// the x-y plane, centred on the origin; `rotation` turns that frame into the
// global one (the element orientations turn with it) and `center_m` moves it.
//
// Generation order (the index `remove` names, 0-based): a line from -x to +x;
// panels row by row (y from low to high), x fastest; rings from the innermost,
// each counter-clockwise from +x. Triangular panels shift odd rows by half a
// pitch: even rows at -dx/4, odd rows at +dx/4 around the centre, so the panel
// stays centred (the relative shift between neighbouring rows is dx/2).
#pragma once

#include <cstddef>
#include <optional>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

enum class LatticeKind { kLine, kRectangular, kTriangular, kRing };

std::string_view ToString(LatticeKind k);
std::optional<LatticeKind> LatticeKindFromString(std::string_view s);  // case-insensitive

struct LatticeSpec {
  LatticeKind kind = LatticeKind::kLine;
  int count_x = 1;  // line: N; panels: Nx
  int count_y = 1;  // panels: Ny (rows)
  double spacing_x_m = 0;
  double spacing_y_m = 0;
  std::vector<int> ring_counts;      // ring: elements on each ring, innermost first
  std::vector<double> ring_radii_m;  // ring: radius of each ring (> 0, increasing)
  Vec3 axis = Vec3::UnitX();         // line: its direction in the lattice frame
  Vec3 center_m = Vec3::Zero();      // where the lattice frame's origin goes
  Eigen::Matrix3d rotation = Eigen::Matrix3d::Identity();  // lattice frame -> global
  std::vector<std::size_t> removed;  // generation indices left out (thinning, failures)

  // Elements before removal.
  std::size_t GeneratedCount() const;
  // The lattice frame's unit vectors in global coordinates.
  Vec3 ToGlobalDirection(const Vec3& local) const { return rotation * local; }
};

struct LatticeSite {
  std::size_t index = 0;           // generation index
  int ix = 0, iy = 0;              // column and row (ring: element and ring)
  Vec3 local_m = Vec3::Zero();     // in the lattice frame, relative to its centre
  Vec3 position_m = Vec3::Zero();  // global
};

// The present elements in generation order. Throws InvalidArgument on counts < 1,
// spacings or radii <= 0 (where used), a removed index out of range or repeated,
// or nothing left. A rotation that is not orthonormal (within 1e-9) is refused.
std::vector<LatticeSite> GenerateLattice(const LatticeSpec& spec);

// The rotation by angle_rad about `axis` (any non-zero vector), right-handed.
Eigen::Matrix3d AxisAngleRotation(const Vec3& axis, double angle_rad);

}  // namespace lobecast
