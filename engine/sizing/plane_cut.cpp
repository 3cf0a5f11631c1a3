#include "engine/sizing/plane_cut.h"
#include "engine/decibels.h"

#include <algorithm>
#include <cmath>
#include <complex>
#include <limits>

#include "engine/analysis/local_search.h"
#include "engine/constants.h"
#include "engine/error.h"
#include "engine/synthesis/crossed_pair.h"

namespace lobecast {
namespace {

constexpr double kTwoPi = 2 * kPi;

// The abscissa of the minimum of f on [lo, hi] (golden sections, local_search.h).
template <typename F>
double ArgMin(F f, double lo, double hi) {
  return MinimizeOnInterval(f, lo, hi, 1e-10 * std::max(1.0, std::abs(hi - lo))).x;
}

// |sum w_n exp(j 2 pi s x_n)|.
double LineFactor(const LineProjection& line, double s) {
  std::complex<double> sum = 0;
  for (std::size_t n = 0; n < line.position.size(); ++n)
    sum += line.weight[n] * std::polar(1.0, kTwoPi * s * line.position[n]);
  return std::abs(sum);
}

double Span(const LineProjection& line) {
  const auto [lo, hi] = std::minmax_element(line.position.begin(), line.position.end());
  return *hi - *lo;
}

class Cut {
 public:
  Cut(const PanelModel& p, ScanPlane plane, double t0_deg)
      : p_(p), plane_(plane), s0_(std::sin(t0_deg * kDegree)) {}

  // Power pattern (arbitrary scale) at t (rad).
  double operator()(double t) const {
    const double s = std::sin(t), c = std::cos(t);
    const Vec3 r = plane_ == ScanPlane::kXZ ? Vec3(s, 0, c) : Vec3(0, s, c);
    const double ro = r.dot(p_.orientation);
    // A crossed pair's power pattern is 1 + cos^2 t (crossed_pair.h) for both cuts.
    double ef = p_.crossed ? std::sqrt(2.0 * CrossedPairPowerPattern(Vec3::UnitZ(), r))
                           : std::sqrt(std::max(0.0, 1.0 - ro * ro));
    if (p_.pec) ef *= 2.0 * std::abs(std::sin(kTwoPi * p_.height * c));
    const double af = LineFactor(plane_ == ScanPlane::kXZ ? p_.x : p_.y, s - s0_);
    return af * af * ef * ef;
  }

 private:
  const PanelModel& p_;
  ScanPlane plane_;
  double s0_;
};

// The distinct values of v (within 1e-9 wavelength) and the weights summed at each.
LineProjection Project(std::vector<std::pair<double, double>> v) {
  std::sort(v.begin(), v.end());
  LineProjection out;
  for (const auto& [x, w] : v) {
    if (!out.position.empty() && x - out.position.back() < 1e-9) {
      out.weight.back() += w;
    } else {
      out.position.push_back(x);
      out.weight.push_back(w);
    }
  }
  return out;
}

}  // namespace

CutFigures PredictCut(const PanelModel& panel, ScanPlane plane, double t0_deg, double step_deg) {
  if (panel.x.position.empty() || panel.y.position.empty() || !(step_deg > 0) ||
      !(std::abs(t0_deg) < 90))
    throw InvalidArgument("predicted cut: tapers, a step > 0 and |t0| < 90 deg");
  const Cut f(panel, plane, t0_deg);
  const int n = static_cast<int>(std::ceil(180.0 / step_deg));
  const double h = kPi / n;
  std::vector<double> v(static_cast<std::size_t>(n) + 1);
  for (int i = 0; i <= n; ++i) v[static_cast<std::size_t>(i)] = f(-0.5 * kPi + i * h);
  const auto t_of = [&](int i) { return -0.5 * kPi + i * h; };
  const auto at = [&](int i) { return v[static_cast<std::size_t>(i)]; };

  // Climb from the sample nearest t0 to the main beam's sample maximum.
  int k = static_cast<int>(std::lround((t0_deg * kDegree + 0.5 * kPi) / h));
  for (;;) {
    if (k > 0 && at(k - 1) > at(k))
      --k;
    else if (k < n && at(k + 1) > at(k))
      ++k;
    else
      break;
  }
  const double tp =
      ArgMin([&](double t) { return -f(t); }, t_of(std::max(k - 1, 0)), t_of(std::min(k + 1, n)));
  const double peak = std::max(f(tp), at(k));
  CutFigures out;
  out.peak_deg = tp / kDegree;

  // Half-power points and first nulls on each side.
  double half[2] = {0, 0}, null[2] = {0, 0};
  int null_index[2] = {0, 0};
  for (int side = 0; side < 2; ++side) {
    const int dir = side ? 1 : -1;
    int i = k;
    while (i + dir >= 0 && i + dir <= n && at(i + dir) >= 0.5 * peak) i += dir;
    if (i + dir < 0 || i + dir > n) {
      half[side] = std::numeric_limits<double>::quiet_NaN();
    } else {
      double a = t_of(i), b = t_of(i + dir);
      for (int it = 0; it < 60; ++it) {
        const double m = 0.5 * (a + b);
        (f(m) >= 0.5 * peak ? a : b) = m;
      }
      half[side] = 0.5 * (a + b);
    }
    int j = i;
    while (j + dir >= 0 && j + dir <= n && at(j + dir) <= at(j)) j += dir;
    null_index[side] = j;
    null[side] = (j == 0 || j == n) ? t_of(j) : ArgMin(f, t_of(j - 1), t_of(j + 1));
  }
  out.half_power_width_deg = std::isnan(half[0]) || std::isnan(half[1])
                                 ? std::numeric_limits<double>::infinity()
                                 : (half[1] - half[0]) / kDegree;
  out.first_null_lower_deg = null[0] / kDegree;
  out.first_null_upper_deg = null[1] / kDegree;

  // The highest sample outside the first nulls, refined.
  int best = -1;
  for (int i = 0; i <= n; ++i) {
    if (i > null_index[0] && i < null_index[1]) continue;
    if (best < 0 || at(i) > at(best)) best = i;
  }
  if (best < 0 || at(best) <= 0) {
    out.sidelobe_db = -std::numeric_limits<double>::infinity();
    return out;
  }
  double lo = t_of(std::max(best - 1, 0)), hi = t_of(std::min(best + 1, n));
  if (best <= null_index[0]) hi = std::min(hi, null[0]);
  if (best >= null_index[1]) lo = std::max(lo, null[1]);
  const double ts = ArgMin([&](double t) { return -f(t); }, lo, hi);
  out.sidelobe_db = ToDb(std::max(f(ts), at(best)) / peak);
  return out;
}

PanelModel ProjectPanel(const std::vector<LatticeSite>& sites,
                        const std::vector<double>& amplitudes, double wavelength_m) {
  if (sites.size() != amplitudes.size() || sites.empty() || !(wavelength_m > 0))
    throw InvalidArgument("panel projection: one amplitude per site and a wavelength > 0");
  std::vector<std::pair<double, double>> x, y;
  for (std::size_t n = 0; n < sites.size(); ++n) {
    x.emplace_back(sites[n].local_m.x() / wavelength_m, amplitudes[n]);
    y.emplace_back(sites[n].local_m.y() / wavelength_m, amplitudes[n]);
  }
  PanelModel p;
  p.x = Project(std::move(x));
  p.y = Project(std::move(y));
  return p;
}

double FirstNullSine(const LineProjection& line) {
  const double span = Span(line);
  if (line.position.size() < 2 || !(span > 0)) return 2.0;  // no null in sine space
  const auto af = [&](double s) { return LineFactor(line, s); };
  const double h = 1.0 / (80 * span);
  double prev = af(0);
  for (int i = 1; i <= 640; ++i) {
    const double cur = af(i * h);
    if (cur > prev) return ArgMin(af, std::max(0.0, (i - 2) * h), i * h);
    prev = cur;
  }
  return 8.0 / span;
}

}  // namespace lobecast
