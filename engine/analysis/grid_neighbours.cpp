// Neighbourhood structure of a theta-phi grid (grid_neighbours.h).
#include "engine/analysis/grid_neighbours.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/ground.h"

namespace lobecast {
namespace {

constexpr std::size_t kNoNode = std::numeric_limits<std::size_t>::max();

bool IsPole(double theta_deg) {
  return std::abs(theta_deg) < 1e-9 || std::abs(theta_deg - 180.0) < 1e-9;
}

}  // namespace

GridNeighbours::GridNeighbours(const AngularGrid& grid, Ground ground)
    : theta_deg_(grid.theta_deg), phi_deg_(grid.phi_deg) {
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  if (nt == 0 || np == 0) return;

  // phi columns: a last column at +360 deg repeats the first; the seam is closed when
  // the columns cover the circle (with or without that repeat).
  columns_ = np;
  if (np >= 2) {
    const double span = grid.phi_deg.back() - grid.phi_deg.front();
    const double step = grid.phi_deg[1] - grid.phi_deg[0];
    if (std::abs(span - 360.0) < 1e-6) {
      columns_ = np - 1;
      periodic_ = columns_ >= 3;
    } else if (np >= 3 && std::abs(span + step - 360.0) < 1e-6 * std::max(1.0, step)) {
      periodic_ = true;
    }
  }

  row_first_.assign(nt, kNoNode);
  pole_.assign(nt, false);
  for (std::size_t i = 0; i < nt; ++i) {
    const double t = grid.theta_deg[i];
    if (BelowGround(ground, t * kDegree)) continue;
    pole_[i] = IsPole(t);
    row_first_[i] = num_nodes_;
    node_rows_.push_back(i);
    node_rows_first_.push_back(num_nodes_);
    num_nodes_ += NodesInRow(i);
  }

  if (nt >= 2) {
    spacing_rad_ = std::abs(grid.theta_deg[1] - grid.theta_deg[0]) * kDegree;
  } else if (np >= 2) {
    spacing_rad_ = std::abs(grid.phi_deg[1] - grid.phi_deg[0]) * kDegree;
  }
}

std::size_t GridNeighbours::NodesInRow(std::size_t row) const {
  if (row_first_[row] == kNoNode) return 0;
  return pole_[row] ? 1 : columns_;
}

GridNeighbours::Position GridNeighbours::PositionOf(std::size_t node) const {
  const auto k = static_cast<std::size_t>(
      std::upper_bound(node_rows_first_.begin(), node_rows_first_.end(), node) -
      node_rows_first_.begin() - 1);
  return {node_rows_[k], node - node_rows_first_[k]};
}

std::size_t GridNeighbours::NodeAt(std::size_t row, std::size_t column) const {
  return pole_[row] ? row_first_[row] : row_first_[row] + column;
}

std::size_t GridNeighbours::representative(std::size_t node) const {
  const Position p = PositionOf(node);
  return p.row * phi_deg_.size() + p.column;
}

Vec3 GridNeighbours::direction(std::size_t node) const {
  const Position p = PositionOf(node);
  const double th = theta_deg_[p.row] * kDegree, ph = phi_deg_[p.column] * kDegree;
  return {std::sin(th) * std::cos(ph), std::sin(th) * std::sin(ph), std::cos(th)};
}

DirectionDeg GridNeighbours::direction_deg(std::size_t node) const {
  const Position p = PositionOf(node);
  if (pole_[p.row]) return {theta_deg_[p.row], std::numeric_limits<double>::quiet_NaN()};
  return {theta_deg_[p.row], phi_deg_[p.column]};
}

template <typename F>
void GridNeighbours::ForEachAround(const Position& p, F&& f) const {
  const auto ncol = static_cast<long>(columns_);
  for (int di = -1; di <= 1; ++di) {
    if ((di < 0 && p.row == 0) || (di > 0 && p.row + 1 >= theta_deg_.size())) continue;
    const std::size_t row = p.row + static_cast<std::size_t>(static_cast<long>(di));
    if (row_first_[row] == kNoNode) continue;
    if (pole_[p.row]) {  // every position of a pole's row is the pole itself
      if (di != 0)
        for (std::size_t c = 0; c < columns_; ++c) f(row, c);
      continue;
    }
    for (int dj = -1; dj <= 1; ++dj) {
      if (di == 0 && dj == 0) continue;
      long c = static_cast<long>(p.column) + dj;
      if (periodic_) {
        c = (c + ncol) % ncol;
      } else if (c < 0 || c >= ncol) {
        continue;
      }
      f(row, static_cast<std::size_t>(c));
    }
  }
}

std::vector<std::size_t> GridNeighbours::neighbours(std::size_t node) const {
  std::vector<std::size_t> out;
  ForEachAround(PositionOf(node),
                [&](std::size_t row, std::size_t column) { out.push_back(NodeAt(row, column)); });
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

std::size_t GridNeighbours::MaxNode(const GridValue& value) const {
  // PeakIndex's tie rule (engine/pattern.h): the first node within 1e-9 of the
  // maximum, so twin beams that differ by rounding name the same beam as the
  // summary's peak. Nodes run in grid-index order, so "first" agrees.
  double max = 0.0;
  bool any = false;
  for (std::size_t row : node_rows_) {
    for (std::size_t c = 0; c < NodesInRow(row); ++c) {
      const double v = value(row * phi_deg_.size() + c);
      if (!any || max < v) max = v, any = true;
    }
  }
  for (std::size_t row : node_rows_) {
    for (std::size_t c = 0; c < NodesInRow(row); ++c) {
      if (value(row * phi_deg_.size() + c) >= max - 1e-9 * std::abs(max))
        return row_first_[row] + c;
    }
  }
  return 0;
}

std::vector<bool> GridNeighbours::LocalExtrema(const GridValue& value, double tolerance,
                                               bool maxima) const {
  std::vector<bool> out(num_nodes_, false);
  // The values of rows i - 1, i and i + 1 by column (a pole's one value in each), in
  // slots row % 3: rows are swept in order, so each row is read once.
  std::vector<double> window[3];
  std::size_t window_row[3] = {kNoNode, kNoNode, kNoNode};
  auto row_values = [&](std::size_t row) -> const std::vector<double>& {
    const std::size_t slot = row % 3;
    std::vector<double>& w = window[slot];
    if (window_row[slot] != row) {
      w.resize(columns_);
      if (pole_[row]) {
        std::fill(w.begin(), w.end(), value(row * phi_deg_.size()));
      } else {
        for (std::size_t c = 0; c < columns_; ++c) w[c] = value(row * phi_deg_.size() + c);
      }
      window_row[slot] = row;
    }
    return w;
  };
  for (std::size_t row : node_rows_) {
    for (std::size_t c = 0; c < NodesInRow(row); ++c) {
      const double v = row_values(row)[c];
      bool any = false, extreme = true;
      ForEachAround(Position{row, c}, [&](std::size_t r, std::size_t col) {
        const double w = row_values(r)[col];
        any = true;
        extreme = extreme && (maxima ? v >= w - tolerance : v <= w + tolerance);
      });
      out[row_first_[row] + c] = any && extreme;
    }
  }
  return out;
}

std::vector<bool> GridNeighbours::LocalMaxima(const GridValue& value, double tolerance) const {
  return LocalExtrema(value, tolerance, true);
}

std::vector<bool> GridNeighbours::LocalMinima(const GridValue& value, double tolerance) const {
  return LocalExtrema(value, tolerance, false);
}

std::vector<bool> GridNeighbours::NodesWhere(const GridTest& test) const {
  std::vector<bool> out(num_nodes_, false);
  for (std::size_t row : node_rows_)
    for (std::size_t c = 0; c < NodesInRow(row); ++c)
      out[row_first_[row] + c] = test(row * phi_deg_.size() + c);
  return out;
}

template <typename F>
void GridNeighbours::Flood(const std::vector<bool>& member, std::size_t start,
                           std::vector<bool>& seen, F&& visit) const {
  std::vector<std::size_t> stack(1, start);
  seen[start] = true;
  while (!stack.empty()) {
    const std::size_t n = stack.back();
    stack.pop_back();
    visit(n);
    for (std::size_t m : neighbours(n)) {
      if (member[m] && !seen[m]) {
        seen[m] = true;
        stack.push_back(m);
      }
    }
  }
}

std::vector<std::vector<std::size_t>> GridNeighbours::Components(
    const std::vector<bool>& member) const {
  std::vector<std::vector<std::size_t>> out;
  std::vector<bool> seen(num_nodes_, false);
  for (std::size_t start = 0; start < num_nodes_; ++start) {
    if (!member[start] || seen[start]) continue;
    out.emplace_back();
    Flood(member, start, seen, [&](std::size_t n) { out.back().push_back(n); });
  }
  return out;
}

void GridNeighbours::VisitComponent(const std::vector<bool>& member, std::size_t node,
                                    const std::function<void(std::size_t)>& visit) const {
  if (!member[node]) return;
  // Components walks each component from its lowest node: find it, then walk from it.
  std::vector<bool> seen(num_nodes_, false);
  std::size_t lowest = node;
  Flood(member, node, seen, [&](std::size_t n) { lowest = std::min(lowest, n); });
  seen.assign(num_nodes_, false);
  Flood(member, lowest, seen, visit);
}

}  // namespace lobecast
