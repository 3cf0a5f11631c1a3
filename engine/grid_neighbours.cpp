// Neighbourhood structure of a theta-phi grid (grid_neighbours.h).
#include "engine/grid_neighbours.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/ground.h"

namespace lobecast {
namespace {

constexpr std::size_t kNone = std::numeric_limits<std::size_t>::max();

bool IsPole(double theta_deg) {
  return std::abs(theta_deg) < 1e-9 || std::abs(theta_deg - 180.0) < 1e-9;
}

}  // namespace

GridNeighbours::GridNeighbours(const AngularGrid& grid, Ground ground) {
  const std::size_t nt = grid.theta_deg.size(), np = grid.phi_deg.size();
  if (nt == 0 || np == 0) return;

  // phi columns: a last column at +360 deg repeats the first; the seam is closed when
  // the columns cover the circle (with or without that repeat).
  std::size_t ncol = np;
  bool periodic = false;
  if (np >= 2) {
    const double span = grid.phi_deg.back() - grid.phi_deg.front();
    const double step = grid.phi_deg[1] - grid.phi_deg[0];
    if (std::abs(span - 360.0) < 1e-6) {
      ncol = np - 1;
      periodic = ncol >= 3;
    } else if (np >= 3 && std::abs(span + step - 360.0) < 1e-6 * std::max(1.0, step)) {
      periodic = true;
    }
  }

  std::vector<std::size_t> node(nt * ncol, kNone);  // per (row, column)
  std::vector<bool> pole(nt, false);
  for (std::size_t i = 0; i < nt; ++i) {
    const double t = grid.theta_deg[i];
    if (BelowGround(ground, t * kDegree)) continue;
    pole[i] = IsPole(t);
    for (std::size_t j = 0; j < ncol; ++j) {
      if (pole[i] && j > 0) {
        node[i * ncol + j] = node[i * ncol];
        continue;
      }
      node[i * ncol + j] = representative_.size();
      representative_.push_back(i * np + j);
      const double th = t * kDegree, ph = grid.phi_deg[j] * kDegree;
      direction_.emplace_back(std::sin(th) * std::cos(ph), std::sin(th) * std::sin(ph),
                              std::cos(th));
    }
  }
  neighbours_.assign(representative_.size(), {});
  auto link = [&](std::size_t a, std::size_t b) {
    if (a == kNone || b == kNone || a == b) return;
    neighbours_[a].push_back(b);
    neighbours_[b].push_back(a);
  };
  for (std::size_t i = 0; i < nt; ++i) {
    for (std::size_t j = 0; j < ncol; ++j) {
      const std::size_t a = node[i * ncol + j];
      if (a == kNone) continue;
      // Forward half of the 8-neighbourhood; link() adds the reverse edges.
      const int steps[4][2] = {{0, 1}, {1, -1}, {1, 0}, {1, 1}};
      for (const auto& s : steps) {
        const std::size_t ii = i + static_cast<std::size_t>(s[0]);
        if (ii >= nt) continue;
        long jj = static_cast<long>(j) + s[1];
        if (periodic) {
          jj = (jj + static_cast<long>(ncol)) % static_cast<long>(ncol);
        } else if (jj < 0 || jj >= static_cast<long>(ncol)) {
          continue;
        }
        link(a, node[ii * ncol + static_cast<std::size_t>(jj)]);
      }
    }
  }
  for (auto& n : neighbours_) {
    std::sort(n.begin(), n.end());
    n.erase(std::unique(n.begin(), n.end()), n.end());
  }

  if (nt >= 2) {
    spacing_rad_ = std::abs(grid.theta_deg[1] - grid.theta_deg[0]) * kDegree;
  } else if (np >= 2) {
    spacing_rad_ = std::abs(grid.phi_deg[1] - grid.phi_deg[0]) * kDegree;
  }
}

std::vector<bool> GridNeighbours::LocalMaxima(const std::vector<double>& v,
                                              double tolerance) const {
  std::vector<bool> out(num_nodes(), false);
  for (std::size_t n = 0; n < num_nodes(); ++n) {
    if (neighbours_[n].empty()) continue;
    out[n] = std::all_of(neighbours_[n].begin(), neighbours_[n].end(),
                         [&](std::size_t m) { return v[n] >= v[m] - tolerance; });
  }
  return out;
}

std::vector<bool> GridNeighbours::LocalMinima(const std::vector<double>& v,
                                              double tolerance) const {
  std::vector<bool> out(num_nodes(), false);
  for (std::size_t n = 0; n < num_nodes(); ++n) {
    if (neighbours_[n].empty()) continue;
    out[n] = std::all_of(neighbours_[n].begin(), neighbours_[n].end(),
                         [&](std::size_t m) { return v[n] <= v[m] + tolerance; });
  }
  return out;
}

std::vector<std::vector<std::size_t>> GridNeighbours::Components(
    const std::vector<bool>& member) const {
  std::vector<std::vector<std::size_t>> out;
  std::vector<bool> seen(num_nodes(), false);
  std::vector<std::size_t> stack;
  for (std::size_t start = 0; start < num_nodes(); ++start) {
    if (!member[start] || seen[start]) continue;
    out.emplace_back();
    stack.assign(1, start);
    seen[start] = true;
    while (!stack.empty()) {
      const std::size_t n = stack.back();
      stack.pop_back();
      out.back().push_back(n);
      for (std::size_t m : neighbours_[n]) {
        if (member[m] && !seen[m]) {
          seen[m] = true;
          stack.push_back(m);
        }
      }
    }
  }
  return out;
}

std::vector<double> GridNeighbours::NodeValues(const std::vector<double>& grid_value) const {
  std::vector<double> v(num_nodes());
  for (std::size_t n = 0; n < num_nodes(); ++n) v[n] = grid_value[representative_[n]];
  return v;
}

}  // namespace lobecast
