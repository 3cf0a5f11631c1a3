// The neighbourhood structure of a theta-phi grid on the sphere, for finding local
// extrema of a sampled pattern. Grid points that are the same direction (every point
// of a theta = 0 or 180 deg row; phi = 360 repeating phi = 0) become one node; the
// phi seam is closed when the phi values go round the full circle; directions in the
// ground's no-field region are left out, so its zeros are never taken for nulls.
#pragma once

#include <cstddef>
#include <vector>

#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

class GridNeighbours {
 public:
  GridNeighbours(const AngularGrid& grid, Ground ground);

  std::size_t num_nodes() const { return representative_.size(); }
  // A flattened grid index (theta-major) that stands for the node.
  std::size_t representative(std::size_t node) const { return representative_[node]; }
  // The node's direction (unit vector).
  const Vec3& direction(std::size_t node) const { return direction_[node]; }
  // The up to eight surrounding nodes (every node of the next row for a pole).
  const std::vector<std::size_t>& neighbours(std::size_t node) const { return neighbours_[node]; }

  // Nodes whose value is >= (local maxima) or <= (local minima) every neighbour's
  // within tolerance (absolute, in the value's units). Ties make plateaus (a dipole's
  // ring of maxima), so the caller groups the result with Components.
  std::vector<bool> LocalMaxima(const std::vector<double>& node_value, double tolerance) const;
  std::vector<bool> LocalMinima(const std::vector<double>& node_value, double tolerance) const;

  // Connected components of the member nodes, each a list of nodes.
  std::vector<std::vector<std::size_t>> Components(const std::vector<bool>& member) const;

  // A grid quantity (one value per grid point) as one value per node.
  std::vector<double> NodeValues(const std::vector<double>& grid_value) const;

  // Typical spacing of neighbouring grid points, rad (the theta step, or the phi
  // step for a single-row grid; 1 deg for a single direction).
  double spacing_rad() const { return spacing_rad_; }

 private:
  std::vector<std::size_t> representative_;
  std::vector<Vec3> direction_;
  std::vector<std::vector<std::size_t>> neighbours_;
  double spacing_rad_ = kDegree;
};

}  // namespace lobecast
