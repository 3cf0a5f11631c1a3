#include "engine/sizing/grating_free.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/analysis/local_search.h"
#include "engine/constants.h"
#include "engine/error.h"

namespace lobecast {
namespace {

void CheckRegion(const ScanRegion& r) {
  if (!(r.sin_xz >= 0 && r.sin_xz < 1 && r.sin_yz >= 0 && r.sin_yz < 1))
    throw InvalidArgument("scan region: the sines of the scan limits must be in [0, 1)");
}

}  // namespace

double DistanceToRegion(double pu, double pv, const ScanRegion& region) {
  const double a = region.sin_xz, b = region.sin_yz;
  if (a == b) return std::max(0.0, std::hypot(pu, pv) - a);
  const double inside = (a > 0 ? pu * pu / (a * a) : (pu == 0 ? 0.0 : 2.0)) +
                        (b > 0 ? pv * pv / (b * b) : (pv == 0 ? 0.0 : 2.0));
  if (inside <= 1.0) return 0.0;
  const auto dist = [&](double t) {
    return std::hypot(pu - a * std::cos(t), pv - b * std::sin(t));
  };
  constexpr int kSamples = 64;
  int best = 0;
  double best_d = std::numeric_limits<double>::infinity();
  for (int i = 0; i < kSamples; ++i) {
    const double d = dist(2 * kPi * i / kSamples);
    if (d < best_d) best_d = d, best = i;
  }
  const double step = 2 * kPi / kSamples;
  return std::min(best_d,
                  MinimizeOnInterval(dist, (best - 1) * step, (best + 1) * step, 1e-12).value);
}

double GratingLobeMargin(LatticeKind kind, double dx, double dy, const ScanRegion& region) {
  CheckRegion(region);
  if (!(dx > 0 && dy > 0)) throw InvalidArgument("grating-lobe margin: spacings must be > 0");
  if (kind != LatticeKind::kRectangular && kind != LatticeKind::kTriangular)
    throw InvalidArgument("grating-lobe margin: a rectangular or triangular lattice");
  const bool tri = kind == LatticeKind::kTriangular;
  const double reach = std::max(region.sin_xz, region.sin_yz);
  // Every G with |G| - reach - 1 below the best so far; |G| >= |p| / dx and >= ... so
  // orders beyond this many periods are farther than the nearest ones.
  const int m = static_cast<int>(std::ceil(4.0 * std::max(dx, dy))) + 2;
  double best = std::numeric_limits<double>::infinity();
  for (int p = -m; p <= m; ++p) {
    for (int q = -m; q <= m; ++q) {
      if (p == 0 && q == 0) continue;
      const double gu = p / dx;
      const double gv = tri ? (q - 0.5 * p) / dy : q / dy;
      if (std::hypot(gu, gv) - reach - 1.0 >= best) continue;
      best = std::min(best, DistanceToRegion(gu, gv, region) - 1.0);
    }
  }
  return best;
}

LatticeSpacing LargestSpacing(LatticeKind kind, const ScanRegion& region, double guard) {
  CheckRegion(region);
  if (!(guard >= 0 && guard < 10)) throw InvalidArgument("largest spacing: guard in [0, 10)");
  const double dy_max = 1.0 / (1.0 + region.sin_yz + guard);
  if (kind == LatticeKind::kRectangular) return {1.0 / (1.0 + region.sin_xz + guard), dy_max};
  if (kind != LatticeKind::kTriangular)
    throw InvalidArgument("largest spacing: a rectangular or triangular lattice");
  // The largest dx at row pitch dy keeping the margin >= guard (bisection; the
  // (2/dx, 0) vector alone bounds dx by 2 / (1 + sin_xz + guard)).
  const auto dx_at = [&](double dy) {
    double lo = 1e-3, hi = 2.0 / (1.0 + region.sin_xz + guard);
    if (GratingLobeMargin(LatticeKind::kTriangular, hi, dy, region) >= guard) return hi;
    for (int i = 0; i < 60; ++i) {
      const double mid = 0.5 * (lo + hi);
      (GratingLobeMargin(LatticeKind::kTriangular, mid, dy, region) >= guard ? lo : hi) = mid;
    }
    return lo;
  };
  // Row pitches from 0.7 dy_max up: below 1/sqrt(3) of it the same lattices come back
  // turned by 90 deg (rows along y), which the generator does not build that way round.
  constexpr int kSamples = 30;
  constexpr double kLowest = 0.7;
  LatticeSpacing best;
  for (int i = kSamples; i >= 0; --i) {
    const double dy = dy_max * (kLowest + (1 - kLowest) * i / kSamples);
    const double dx = dx_at(dy);
    if (dx * dy > best.dx * best.dy) best = {dx, dy};
  }
  // Refine around the best row pitch.
  const double step = (1 - kLowest) * dy_max / kSamples;
  double lo = std::max(kLowest * dy_max, best.dy - step), hi = std::min(dy_max, best.dy + step);
  for (int i = 0; i < 40; ++i) {
    const double a = lo + (hi - lo) / 3, b = hi - (hi - lo) / 3;
    if (a * dx_at(a) < b * dx_at(b))
      lo = a;
    else
      hi = b;
  }
  const double dy = 0.5 * (lo + hi);
  const double dx = dx_at(dy);
  if (dx * dy > best.dx * best.dy) best = {dx, dy};
  return best;
}

}  // namespace lobecast
