// Mutual impedance and active impedance of elemental dipoles (impedance.h).
#include "engine/power/impedance.h"

#include <cmath>
#include <limits>
#include <sstream>

#include "engine/check.h"
#include "engine/error.h"
#include "engine/ground.h"
#include "engine/power/radiated_power.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// |u_m . u_n| at or below this counts as orthogonal for dipoles at one point.
constexpr double kOrthogonal = 1e-12;

// Z_mn without the factor k^2 eta0 / (4 pi); a and b are (possibly image) sources.
Complex KernelBetween(const Dipole& a, const Dipole& b, double k) {
  const Vec3 d = a.position_m - b.position_m;
  const double dist = d.norm();
  const double uu = a.orientation.dot(b.orientation);
  const double le2 = a.effective_length_m() * b.effective_length_m();
  if (dist == 0.0) {
    // R_mn -> (2/3)(u_m.u_n); X_mn is finite only for orthogonal dipoles (0).
    const double x_part = std::abs(uu) <= kOrthogonal ? 0.0 : kNaN;
    return le2 * Complex(2.0 / 3.0 * uu, x_part);
  }
  const ImpedanceKernel kz = ImpedanceKernelAt(k * dist);
  const Vec3 dh = d / dist;
  return le2 * (uu * kz.h + a.orientation.dot(dh) * b.orientation.dot(dh) * kz.h2);
}

}  // namespace

ImpedanceKernel ImpedanceKernelAt(double x) {
  x = std::abs(x);
  const RadiationKernel r = RadiationKernelAt(x);
  const double s = std::sin(x), c = std::cos(x);
  const double inv = 1.0 / x, inv2 = inv * inv;
  // Spherical Neumann functions (DLMF 10.49.4).
  const double y0 = -c * inv;
  const double y1 = -c * inv2 - s * inv;
  const double y2 = (1.0 - 3.0 * inv2) * c * inv - 3.0 * s * inv2;
  return {Complex(r.f, -(y0 - y1 * inv)), Complex(r.j2, -y2)};
}

Complex MutualImpedance(const Dipole& m, const Dipole& n, double k_rad_m) {
  return k_rad_m * k_rad_m * kEta0_ohm / (4.0 * kPi) * KernelBetween(m, n, k_rad_m);
}

Eigen::MatrixXcd ImpedanceMatrix(const Array& array, const Eigen::VectorXd& self_reactance_ohm,
                                 int num_threads) {
  Validate(array);
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(self_reactance_ohm.size()), array.size());
  const double k = array.wavenumber_rad_m();
  const double scale = k * k * kEta0_ohm / (4.0 * kPi);
  const auto n = static_cast<std::ptrdiff_t>(array.size());
  const bool pec = array.ground == Ground::kPec;
  std::vector<Dipole> images;
  if (pec) {
    images.reserve(array.size());
    for (const Dipole& d : array.dipoles) images.push_back(ImageOf(d));
  }
  Eigen::MatrixXcd z(n, n);
#pragma omp parallel for num_threads(ResolveThreads(num_threads)) schedule(dynamic, 16)
  for (std::ptrdiff_t m = 0; m < n; ++m) {
    const Dipole& dm = array.dipoles[static_cast<std::size_t>(m)];
    for (std::ptrdiff_t q = 0; q <= m; ++q) {
      const Dipole& dq = array.dipoles[static_cast<std::size_t>(q)];
      // The self term: R_mm (the x -> 0 limit); its reactance is added below.
      Complex v = q == m ? Complex(2.0 / 3.0 * dm.effective_length_m() * dm.effective_length_m())
                         : KernelBetween(dm, dq, k);
      // The coupling to images is symmetric (reflection keeps u.u' and the R terms).
      if (pec) v += KernelBetween(dm, images[static_cast<std::size_t>(q)], k);
      // A dipole and its own image: the resistance from the series that keeps its
      // digits when the two nearly cancel (a horizontal dipole low over the ground,
      // radiated_power.h), as the resistance matrix has it.
      if (pec && q == m) v.real(SelfResistanceOverGround(dm, k) / scale);
      z(m, q) = scale * v;
      z(q, m) = scale * v;
    }
  }
  z.diagonal().imag() += self_reactance_ohm;
  return z;
}

Eigen::VectorXcd ActiveImpedance(const Eigen::MatrixXcd& impedance_ohm,
                                 const Eigen::VectorXcd& currents_a) {
  const Eigen::Index n = currents_a.size();
  LOBECAST_CHECK_EQ(impedance_ohm.rows(), n);
  LOBECAST_CHECK_EQ(impedance_ohm.cols(), n);
  Eigen::VectorXcd out(n);
  for (Eigen::Index m = 0; m < n; ++m) {
    if (currents_a[m] == Complex(0.0)) {
      out[m] = Complex(kNaN, kNaN);
      continue;
    }
    Complex sum = 0.0;
    for (Eigen::Index q = 0; q < n; ++q) {
      if (currents_a[q] != Complex(0.0)) sum += impedance_ohm(m, q) * currents_a[q];
    }
    out[m] = sum / currents_a[m];
  }
  return out;
}

}  // namespace lobecast
