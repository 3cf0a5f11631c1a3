// The neighbourhood structure of a theta-phi grid on the sphere, for finding local
// extrema of a sampled pattern. Grid points that are the same direction (every point
// of a theta = 0 or 180 deg row; phi = 360 repeating phi = 0) become one node; the
// phi seam is closed when the phi values go round the full circle; directions in the
// ground's no-field region are left out, so its zeros are never taken for nulls.
//
// Memory: nothing per direction is stored. Nodes are numbered row by row, and a
// node's position, direction and neighbours are worked out from the grid when asked
// (O(Nt + Np) held), so a 6.5 M-direction grid costs kilobytes here, not the ~1 GB
// that stored neighbour lists and unit vectors would. Quantities are read through a
// callback by grid index, never copied per node; the sweeps hold three theta rows of
// values. What the searches keep per node is one bit (the std::vector<bool> masks);
// a component walk's stack holds at most one index per node of that component (for
// the main beam of a single dipole, half the sphere: a few bytes per grid direction
// at worst), kept because the walk's order decides ties and so the results.
#pragma once

#include <cstddef>
#include <functional>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

class GridNeighbours {
 public:
  // A grid quantity, by flattened (theta-major) grid index.
  using GridValue = std::function<double(std::size_t grid_index)>;
  using GridTest = std::function<bool(std::size_t grid_index)>;

  GridNeighbours(const AngularGrid& grid, Ground ground);

  std::size_t num_nodes() const { return num_nodes_; }
  // A flattened grid index (theta-major) that stands for the node.
  std::size_t representative(std::size_t node) const;
  // The node's direction (unit vector).
  Vec3 direction(std::size_t node) const;
  // The same direction as the grid's exact angles (deg); phi NaN on a pole.
  DirectionDeg direction_deg(std::size_t node) const;
  // The up to eight surrounding nodes (every node of the next row for a pole), ascending.
  std::vector<std::size_t> neighbours(std::size_t node) const;

  // The first node within 1e-9 (relative) of the largest value: PeakIndex's tie rule.
  std::size_t MaxNode(const GridValue& value) const;
  // Nodes whose value is >= (local maxima) or <= (local minima) every neighbour's
  // within tolerance (absolute, in the value's units); a node without neighbours is
  // neither. Ties make plateaus (a dipole's ring of maxima), so the caller groups the
  // result with Components. Each value is read once, in one sweep over the rows.
  std::vector<bool> LocalMaxima(const GridValue& value, double tolerance) const;
  std::vector<bool> LocalMinima(const GridValue& value, double tolerance) const;
  // One bit per node: the test at the node's representative.
  std::vector<bool> NodesWhere(const GridTest& test) const;

  // Connected components of the member nodes, each a list of nodes (depth first
  // from the component's lowest node, neighbours in ascending order).
  std::vector<std::vector<std::size_t>> Components(const std::vector<bool>& member) const;
  // Calls visit for every node of the member component holding `node`, in the order
  // Components lists it, without building the list (a broad beam's component can
  // be half the grid). Nothing is visited when `node` is not a member. Holds one
  // bit per node and the walk's stack.
  void VisitComponent(const std::vector<bool>& member, std::size_t node,
                      const std::function<void(std::size_t)>& visit) const;

  // Typical spacing of neighbouring grid points, rad (the theta step, or the phi
  // step for a single-row grid; 1 deg for a single direction).
  double spacing_rad() const { return spacing_rad_; }

 private:
  struct Position {
    std::size_t row = 0;     // theta row
    std::size_t column = 0;  // phi column (0 for a pole)
  };
  Position PositionOf(std::size_t node) const;
  std::size_t NodeAt(std::size_t row, std::size_t column) const;
  std::size_t NodesInRow(std::size_t row) const;
  // f(row, column) for every grid position around the node at `p` that is a node
  // other than itself (several positions may be the same node: a pole).
  template <typename F>
  void ForEachAround(const Position& p, F&& f) const;
  std::vector<bool> LocalExtrema(const GridValue& value, double tolerance, bool maxima) const;
  // Depth-first walk of the member component from `start`, marking `seen`.
  template <typename F>
  void Flood(const std::vector<bool>& member, std::size_t start, std::vector<bool>& seen,
             F&& visit) const;

  std::vector<double> theta_deg_, phi_deg_;
  std::size_t columns_ = 0;  // phi columns (a repeated phi = 360 column dropped)
  bool periodic_ = false;    // the phi seam is closed
  // Per theta row: its first node (kNoNode below the ground) and whether it is a pole.
  std::vector<std::size_t> row_first_;
  std::vector<bool> pole_;
  // The rows that hold nodes and their first nodes, for node -> row.
  std::vector<std::size_t> node_rows_, node_rows_first_;
  std::size_t num_nodes_ = 0;
  double spacing_rad_ = kDegree;
};

}  // namespace lobecast
