// Geometry of null loci (null_geometry.h).
#include "engine/analysis/null_geometry.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numeric>
#include <unordered_map>

#include <Eigen/Eigenvalues>

#include "engine/analysis/pattern_probe.h"
#include "engine/constants.h"
#include "engine/grid.h"

namespace lobecast {

// Candidate cone axes: x, y, z and the principal axes of the sources' positions (with
// their images over a ground), one of each +-pair, the largest component positive.
std::vector<Vec3> CandidateAxes(const Array& array) {
  std::vector<Vec3> pos;
  for (const Dipole& d : array.dipoles) {
    pos.push_back(d.position_m);
    if (array.ground == Ground::kPec)
      pos.push_back(Vec3(d.position_m.x(), d.position_m.y(), -d.position_m.z()));
  }
  std::vector<Vec3> axes = {Vec3::UnitX(), Vec3::UnitY(), Vec3::UnitZ()};
  if (pos.size() >= 2) {
    Vec3 mean = Vec3::Zero();
    for (const Vec3& p : pos) mean += p;
    mean /= static_cast<double>(pos.size());
    Eigen::Matrix3d cov = Eigen::Matrix3d::Zero();
    for (const Vec3& p : pos) cov += (p - mean) * (p - mean).transpose();
    const Eigen::SelfAdjointEigenSolver<Eigen::Matrix3d> es(cov);
    const double top = es.eigenvalues().maxCoeff();
    for (int i = 0; i < 3; ++i) {
      if (!(es.eigenvalues()[i] > 1e-12 * top)) continue;
      Vec3 a = es.eigenvectors().col(i).normalized();
      Eigen::Index k = 0;
      a.cwiseAbs().maxCoeff(&k);
      if (a[k] < 0) a = -a;
      const bool known = std::any_of(axes.begin(), axes.end(), [&](const Vec3& b) {
        return std::abs(std::abs(a.dot(b)) - 1.0) < 1e-12;
      });
      if (!known) axes.push_back(a);
    }
  }
  return axes;
}

// Two orthonormal vectors perpendicular to a.
std::pair<Vec3, Vec3> PerpendicularPair(const Vec3& a) {
  const Vec3 t = std::abs(a.x()) < 0.9 ? Vec3::UnitX() : Vec3::UnitY();
  const Vec3 u = a.cross(t).normalized();
  return {u, a.cross(u)};
}

Vec3 OnCone(const Vec3& a, const std::pair<Vec3, Vec3>& uv, double alpha, double psi) {
  return std::cos(alpha) * a +
         std::sin(alpha) * (std::cos(psi) * uv.first + std::sin(psi) * uv.second);
}

// Extent of a set of directions: theta range and the smallest phi arc holding the
// phis (directions on a pole have no phi).
void SetExtent(const std::vector<Vec3>& dirs, NullLocus* l) {
  double tmin = std::numeric_limits<double>::infinity();
  double tmax = -tmin;
  std::vector<double> phis;
  for (const Vec3& r : dirs) {
    const SphericalAngles a = AnglesOf(r);
    tmin = std::min(tmin, a.theta_rad / kDegree);
    tmax = std::max(tmax, a.theta_rad / kDegree);
    if (std::hypot(r.x(), r.y()) > 1e-12) phis.push_back(a.phi_rad / kDegree);
  }
  if (dirs.empty()) return;
  l->theta_min_deg = tmin;
  l->theta_max_deg = tmax;
  if (phis.empty()) {
    l->phi_min_deg = l->phi_max_deg = 0.0;
    return;
  }
  std::sort(phis.begin(), phis.end());
  // The largest gap between neighbouring phis (round the circle) is what the arc leaves out.
  std::size_t gap_after = phis.size() - 1;
  double gap = phis.front() + 360.0 - phis.back();
  for (std::size_t i = 0; i + 1 < phis.size(); ++i) {
    if (phis[i + 1] - phis[i] > gap) {
      gap = phis[i + 1] - phis[i];
      gap_after = i;
    }
  }
  if (gap < 2.0) {  // round the circle (the samples are denser than this)
    l->phi_min_deg = 0.0;
    l->phi_max_deg = 360.0;
    return;
  }
  l->phi_min_deg = phis[(gap_after + 1) % phis.size()];
  l->phi_max_deg = phis[gap_after];
}

std::vector<int> GroupByProximity(const std::vector<Vec3>& dirs, double link_rad, int* groups) {
  const std::size_t n = dirs.size();
  // Union-find over the linked pairs; a pair at an angle below link_rad has a chord
  // below 2 sin(link_rad / 2), so its cubes of that edge differ by at most one in each
  // coordinate.
  std::vector<std::size_t> parent(n);
  std::iota(parent.begin(), parent.end(), std::size_t{0});
  auto root = [&](std::size_t i) {
    while (parent[i] != i) i = parent[i] = parent[parent[i]];
    return i;
  };
  if (!(link_rad > 0)) {  // nothing links: each direction its own group
    std::vector<int> group(n);
    std::iota(group.begin(), group.end(), 0);
    if (groups) *groups = static_cast<int>(n);
    return group;
  }
  // The chord's cube edge, a hair wide so that a pair whose angle rounds just below the
  // link is never two cubes apart.
  const double edge = 2.0 * std::sin(0.5 * std::min(link_rad, kPi)) * (1.0 + 1e-12);
  using Key = std::array<std::int64_t, 3>;
  auto cube = [&](const Vec3& r) {
    return Key{static_cast<std::int64_t>(std::floor(r.x() / edge)),
               static_cast<std::int64_t>(std::floor(r.y() / edge)),
               static_cast<std::int64_t>(std::floor(r.z() / edge))};
  };
  struct KeyHash {
    std::size_t operator()(const Key& k) const {
      return static_cast<std::size_t>((k[0] * 73856093) ^ (k[1] * 19349663) ^ (k[2] * 83492791));
    }
  };
  std::unordered_map<Key, std::vector<std::size_t>, KeyHash> cubes;
  for (std::size_t i = 0; i < n; ++i) cubes[cube(dirs[i])].push_back(i);
  for (std::size_t i = 0; i < n; ++i) {
    const Key c = cube(dirs[i]);
    for (std::int64_t dx = -1; dx <= 1; ++dx)
      for (std::int64_t dy = -1; dy <= 1; ++dy)
        for (std::int64_t dz = -1; dz <= 1; ++dz) {
          const auto it = cubes.find(Key{c[0] + dx, c[1] + dy, c[2] + dz});
          if (it == cubes.end()) continue;
          for (const std::size_t j : it->second) {
            if (j <= i || root(i) == root(j)) continue;
            if (AngleBetween(dirs[i], dirs[j]) < link_rad) parent[root(j)] = root(i);
          }
        }
  }
  std::vector<int> group(n, -1);
  std::unordered_map<std::size_t, int> number;  // root -> group, by first member
  for (std::size_t i = 0; i < n; ++i) {
    const auto [it, added] = number.emplace(root(i), static_cast<int>(number.size()));
    group[i] = it->second;
  }
  if (groups) *groups = static_cast<int>(number.size());
  return group;
}

}  // namespace lobecast
