// Matrix-free closed-form power (power_large.h).
#include "engine/power/power_large.h"

#include <cmath>
#include <limits>
#include <vector>

#include <omp.h>

#include "engine/error.h"
#include "engine/field/kernel_clones.h"
#include "engine/field/sincos.h"
#include "engine/ground.h"
#include "engine/power/impedance.h"
#include "engine/power/radiated_power.h"
#include "engine/threads.h"

namespace lobecast {
namespace {

struct Sources {
  std::vector<double> x, y, z, ux, uy, uz, le, ir, ii, ia;  // I of the driving dipole, |I|
};

// Row m of R I and of X' I (X' the mutual reactances, no self term) over the
// sources with x = k |r_m - r_s| >= kKernelSeriesBelow (the others contribute 0 here),
// without the factor k^2 eta0 / (4 pi): sum_s Le_m Le_s [(u_m.u_s) h(x) +
// (u_m.d)(u_s.d)/d^2 h2(x)] I_s with the kernels of impedance.h.
struct RowSums {
  Complex r_i, x_i;
  double r_abs;  // sum_s |R_ms| |I_s| (same factor left out)
};
LOBECAST_KERNEL_CLONES
RowSums RowFar(const Sources& s, const Dipole& m, double k) {
  const double mx = m.position_m.x(), my = m.position_m.y(), mz = m.position_m.z();
  const double ax = m.orientation.x(), ay = m.orientation.y(), az = m.orientation.z();
  const std::size_t n = s.x.size();
  const double *x = s.x.data(), *y = s.y.data(), *z = s.z.data();
  const double *ux = s.ux.data(), *uy = s.uy.data(), *uz = s.uz.data();
  const double *le = s.le.data(), *ir = s.ir.data(), *ii = s.ii.data(), *ia = s.ia.data();
  double vr = 0, vi = 0, wr = 0, wi = 0, va = 0;
#pragma omp simd reduction(+ : vr, vi, wr, wi, va)
  for (std::size_t j = 0; j < n; ++j) {
    const double dx = mx - x[j], dy = my - y[j], dz = mz - z[j];
    const double d2 = dx * dx + dy * dy + dz * dz;
    const double xx = k * std::sqrt(d2);
    const bool far = xx >= kKernelSeriesBelow;
    const double xs = far ? xx : kKernelSeriesBelow;  // keep the masked lanes finite
    double sn, cs;
    SinCos(xs, sn, cs);
    const double inv = 1.0 / xs, inv2 = inv * inv;
    // Spherical Bessel and Neumann closed forms (DLMF 10.49.3, 10.49.4).
    const double j0 = sn * inv;
    const double j1 = sn * inv2 - cs * inv;
    const double j2 = (3.0 * inv2 - 1.0) * sn * inv - 3.0 * cs * inv2;
    const double y0 = -cs * inv;
    const double y1 = -cs * inv2 - sn * inv;
    const double y2 = (1.0 - 3.0 * inv2) * cs * inv - 3.0 * sn * inv2;
    const double uu = ax * ux[j] + ay * uy[j] + az * uz[j];
    const double ad = ax * dx + ay * dy + az * dz, bd = ux[j] * dx + uy[j] * dy + uz[j] * dz;
    const double dd = ad * bd * (k * k) * inv2;
    const double kr = far ? le[j] * (uu * (j0 - j1 * inv) + dd * j2) : 0.0;
    const double kx = far ? -le[j] * (uu * (y0 - y1 * inv) + dd * y2) : 0.0;
    vr += kr * ir[j];
    vi += kr * ii[j];
    va += std::abs(kr) * ia[j];
    wr += kx * ir[j];
    wi += kx * ii[j];
  }
  const double lm = m.effective_length_m();
  return {lm * Complex(vr, vi), lm * Complex(wr, wi), std::abs(lm) * va};
}

// R I, (with_reactance) X' I and sum_s |R_ms| |I_s| (the rounding scale of R I),
// row by row; the rows run over the sources in a fixed order, so the result does
// not depend on the thread count.
// The rows run in slabs of about 1/256 of them, each slab in parallel, so that
// `progress` (when given) is called between slabs on the calling thread only.
void StreamRows(const Array& array, const Eigen::VectorXcd& currents_a, int num_threads,
                bool with_reactance, Eigen::VectorXcd& ri, Eigen::VectorXcd& xi,
                Eigen::VectorXd& ra, const std::function<void(double)>& progress = {}) {
  const double k = array.wavenumber_rad_m();
  const std::vector<Dipole> src = RadiatingSources(array);  // images after the dipoles
  Sources s;
  for (std::size_t j = 0; j < src.size(); ++j) {
    const Dipole& d = src[j];
    const Complex c = currents_a[static_cast<Eigen::Index>(DipoleOfSource(j, array.size()))];
    s.x.push_back(d.position_m.x()), s.y.push_back(d.position_m.y()),
        s.z.push_back(d.position_m.z());
    s.ux.push_back(d.orientation.x()), s.uy.push_back(d.orientation.y()),
        s.uz.push_back(d.orientation.z());
    s.le.push_back(d.effective_length_m());
    s.ir.push_back(c.real()), s.ii.push_back(c.imag()), s.ia.push_back(std::abs(c));
  }
  const double scale = k * k * kEta0_ohm / (4.0 * kPi);
  const auto n = static_cast<std::ptrdiff_t>(array.size());
  ri.resize(n);
  xi.resize(n);
  ra.resize(n);
  const bool pec = array.ground == Ground::kPec;
  const int threads = ResolveThreads(num_threads);
  const std::ptrdiff_t slab =
      progress ? std::max<std::ptrdiff_t>(64, (n + 255) / 256) : std::max<std::ptrdiff_t>(n, 1);
  for (std::ptrdiff_t first = 0; first < n; first += slab) {
    const std::ptrdiff_t last = std::min(n, first + slab);
#pragma omp parallel for num_threads(threads) schedule(dynamic, 8)
    for (std::ptrdiff_t m = first; m < last; ++m) {
      const Dipole& dm = array.dipoles[static_cast<std::size_t>(m)];
      RowSums row = RowFar(s, dm, k);
      // Near pairs (x < 2) through the series, in source order. The self term adds
      // R_mm only (the active resistance does not need X_mm); a source without
      // current couples nothing (and may have no finite X_mn, impedance.h).
      const std::size_t self = static_cast<std::size_t>(m);
      const std::size_t own_image = ImageIndexOf(self, array.size());
      const bool image_near = pec && 2.0 * k * dm.position_m.z() < kKernelSeriesBelow;
      for (std::size_t j = 0; j < src.size(); ++j) {
        const double x = k * (dm.position_m - src[j].position_m).norm();
        if (x >= kKernelSeriesBelow) continue;
        const Complex c(s.ir[j], s.ii[j]);
        // The own image's resistance is part of the self term (no cancellation).
        if (!(image_near && j == own_image)) {
          const double rr = image_near && j == self ? SelfResistanceOverGround(dm, k) / scale
                                                    : MutualResistance(dm, src[j], k) / scale;
          row.r_i += rr * c;
          row.r_abs += std::abs(rr) * s.ia[j];
        }
        if (!with_reactance || j == self || c == Complex(0.0)) continue;
        row.x_i += MutualImpedance(dm, src[j], k).imag() / scale * c;
      }
      ri[m] = scale * row.r_i;
      xi[m] = scale * row.x_i;
      ra[m] = scale * row.r_abs;
    }
    if (progress) progress(static_cast<double>(last) / static_cast<double>(n));
  }
}

}  // namespace

StreamedPower RadiatedPowerStreamed(const Array& array, const Eigen::VectorXcd& currents_a,
                                    int num_threads, const std::function<void(double)>& progress) {
  Validate(array);
  ValidateCurrents(array, currents_a);
  const auto n = static_cast<Eigen::Index>(array.size());
  Eigen::VectorXcd ri, xi;  // R I and X' I
  Eigen::VectorXd ra;       // sum_s |R_ms| |I_s|
  StreamRows(array, currents_a, num_threads, true, ri, xi, ra, progress);
  StreamedPower out;
  // P from R alone: I^H X' I is real, so j I^H X' I adds only rounding to Re.
  out.radiated_power_w = 0.5 * currents_a.dot(ri).real();  // dot conjugates the first
  out.term_magnitudes_w = 0.5 * currents_a.cwiseAbs().dot(ra);
  out.active_resistance_ohm.resize(n);
  out.impedance_product_v.resize(n);
  for (Eigen::Index m = 0; m < n; ++m) {
    const Complex i = currents_a[m];
    out.impedance_product_v[m] = ri[m] + Complex(0.0, 1.0) * xi[m];
    out.active_resistance_ohm[m] = i == Complex(0.0) ? std::numeric_limits<double>::quiet_NaN()
                                                     : (out.impedance_product_v[m] / i).real();
  }
  return out;
}

Eigen::VectorXcd ResistanceProductStreamed(const Array& array, const Eigen::VectorXcd& x,
                                           int num_threads) {
  Validate(array);
  ValidateCurrents(array, x);
  Eigen::VectorXcd ri, unused;
  Eigen::VectorXd unused_abs;
  StreamRows(array, x, num_threads, false, ri, unused, unused_abs);
  return ri;
}

}  // namespace lobecast
