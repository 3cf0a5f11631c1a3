#include "engine/synthesis/taper.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(TaperKind k) {
  switch (k) {
    case TaperKind::kUniform:
      return "uniform";
    case TaperKind::kBinomial:
      return "binomial";
    case TaperKind::kChebyshev:
      return "chebyshev";
    case TaperKind::kTaylor:
      return "taylor";
    case TaperKind::kCosine:
      return "cosine";
    case TaperKind::kCircularTaylor:
      return "circular-taylor";
  }
  return "?";
}

std::optional<TaperKind> TaperKindFromString(std::string_view s) {
  for (TaperKind k : {TaperKind::kUniform, TaperKind::kBinomial, TaperKind::kChebyshev,
                      TaperKind::kTaylor, TaperKind::kCosine, TaperKind::kCircularTaylor}) {
    if (EqualsIgnoreCase(s, ToString(k))) return k;
  }
  return std::nullopt;
}

namespace {

void NormalizeToPeak(std::vector<double>& a) {
  double peak = 0;
  for (double v : a) peak = std::max(peak, std::abs(v));
  if (!(peak > 0)) throw InvalidArgument("taper is zero everywhere");
  for (double& v : a) v /= peak;
}

void RequireSidelobe(double sll_db) {
  if (!(sll_db < 0) || !(sll_db >= -300))
    throw InvalidArgument("side-lobe level must be in [-300, 0) dB");
}

void RequireNbar(int nbar) {
  if (nbar < 1 || nbar > 100) throw InvalidArgument("nbar must be in [1, 100]");
}

// Chebyshev polynomial T_m(x) for any real x.
double Chebyshev(int m, double x) {
  if (std::abs(x) <= 1) return std::cos(m * std::acos(x));
  const double t = std::cosh(m * std::acosh(std::abs(x)));
  return (x < 0 && m % 2 == 1) ? -t : t;
}

std::vector<double> DolphChebyshev(int n, double sll_db) {
  if (n == 1) return {1.0};
  const double r = std::pow(10.0, -sll_db / 20.0);
  const int order = n - 1;
  const double beta = std::cosh(std::acosh(r) / order);
  // Samples of the real array factor at psi_k = 2 pi k / n (phase centre at the
  // array's middle), then the inverse DFT with the centre's phase put back.
  std::vector<double> af(static_cast<std::size_t>(n));
  for (int k = 0; k < n; ++k) af[k] = Chebyshev(order, beta * std::cos(kPi * k / n));
  std::vector<double> a(static_cast<std::size_t>(n));
  for (int m = 0; m < n; ++m) {
    double s = 0;
    for (int k = 0; k < n; ++k) {
      // exp(j pi k (n - 1 - 2m) / n), real part (the weights are real); the integer
      // product is reduced modulo 2n first so the angle stays small.
      const long long q = (static_cast<long long>(k) * (n - 1 - 2 * m)) % (2LL * n);
      s += af[k] * std::cos(kPi * static_cast<double>(q) / n);
    }
    a[m] = s / n;
  }
  return a;
}

std::vector<double> TaylorLine(int n, double sll_db, int nbar) {
  const double r = std::pow(10.0, -sll_db / 20.0);
  const double a = std::acosh(r) / kPi;
  const double a2 = a * a;
  const double s2 = nbar * nbar / (a2 + (nbar - 0.5) * (nbar - 0.5));
  std::vector<double> f(static_cast<std::size_t>(std::max(nbar - 1, 0)));
  for (int m = 1; m < nbar; ++m) {
    const double m2 = double(m) * m;
    double num = (m % 2 == 1) ? 1.0 : -1.0;
    double den = 2.0;
    for (int j = 1; j < nbar; ++j) {
      num *= 1.0 - m2 / (s2 * (a2 + (j - 0.5) * (j - 0.5)));
      if (j != m) den *= 1.0 - m2 / (double(j) * j);
    }
    f[m - 1] = num / den;
  }
  std::vector<double> w(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) {
    const double x = (i - 0.5 * (n - 1)) / n;
    double g = 1.0;
    for (int m = 1; m < nbar; ++m) g += 2.0 * f[m - 1] * std::cos(2.0 * kPi * m * x);
    w[i] = g;
  }
  return w;
}

std::vector<double> Binomial(int n) {
  // C(n-1, i) / C(n-1, centre) in logarithms: no overflow for long lines.
  std::vector<double> w(static_cast<std::size_t>(n));
  const int m = n - 1;
  const double centre = std::lgamma(m / 2 + 1.0) + std::lgamma(m - m / 2 + 1.0);
  for (int i = 0; i < n; ++i)
    w[i] = std::exp(centre - std::lgamma(i + 1.0) - std::lgamma(m - i + 1.0));
  return w;
}

}  // namespace

std::vector<double> LineTaper(const TaperSpec& spec, int n) {
  if (n < 1) throw InvalidArgument("a taper needs at least one element");
  std::vector<double> w;
  switch (spec.kind) {
    case TaperKind::kUniform:
      w.assign(static_cast<std::size_t>(n), 1.0);
      break;
    case TaperKind::kBinomial:
      w = Binomial(n);
      break;
    case TaperKind::kChebyshev:
      RequireSidelobe(spec.sidelobe_db);
      w = DolphChebyshev(n, spec.sidelobe_db);
      break;
    case TaperKind::kTaylor:
      RequireSidelobe(spec.sidelobe_db);
      RequireNbar(spec.nbar);
      w = TaylorLine(n, spec.sidelobe_db, spec.nbar);
      break;
    case TaperKind::kCosine: {
      if (!(spec.pedestal_db <= 0) || !std::isfinite(spec.pedestal_db))
        throw InvalidArgument("cosine pedestal must be finite and <= 0 dB");
      const double p = std::pow(10.0, spec.pedestal_db / 20.0);
      w.resize(static_cast<std::size_t>(n));
      for (int i = 0; i < n; ++i) {
        const double t = n == 1 ? 0.0 : (2.0 * i - (n - 1)) / (n - 1);
        w[i] = p + (1.0 - p) * std::cos(0.5 * kPi * t);
      }
      break;
    }
    case TaperKind::kCircularTaylor:
      throw InvalidArgument("the circular Taylor taper needs a planar lattice or rings");
  }
  NormalizeToPeak(w);
  return w;
}

std::vector<double> BesselJ1Zeros(int count) {
  std::vector<double> z;
  for (int m = 1; m <= count; ++m) {
    // McMahon: j_{1,m} ~ beta - 3 / (8 beta), beta = (m + 1/4) pi.
    const double b = (m + 0.25) * kPi;
    double x = b - 3.0 / (8.0 * b);
    for (int it = 0; it < 50; ++it) {
      // J1'(x) = J0(x) - J1(x) / x.
      const double j1 = std::cyl_bessel_j(1.0, x);
      const double d = std::cyl_bessel_j(0.0, x) - j1 / x;
      const double step = j1 / d;
      x -= step;
      if (std::abs(step) < 1e-15 * x) break;
    }
    z.push_back(x);
  }
  return z;
}

double CircularTaylorAt(double rho_over_a, double sidelobe_db, int nbar) {
  RequireSidelobe(sidelobe_db);
  RequireNbar(nbar);
  const double r = std::pow(10.0, -sidelobe_db / 20.0);
  const double a = std::acosh(r) / kPi;
  const double a2 = a * a;
  std::vector<double> mu = BesselJ1Zeros(nbar);  // mu[m-1] = j_{1,m}
  for (double& v : mu) v /= kPi;
  const double sigma = mu[nbar - 1] / std::sqrt(a2 + (nbar - 0.5) * (nbar - 0.5));
  auto z2 = [&](int n) { return sigma * sigma * (a2 + (n - 0.5) * (n - 0.5)); };
  const double p = kPi * rho_over_a;
  double g = 1.0;  // m = 0: F_0 = 1, mu_0 = 0, J0(0) = 1
  double g0 = 1.0;
  for (int m = 1; m < nbar; ++m) {
    const double mm2 = mu[m - 1] * mu[m - 1];
    const double j0 = std::cyl_bessel_j(0.0, kPi * mu[m - 1]);
    double num = -j0, den = 1.0;
    for (int n = 1; n < nbar; ++n) {
      num *= 1.0 - mm2 / z2(n);
      if (n != m) den *= 1.0 - mm2 / (mu[n - 1] * mu[n - 1]);
    }
    const double c = num / den / (j0 * j0);
    g += c * std::cyl_bessel_j(0.0, mu[m - 1] * p);
    g0 += c;
  }
  return g / g0;
}

std::vector<double> LatticeTaper(const TaperSpec& spec, const LatticeSpec& lattice,
                                 const std::vector<LatticeSite>& sites) {
  std::vector<double> w(sites.size(), 1.0);
  if (spec.kind == TaperKind::kCircularTaylor) {
    if (lattice.kind == LatticeKind::kLine)
      throw InvalidArgument("the circular Taylor taper needs a planar lattice or rings");
    double a = spec.aperture_radius_m;
    if (a == 0) {
      // The farthest element of the whole lattice, removed ones included.
      LatticeSpec full = lattice;
      full.removed.clear();
      for (const LatticeSite& s : GenerateLattice(full))
        a = std::max(a, s.local_m.head<2>().norm());
    }
    if (!(a > 0) || !std::isfinite(a))
      throw InvalidArgument("circular Taylor taper: the aperture radius must be > 0");
    for (std::size_t i = 0; i < sites.size(); ++i) {
      const double rho = sites[i].local_m.head<2>().norm();
      if (rho > a * (1 + 1e-12))
        throw InvalidArgument("circular Taylor taper: an element lies outside the aperture radius");
      w[i] = CircularTaylorAt(std::min(rho / a, 1.0), spec.sidelobe_db, spec.nbar);
    }
  } else if (lattice.kind == LatticeKind::kRing) {
    if (spec.kind != TaperKind::kUniform)
      throw InvalidArgument(
          "on a ring lattice the taper is uniform or circular-taylor (the others need rows)");
  } else {
    const std::vector<double> ax = LineTaper(spec, lattice.count_x);
    const std::vector<double> ay = lattice.kind == LatticeKind::kLine
                                       ? std::vector<double>{1.0}
                                       : LineTaper(spec, lattice.count_y);
    for (std::size_t i = 0; i < sites.size(); ++i) w[i] = ax[sites[i].ix] * ay[sites[i].iy];
  }
  NormalizeToPeak(w);
  return w;
}

double TaperEfficiency(const std::vector<double>& a) {
  if (a.empty()) throw InvalidArgument("taper efficiency of no elements");
  double s = 0, s2 = 0;
  for (double v : a) {
    s += v;
    s2 += v * v;
  }
  if (!(s2 > 0)) throw InvalidArgument("taper efficiency of a zero taper");
  return s * s / (static_cast<double>(a.size()) * s2);
}

}  // namespace lobecast
