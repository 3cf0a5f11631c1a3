#include "io/plot/nulls.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace lobecast::plot {

std::vector<NullSample> FindNulls(const AngularGrid& grid, const std::vector<double>& db,
                                  double depth_db) {
  std::vector<NullSample> out;
  const std::vector<double>& t = grid.theta_deg;
  const std::vector<double>& p = grid.phi_deg;
  const std::size_t nt = t.size(), np = p.size();
  if (nt == 0 || np == 0 || db.size() != nt * np) return out;
  double peak = -std::numeric_limits<double>::infinity();
  for (double v : db) peak = std::max(peak, v);
  if (!std::isfinite(peak)) return out;
  const double threshold = peak - depth_db;
  const bool periodic = np > 1 && p.back() - p.front() + (p[1] - p[0]) >= 360.0 - 1e-6;
  const bool wrap_dup = periodic && std::fabs(p.back() - p.front() - 360.0) < 1e-6;
  auto is_pole = [&](std::size_t i) { return std::fabs(std::sin(t[i] * kPi / 180.0)) < 1e-9; };
  // A pole row is one direction: represent it by its smallest value.
  std::vector<double> pole_value(nt, 0);
  for (std::size_t i = 0; i < nt; ++i)
    if (is_pole(i))
      pole_value[i] = *std::min_element(db.begin() + i * np, db.begin() + (i + 1) * np);
  auto value = [&](std::size_t i, std::size_t j) {
    return is_pole(i) ? pole_value[i] : db[i * np + j];
  };
  // Neighbour column j + dj, or false off a non-periodic edge.
  auto column = [&](long j, long dj, std::size_t* out_j) {
    long k = j + dj;
    const long n = static_cast<long>(wrap_dup ? np - 1 : np);
    if (periodic)
      k = ((k % n) + n) % n;
    else if (k < 0 || k >= static_cast<long>(np))
      return false;
    *out_j = static_cast<std::size_t>(k);
    return true;
  };

  std::vector<char> candidate(nt * np, 0);
  for (std::size_t i = 0; i < nt; ++i) {
    for (std::size_t j = 0; j < np; ++j) {
      if (is_pole(i) && j > 0) continue;
      if (wrap_dup && j == np - 1) continue;
      const double v = value(i, j);
      if (!(v <= threshold)) continue;
      bool minimum = true;
      for (long di = -1; di <= 1 && minimum; ++di) {
        const long ii = static_cast<long>(i) + di;
        if (ii < 0 || ii >= static_cast<long>(nt)) continue;
        if (is_pole(i) && di == 0) continue;
        const std::size_t ui = static_cast<std::size_t>(ii);
        if (is_pole(i) || is_pole(ui)) {  // across a pole: the whole neighbouring row
          for (std::size_t jj = 0; jj < np && minimum; ++jj)
            if (value(ui, jj) < v) minimum = false;
          continue;
        }
        for (long dj = -1; dj <= 1; ++dj) {
          std::size_t jj;
          if ((di == 0 && dj == 0) || !column(static_cast<long>(j), dj, &jj)) continue;
          if (value(ui, jj) < v) {
            minimum = false;
            break;
          }
        }
      }
      if (minimum) candidate[i * np + j] = 1;
    }
  }
  // One null per connected run of candidates.
  std::vector<char> seen(nt * np, 0);
  for (std::size_t start = 0; start < nt * np; ++start) {
    if (!candidate[start] || seen[start]) continue;
    std::vector<std::size_t> stack{start};
    seen[start] = 1;
    std::size_t best = start;
    while (!stack.empty()) {
      const std::size_t k = stack.back();
      stack.pop_back();
      if (value(k / np, k % np) < value(best / np, best % np)) best = k;
      const long i = static_cast<long>(k / np), j = static_cast<long>(k % np);
      for (long di = -1; di <= 1; ++di) {
        const long ii = i + di;
        if (ii < 0 || ii >= static_cast<long>(nt)) continue;
        for (long dj = -1; dj <= 1; ++dj) {
          std::size_t jj;
          if (!column(j, dj, &jj)) continue;
          const std::size_t n = static_cast<std::size_t>(ii) * np + jj;
          if (candidate[n] && !seen[n]) {
            seen[n] = 1;
            stack.push_back(n);
          }
        }
      }
    }
    out.push_back({t[best / np], p[best % np], value(best / np, best % np)});
  }
  std::stable_sort(out.begin(), out.end(), [](const NullSample& a, const NullSample& b) {
    return a.level_db < b.level_db;
  });
  return out;
}

}  // namespace lobecast::plot
