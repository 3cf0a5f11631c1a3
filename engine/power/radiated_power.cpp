// Closed-form radiated power and resistances (radiated_power.h).
#include "engine/power/radiated_power.h"

#include <cmath>
#include <limits>
#include <sstream>
#include <string>

#include <omp.h>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/ground.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

RadiationKernel SeriesKernel(double x) {
  // Maclaurin series of the spherical Bessel functions (DLMF 10.53.1):
  //   j_n(x) = x^n sum_k (-x^2/2)^k / (k! (2n+2k+1)!!), so
  //   j0 - j1/x = sum_k (-x^2/2)^k (2k+2) / (k! (2k+3)!!),
  //   j2        = x^2 sum_k (-x^2/2)^k / (k! (2k+5)!!).
  const double x2 = x * x;
  double b = 1.0 / 3.0;   // (-x^2/2)^k / (k! (2k+3)!!) at k = 0
  double c = 1.0 / 15.0;  // (-x^2/2)^k / (k! (2k+5)!!) at k = 0
  //   2/3 - (j0 - j1/x) = -(the same sum from k = 1).
  double f = 0.0, g = 0.0, h = 0.0;
  for (int k = 0; k < 40; ++k) {
    const double tf = b * (2.0 * k + 2.0);
    f += tf;
    g += c;
    if (k > 0) h -= tf;
    if (std::abs(tf) <= 1e-18 * std::abs(f) && (k == 0 || std::abs(tf) <= 1e-18 * std::abs(h)) &&
        std::abs(c) <= 1e-18 * std::abs(g))
      break;
    b *= -x2 / (2.0 * (k + 1) * (2.0 * k + 5.0));
    c *= -x2 / (2.0 * (k + 1) * (2.0 * k + 7.0));
  }
  return {f, x2 * g, h};
}

// R_mn without the common factor k^2 eta0 / (4 pi); a and b are (possibly image) sources.
double KernelBetween(const Dipole& a, const Dipole& b, double k) {
  const Vec3 d = a.position_m - b.position_m;
  const double dist = d.norm();
  const double x = k * dist;
  const RadiationKernel kr = RadiationKernelAt(x);
  double value = a.orientation.dot(b.orientation) * kr.f;
  if (dist > 0) {
    const Vec3 dh = d / dist;
    value += a.orientation.dot(dh) * b.orientation.dot(dh) * kr.j2;
  }
  return value * a.effective_length_m() * b.effective_length_m();
}

}  // namespace

RadiationKernel RadiationKernelAt(double x) {
  x = std::abs(x);
  if (x < kKernelSeriesBelow) return SeriesKernel(x);
  const double s = std::sin(x), c = std::cos(x);
  const double j0 = s / x;
  const double j1 = s / (x * x) - c / x;
  const double j2 = (3.0 / (x * x) - 1.0) * s / x - 3.0 * c / (x * x);
  return {j0 - j1 / x, j2, 2.0 / 3.0 - (j0 - j1 / x)};
}

double MutualResistance(const Dipole& m, const Dipole& n, double k_rad_m) {
  return k_rad_m * k_rad_m * kEta0_ohm / (4.0 * kPi) * KernelBetween(m, n, k_rad_m);
}

double SelfResistanceOverGround(const Dipole& m, double k_rad_m) {
  const RadiationKernel kr = RadiationKernelAt(2.0 * k_rad_m * m.position_m.z());
  const Vec3& u = m.orientation;
  const double uz2 = u.z() * u.z(), uh2 = u.x() * u.x() + u.y() * u.y();
  const double le = m.effective_length_m();
  return k_rad_m * k_rad_m * kEta0_ohm / (4.0 * kPi) * le * le *
         ((4.0 / 3.0) * uz2 - (uz2 - uh2) * kr.g + uz2 * kr.j2);
}

Eigen::MatrixXd ResistanceMatrix(const Array& array, int num_threads) {
  Validate(array);
  const double k = array.wavenumber_rad_m();
  const double scale = k * k * kEta0_ohm / (4.0 * kPi);
  const auto n = static_cast<std::ptrdiff_t>(array.size());
  const bool pec = array.ground == Ground::kPec;
  const std::vector<Dipole> sources = RadiatingSources(array);
  Eigen::MatrixXd r(n, n);
  const int threads = ResolveThreads(num_threads);
  // Rows have different lengths (lower triangle), so balance them dynamically.
#pragma omp parallel for num_threads(threads) schedule(dynamic, 16)
  for (std::ptrdiff_t m = 0; m < n; ++m) {
    const Dipole& dm = array.dipoles[static_cast<std::size_t>(m)];
    if (pec) r(m, m) = SelfResistanceOverGround(dm, k);
    for (std::ptrdiff_t q = 0; q <= m; ++q) {
      if (pec && q == m) continue;
      const auto dq = static_cast<std::size_t>(q);
      double v = KernelBetween(dm, array.dipoles[dq], k);
      // R_to_images is symmetric (reflection preserves u.u' and the d terms), so
      // one evaluation per pair suffices.
      if (pec) v += KernelBetween(dm, sources[ImageIndexOf(dq, array.size())], k);
      r(m, q) = scale * v;
      r(q, m) = scale * v;
    }
  }
  return r;
}

double RadiatedPower(const Eigen::MatrixXd& resistance_ohm, const Eigen::VectorXcd& currents_a) {
  // Both belong to the same array (ResistanceMatrix; one current per dipole).
  LOBECAST_CHECK_EQ(resistance_ohm.rows(), currents_a.size());
  LOBECAST_CHECK_EQ(resistance_ohm.cols(), currents_a.size());
  // R is real symmetric, so I^H R I = a^T R a + b^T R b with I = a + j b.
  const Eigen::VectorXd a = currents_a.real(), b = currents_a.imag();
  return 0.5 * (a.dot(resistance_ohm * a) + b.dot(resistance_ohm * b));
}

double PowerTermMagnitudes(const Eigen::MatrixXd& resistance_ohm,
                           const Eigen::VectorXcd& currents_a) {
  LOBECAST_CHECK_EQ(resistance_ohm.rows(), currents_a.size());
  const Eigen::VectorXd a = currents_a.cwiseAbs();
  double sum = 0.0;  // column by column: no N x N temporary
  for (Eigen::Index n = 0; n < a.size(); ++n) sum += a[n] * resistance_ohm.col(n).cwiseAbs().dot(a);
  return 0.5 * sum;
}

double PowerSignificantDigits(double p, double s) {
  if (!(p > 0.0)) return 0.0;
  return -std::log10(std::numeric_limits<double>::epsilon() * s / p);
}

void CheckRadiatedPower(double p) {
  if (!std::isfinite(p)) {
    throw InvalidArgument("currents: the radiated power overflows a double (found " +
                          std::to_string(p) + " W); expected currents of a physical size (A peak)");
  }
  if (!(p > 0)) {
    std::ostringstream m;
    m << "currents: the array radiates " << p
      << " W, so directivity is undefined; expected at least one non-zero current (and "
         "currents that do not cancel exactly)";
    throw InvalidArgument(m.str());
  }
}

}  // namespace lobecast
