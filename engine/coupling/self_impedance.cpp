// Self reactance and ohmic loss of a thin short dipole (self_impedance.h).
#include "engine/coupling/self_impedance.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <sstream>

#include "engine/error.h"
#include "engine/quadrature.h"

namespace lobecast {
namespace {

void CheckRadius(const Dipole& d, double radius_m) {
  if (!std::isfinite(radius_m) || radius_m <= 0 || radius_m >= 0.5 * d.length_m) {
    std::ostringstream s;
    s << "radius: found " << radius_m << " m, expected a finite number > 0 and below half the "
      << "length (" << 0.5 * d.length_m << " m)";
    throw InvalidArgument(s.str());
  }
}

// Autocorrelation of the triangular current I(z)/I0 = 1 - |z|/h over z, at lag u:
// the product is a quadratic between the kinks at z = 0, u and the ends, so two
// Gauss points per piece are exact.
double TriangleCorrelation(double u, double h) {
  u = std::abs(u);
  if (u >= 2 * h) return 0;
  const double lo = u - h, hi = h;  // where both factors are non-zero
  std::array<double, 4> cuts = {lo, std::clamp(0.0, lo, hi), std::clamp(u, lo, hi), hi};
  std::sort(cuts.begin(), cuts.end());
  const double g = 1.0 / std::sqrt(3.0);
  double sum = 0;
  for (int p = 0; p + 1 < 4; ++p) {
    const double a = cuts[p], b = cuts[p + 1];
    if (b <= a) continue;
    const double mid = 0.5 * (a + b), half = 0.5 * (b - a);
    for (double s : {-g, g}) {
      const double z = mid + s * half;
      sum += half * (1 - std::abs(z) / h) * (1 - std::abs(z - u) / h);
    }
  }
  return sum;
}

// Autocorrelation of I'(z)/I0 = -sign(z)/h, in closed form (0 <= u <= 2h).
double ChargeCorrelation(double u, double h) {
  u = std::abs(u);
  if (u >= 2 * h) return 0;
  return u <= h ? (2 * h - 3 * u) / (h * h) : -(2 * h - u) / (h * h);
}

}  // namespace

double SelfReactance(const Dipole& dipole, double radius_m, double k_rad_m) {
  if (dipole.distribution != Distribution::kTriangular) {
    throw InvalidArgument(
        "self reactance: a uniform (Hertzian) current needs end loading whose reactance no "
        "wire formula gives; expected a given reactance for this dipole");
  }
  CheckRadius(dipole, radius_m);
  const double h = 0.5 * dipole.length_m, a = radius_m, k = k_rad_m;
  // Z = j w mu0 S_A + S_phi / (j w eps0) with S = 2 int_0^2h K(u) C(u) du and
  // K(u) du = exp(-j k R) / (4 pi) dt for u = a sinh(t), R = a cosh(t).
  // C has a kink at u = h: integrate [0, h] and [h, 2h] apart, each in pieces of
  // t no wider than 1/2 (the integrand is smooth there), 16 Gauss points a piece.
  static const QuadratureRule rule = GaussLegendre(16);
  Complex s_a = 0, s_phi = 0;
  const double t_cuts[3] = {0.0, std::asinh(h / a), std::asinh(2 * h / a)};
  for (int part = 0; part < 2; ++part) {
    const double t0 = t_cuts[part], t1 = t_cuts[part + 1];
    const int pieces = std::max(1, static_cast<int>(std::ceil((t1 - t0) / 0.5)));
    const double width = (t1 - t0) / pieces;
    for (int p = 0; p < pieces; ++p) {
      const double mid = t0 + (p + 0.5) * width;
      for (std::size_t i = 0; i < rule.nodes.size(); ++i) {
        const double t = mid + 0.5 * width * rule.nodes[i];
        const double u = a * std::sinh(t), r = a * std::cosh(t);
        const Complex kernel = std::exp(Complex(0, -k * r)) * (0.5 * width * rule.weights[i]);
        s_a += kernel * TriangleCorrelation(u, h);
        s_phi += kernel * ChargeCorrelation(u, h);
      }
    }
  }
  s_a *= 2 / (4 * kPi);
  s_phi *= 2 / (4 * kPi);
  const double w_mu0 = k * kEta0_ohm;   // w mu0 = k eta0
  const double w_eps0 = k / kEta0_ohm;  // w eps0 = k / eta0
  const Complex z = Complex(0, w_mu0) * s_a + s_phi / Complex(0, w_eps0);
  return z.imag();
}

double SelfReactanceShortForm(double length_m, double radius_m, double k_rad_m) {
  return -kEta0_ohm / kPi * (std::log(length_m / (2 * radius_m)) - 1) /
         std::tan(0.5 * k_rad_m * length_m);
}

OhmicLoss LossResistance(const Dipole& dipole, double radius_m, double conductivity_s_m,
                         double angular_frequency_rad_s) {
  CheckRadius(dipole, radius_m);
  if (!std::isfinite(conductivity_s_m) || conductivity_s_m <= 0) {
    std::ostringstream s;
    s << "conductivity: found " << conductivity_s_m << " S/m, expected a finite number > 0";
    throw InvalidArgument(s.str());
  }
  const double w = angular_frequency_rad_s;
  OhmicLoss out;
  out.skin_depth_m = std::sqrt(2 / (w * kMu0_H_m * conductivity_s_m));
  const double rs = std::sqrt(w * kMu0_H_m / (2 * conductivity_s_m));
  const double current_length =
      dipole.distribution == Distribution::kTriangular ? dipole.length_m / 3 : dipole.length_m;
  out.resistance_ohm = rs / (2 * kPi * radius_m) * current_length;
  out.skin_effect_valid = out.skin_depth_m <= 0.5 * radius_m;
  return out;
}

}  // namespace lobecast
