// Type-3 NUFFT with the exponential-of-semicircle kernel (nufft.h).
#include "engine/field/nufft.h"
#include "engine/threads.h"

#include <algorithm>
#include <cmath>
#include <complex>
#include <memory>
#include <mutex>
#include <new>
#include <sstream>
#include <type_traits>
#include <utility>

#include <fftw3.h>
#include <omp.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/field/exp.h"
#include "engine/field/kernel_clones.h"
#include "engine/field/sincos.h"

namespace lobecast {
namespace {

using Complex = std::complex<double>;

constexpr double kUpsampling = 2.0;  // sigma, for both the spread and the FFT grid
constexpr int kMaxWidth = 16;

// FFTW's planner (fftw_plan_* and fftw_destroy_plan) is not thread-safe;
// execution is, also of one plan on several arrays at once (FFTW 3 manual,
// sec. 5.4 "Thread safety" and 4.6 "New-array Execute Functions").
std::mutex& FftwPlannerMutex() {
  static std::mutex m;
  return m;
}

// An fftw_malloc'd array (SIMD-aligned, so every buffer has the alignment the
// plans were made for), freed by fftw_free.
struct FftwFree {
  void operator()(Complex* p) const { fftw_free(p); }
};
using FftwBuffer = std::unique_ptr<Complex[], FftwFree>;

FftwBuffer AllocateFftw(std::size_t n) {
  auto* p = static_cast<Complex*>(fftw_malloc(sizeof(Complex) * n));
  if (!p) throw std::bad_alloc();
  return FftwBuffer(p);
}

fftw_complex* AsFftw(Complex* p) { return reinterpret_cast<fftw_complex*>(p); }

struct FftwPlanDestroy {
  void operator()(fftw_plan p) const {
    const std::lock_guard<std::mutex> lock(FftwPlannerMutex());
    fftw_destroy_plan(p);
  }
};
using FftwPlan = std::unique_ptr<std::remove_pointer_t<fftw_plan>, FftwPlanDestroy>;

int WidthFor(double tolerance) {
  // Barnett et al. 2019, sec. 4.1: w = ceil(log10(1/eps)) + 1 at sigma = 2.
  const int w = static_cast<int>(std::ceil(std::log10(1.0 / tolerance))) + 1;
  return std::clamp(w, 2, kMaxWidth);
}

// Smallest even n >= m whose only prime factors are 2, 3 and 5 (fast for FFTW).
int NextSmooth(int m) {
  for (int n = std::max(2, m + (m & 1));; n += 2) {
    int r = n;
    for (int p : {2, 3, 5}) {
      while (r % p == 0) r /= p;
    }
    if (r == 1) return n;
  }
}

// The ES kernel phi(z) = exp(beta (sqrt(1 - z^2) - 1)), zero outside |z| <= 1.
inline double Kernel(double beta, double z) {
  const double q = 1.0 - z * z;
  return q > 0 ? std::exp(beta * (std::sqrt(q) - 1.0)) : 0.0;
}

// phi_hat(xi) = int_{-1}^{1} phi(z) cos(xi z) dz by Gauss-Legendre quadrature on
// the half interval (phi is even), as Barnett et al. 2019 do (sec. 3.1.1).
class KernelTransform {
 public:
  KernelTransform(double beta, int width) {
    // Nodes and weights of the n-point rule on [-1, 1] by Newton's method on the
    // Legendre polynomial (Abramowitz and Stegun 25.4.29); keep z > 0 and map to
    // [0, 1] weights for the even integrand.
    // 2 (w + 6) nodes: the quadrature error then stays three or more orders
    // below the kernel's own tolerance for every width (checked against 600 nodes
    // while writing this; the sqrt endpoint singularity caps convergence at the
    // e^-beta level, which is the tolerance itself).
    const int n = 2 * (width + 6);
    for (int i = 0; i < n / 2; ++i) {
      double z = std::cos(kPi * (i + 0.75) / (n + 0.5));
      double dp = 0;
      for (int it = 0; it < 100; ++it) {
        double p0 = 1, p1 = z;
        for (int k = 2; k <= n; ++k) {
          const double p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
          p0 = p1, p1 = p2;
        }
        dp = n * (z * p1 - p0) / (z * z - 1);
        const double dz = p1 / dp;
        z -= dz;
        if (std::abs(dz) < 1e-16) break;
      }
      const double w = 2.0 / ((1 - z * z) * dp * dp);
      nodes_.push_back(z);
      weights_.push_back(2.0 * w * Kernel(beta, z));  // both halves
    }
  }
  double operator()(double xi) const {
    double sum = 0;
    const std::size_t n = nodes_.size();
#pragma omp simd reduction(+ : sum)
    for (std::size_t i = 0; i < n; ++i) {
      double s, c;
      SinCos(xi * nodes_[i], s, c);
      sum += weights_[i] * c;
    }
    return sum;
  }

 private:
  std::vector<double> nodes_, weights_;
};

struct Range {
  double centre, half_width;
};
Range RangeOf(const Eigen::Matrix3Xd& m, int d) {
  if (m.cols() == 0) return {0.0, 0.0};
  const double lo = m.row(d).minCoeff(), hi = m.row(d).maxCoeff();
  return {0.5 * (lo + hi), 0.5 * (hi - lo)};
}

// Rejects a tolerance outside 1e-14 to 1e-1, naming it.
void CheckTolerance(double tolerance) {
  if (!(tolerance >= 1e-14 && tolerance <= 1e-1)) {
    std::ostringstream m;
    m << "nufft tolerance: found " << tolerance << ", expected 1e-14 to 1e-1";
    throw InvalidArgument(m.str());
  }
}

void CheckStrengths(const Eigen::MatrixXcd& c, Eigen::Index rows, const char* what) {
  if (c.rows() != rows) {
    std::ostringstream m;
    m << "nufft " << what << ": found " << c.rows() << " rows, expected " << rows;
    throw InvalidArgument(m.str());
  }
  if (c.cols() < 1 || c.cols() > 3) {
    std::ostringstream m;
    m << "nufft " << what << ": found " << c.cols() << " columns, expected 1 to 3";
    throw InvalidArgument(m.str());
  }
}

// Kernel weights and wrapped grid indices of a coordinate t (grid units) on a
// periodic grid of size n, for a kernel w cells wide; an inactive dimension has
// the single weight 1 at cell 0. Returns the number of weights.
[[gnu::always_inline]] inline int KernelWeights(bool active, double beta, int w, double t, int n,
                                                double* wt, int* idx) {
  if (!active) {
    wt[0] = 1.0, idx[0] = 0;
    return 1;
  }
  const int l0 = static_cast<int>(std::ceil(t - 0.5 * w));
  const double z0 = (l0 - t) * 2.0 / w, dz = 2.0 / w;
  // Kernel(beta, z) with the inlined exp, so the w weights vectorize.
#pragma omp simd
  for (int i = 0; i < w; ++i) {
    const double z = z0 + i * dz;
    const double q = 1.0 - z * z;
    const double v = Exp(beta * (std::sqrt(q > 0 ? q : 0.0) - 1.0));
    wt[i] = q > 0 ? v : 0.0;
  }
  for (int i = 0; i < w; ++i) idx[i] = (((l0 + i) % n) + n) % n;
  return w;
}

// The zero-padded grid after its FFT, as the interpolation reads it.
struct GridView {
  const Complex* grid;
  std::array<int, 3> n2;
  std::size_t plane, cells;  // n2[1] n2[2], and all cells of one component
  int nc;                    // components
  double beta;
  int w;
};

// out(k, :) = sum over the kernel's footprint of the grid at target k (grid
// units), for targets [begin, end). Built for each vector width.
LOBECAST_KERNEL_CLONES
void InterpolateTargets(const GridView& g, const Eigen::Matrix3Xd& targets, std::ptrdiff_t begin,
                        std::ptrdiff_t end, Eigen::MatrixXcd& out) {
  for (std::ptrdiff_t k = begin; k < end; ++k) {
    double wt[3][kMaxWidth];
    int idx[3][kMaxWidth];
    int len[3];
    for (std::size_t d = 0; d < 3; ++d) {
      len[d] = KernelWeights(g.n2[d] > 1, g.beta, g.w, targets(static_cast<Eigen::Index>(d), k),
                             g.n2[d], wt[d], idx[d]);
    }
    // The innermost run is contiguous unless it wraps around the grid.
    const bool contiguous = idx[2][len[2] - 1] == idx[2][0] + len[2] - 1;
    double ar[3] = {0, 0, 0}, ai[3] = {0, 0, 0};
    for (int i0 = 0; i0 < len[0]; ++i0) {
      for (int i1 = 0; i1 < len[1]; ++i1) {
        const std::size_t base =
            static_cast<std::size_t>(idx[0][i0]) * g.plane +
            static_cast<std::size_t>(idx[1][i1]) * static_cast<std::size_t>(g.n2[2]);
        const double w01 = wt[0][i0] * wt[1][i1];
        for (int a = 0; a < g.nc; ++a) {
          const Complex* row = g.grid + static_cast<std::size_t>(a) * g.cells + base;
          double sr = 0, si = 0;
          if (contiguous) {
            const double* p = reinterpret_cast<const double*>(row + idx[2][0]);
#pragma omp simd reduction(+ : sr, si)
            for (int i2 = 0; i2 < len[2]; ++i2) {
              sr += wt[2][i2] * p[2 * i2];
              si += wt[2][i2] * p[2 * i2 + 1];
            }
          } else {
            for (int i2 = 0; i2 < len[2]; ++i2) {
              sr += wt[2][i2] * row[idx[2][i2]].real();
              si += wt[2][i2] * row[idx[2][i2]].imag();
            }
          }
          ar[a] += w01 * sr;
          ai[a] += w01 * si;
        }
      }
    }
    for (int a = 0; a < g.nc; ++a) out(k, a) = Complex(ar[a], ai[a]);
  }
}

// The transpose of InterpolateTargets: grid(cells around point j) += kernel
// weights * values(j, :) for every point j (grid units in coords), threaded
// without races or thread-dependent sums: threads own slabs of the grid along its
// first dimension of more than one cell, and every thread visits the points in
// order, so each cell's sum runs in point order whatever the thread count.
void SpreadPoints(Complex* grid, const GridView& g, const Eigen::Matrix3Xd& coords,
                  const Eigen::MatrixXcd& values, int threads) {
  int slab_dim = 0;
  while (slab_dim < 2 && g.n2[static_cast<std::size_t>(slab_dim)] == 1) ++slab_dim;
#pragma omp parallel num_threads(threads)
  {
    const int t = omp_get_thread_num(), nt = omp_get_num_threads();
    const long slab_n = g.n2[static_cast<std::size_t>(slab_dim)];
    const int lo = static_cast<int>(slab_n * t / nt), hi = static_cast<int>(slab_n * (t + 1) / nt);
    double wt[3][kMaxWidth];
    int idx[3][kMaxWidth];
    for (Eigen::Index j = 0; j < coords.cols(); ++j) {
      int len[3];
      for (int i = 0; i < 3; ++i) {
        const int d = (slab_dim + i) % 3;  // this thread's slab first
        const auto u = static_cast<std::size_t>(d);
        len[d] = KernelWeights(g.n2[u] > 1, g.beta, g.w, coords(d, j), g.n2[u], wt[d], idx[d]);
        if (d == slab_dim) {  // keep only this thread's slab
          int k = 0;
          for (int l = 0; l < len[d]; ++l) {
            if (idx[d][l] >= lo && idx[d][l] < hi) wt[d][k] = wt[d][l], idx[d][k] = idx[d][l], ++k;
          }
          len[d] = k;
          if (k == 0) break;
        }
      }
      if (len[slab_dim] == 0) continue;
      for (int i0 = 0; i0 < len[0]; ++i0) {
        for (int i1 = 0; i1 < len[1]; ++i1) {
          const std::size_t base =
              static_cast<std::size_t>(idx[0][i0]) * g.plane +
              static_cast<std::size_t>(idx[1][i1]) * static_cast<std::size_t>(g.n2[2]);
          const double w01 = wt[0][i0] * wt[1][i1];
          for (int a = 0; a < g.nc; ++a) {
            Complex* row = grid + static_cast<std::size_t>(a) * g.cells + base;
            const Complex c = values(j, a);
            for (int i2 = 0; i2 < len[2]; ++i2) row[idx[2][i2]] += (w01 * wt[2][i2]) * c;
          }
        }
      }
    }
  }
}

// Interpolation at every column of coords (grid units), in parallel blocks.
Eigen::MatrixXcd Interpolate(const GridView& g, const Eigen::Matrix3Xd& coords, int threads) {
  Eigen::MatrixXcd out(coords.cols(), g.nc);
  constexpr std::ptrdiff_t kBlock = 512;
  const auto m = static_cast<std::ptrdiff_t>(coords.cols());
  const std::ptrdiff_t blocks = (m + kBlock - 1) / kBlock;
#pragma omp parallel for num_threads(threads) schedule(static)
  for (std::ptrdiff_t b = 0; b < blocks; ++b) {
    InterpolateTargets(g, coords, b * kBlock, std::min(m, (b + 1) * kBlock), out);
  }
  return out;
}

}  // namespace

double NufftGeometry::kernel_points() const {
  double p = 1;
  for (int d = 0; d < active_dims; ++d) p *= kernel_width;
  return p;
}

// ---- Type 2 ----------------------------------------------------------------

NufftGeometry Nufft2::GeometryFor(const std::array<int, 3>& modes, double tolerance) {
  CheckTolerance(tolerance);
  NufftGeometry g;
  g.kernel_width = WidthFor(tolerance);
  for (std::size_t d = 0; d < 3; ++d) {
    if (modes[d] < 1) {
      std::ostringstream m;
      m << "nufft modes[" << d << "]: found " << modes[d] << ", expected 1 or more";
      throw InvalidArgument(m.str());
    }
    if (modes[d] == 1) continue;
    ++g.active_dims;
    g.spread_size[d] = modes[d];
    // At least two kernel widths: a few modes on a grid narrower than the kernel
    // lose about a digit (measured: 3.8 eps for 2 and 3 modes at 1e-9).
    g.fft_size[d] = NextSmooth(
        std::max(static_cast<int>(std::ceil(kUpsampling * modes[d])), 2 * g.kernel_width));
  }
  return g;
}

// The FFT of the zero-padded grid: one plan per component count (1 to 3) and
// sign (backward for Execute, forward for Adjoint), run on every execution's own
// buffer.
namespace {

// One execution's zeroed FFT grid and the plan to run on it.
struct PaddedGrid {
  FftwBuffer buffer;
  fftw_plan plan;
  GridView view;
};

}  // namespace

struct Nufft2::Plans {
  // A zeroed grid for nc components of the FFT grid of g, with the plan of the
  // given sign for it.
  PaddedGrid NewGrid(const NufftGeometry& g, double beta, int nc, int sign) {
    const std::array<int, 3>& n2 = g.fft_size;
    const std::size_t plane = static_cast<std::size_t>(n2[1]) * static_cast<std::size_t>(n2[2]);
    const std::size_t cells = static_cast<std::size_t>(n2[0]) * plane;
    FftwBuffer buffer = AllocateFftw(cells * static_cast<std::size_t>(nc));
    Complex* const grid = buffer.get();
    const fftw_plan plan = Get(n2, nc, sign, grid);
    std::fill(grid, grid + cells * static_cast<std::size_t>(nc), Complex(0.0));
    return PaddedGrid{std::move(buffer), plan,
                      GridView{grid, n2, plane, cells, nc, beta, g.kernel_width}};
  }

  // The plan for nc components of the grid n2, made on first use (FFTW_ESTIMATE
  // neither reads nor writes the array it plans on); later calls return it.
  fftw_plan Get(const std::array<int, 3>& n2, int nc, int sign, Complex* grid) {
    const auto i = static_cast<std::size_t>(nc - 1 + (sign == FFTW_FORWARD ? 3 : 0));
    std::call_once(once[i], [&] {
      const int cells = n2[0] * n2[1] * n2[2];
      const std::lock_guard<std::mutex> lock(FftwPlannerMutex());
      fftw_plan p = fftw_plan_many_dft(3, n2.data(), nc, AsFftw(grid), nullptr, 1, cells,
                                       AsFftw(grid), nullptr, 1, cells, sign, FFTW_ESTIMATE);
      if (!p) throw std::bad_alloc();
      plan[i].reset(p);
    });
    return plan[i].get();
  }
  std::array<std::once_flag, 6> once;
  std::array<FftwPlan, 6> plan;
};

Nufft2::~Nufft2() = default;

std::size_t Nufft2::num_modes() const {
  return static_cast<std::size_t>(modes_[0]) * static_cast<std::size_t>(modes_[1]) *
         static_cast<std::size_t>(modes_[2]);
}

Nufft2::Nufft2(const std::array<int, 3>& modes, Eigen::Matrix3Xd targets,
               const NufftOptions& options)
    : geometry_(GeometryFor(modes, options.tolerance)),
      modes_(modes),
      num_threads_(options.num_threads),
      plans_(std::make_unique<Plans>()) {
  const int w = geometry_.kernel_width;
  // Barnett et al. 2019, sec. 4.1: beta = 2.30 w at sigma = 2.
  beta_ = 2.30 * w;
  const KernelTransform phi_hat(beta_, w);
  // Deconvolution h2 / psi2_hat(l), psi2_hat(xi) = alpha2 phi_hat(alpha2 xi),
  // alpha2 = w h2 / 2, h2 = 2 pi / n2.
  for (std::size_t d = 0; d < 3; ++d) {
    std::vector<double>& dc = deconvolution_[d];
    dc.assign(static_cast<std::size_t>(modes_[d]), 1.0);
    if (modes_[d] == 1) continue;
    const int n2 = geometry_.fft_size[d];
    const double h2 = 2.0 * kPi / n2, alpha2 = 0.5 * w * h2;
    for (int i = 0; i < modes_[d]; ++i) {
      const double l = i - modes_[d] / 2;
      dc[static_cast<std::size_t>(i)] = h2 / (alpha2 * phi_hat(alpha2 * l));
    }
  }
  // Targets in grid units (in place), reduced to one period first so large t
  // keep their digits.
  for (Eigen::Index k = 0; k < targets.cols(); ++k) {
    for (int d = 0; d < 3; ++d) {
      const int n2 = geometry_.fft_size[static_cast<std::size_t>(d)];
      const double t = targets(d, k);
      targets(d, k) =
          n2 == 1 ? 0.0 : (t - 2.0 * kPi * std::nearbyint(t / (2.0 * kPi))) * n2 / (2.0 * kPi);
    }
  }
  targets_ = std::move(targets);
}

namespace {

// Calls f(row, cell, factor) for every mode of a Nufft2: its row in the
// coefficient matrix, its cell (l mod n2) in the zero-padded grid of plane
// n2[1] n2[2] cells, and its deconvolution factor.
template <class F>
void ForEachMode(const std::array<int, 3>& modes, const std::array<int, 3>& n2, std::size_t plane,
                 const std::array<std::vector<double>, 3>& deconvolution, F f) {
  for (int i0 = 0; i0 < modes[0]; ++i0) {
    const std::size_t r0 = static_cast<std::size_t>((i0 - modes[0] / 2 + n2[0]) % n2[0]);
    for (int i1 = 0; i1 < modes[1]; ++i1) {
      const std::size_t r1 = static_cast<std::size_t>((i1 - modes[1] / 2 + n2[1]) % n2[1]);
      const double d01 = deconvolution[0][static_cast<std::size_t>(i0)] *
                         deconvolution[1][static_cast<std::size_t>(i1)];
      const auto row0 = (static_cast<Eigen::Index>(i0) * modes[1] + i1) * modes[2];
      for (int i2 = 0; i2 < modes[2]; ++i2) {
        const std::size_t cell = r0 * plane + r1 * static_cast<std::size_t>(n2[2]) +
                                 static_cast<std::size_t>((i2 - modes[2] / 2 + n2[2]) % n2[2]);
        f(row0 + i2, cell, d01 * deconvolution[2][static_cast<std::size_t>(i2)]);
      }
    }
  }
}

}  // namespace

Eigen::MatrixXcd Nufft2::Execute(const Eigen::MatrixXcd& coefficients) const {
  CheckStrengths(coefficients, static_cast<Eigen::Index>(num_modes()), "coefficients");
  const auto nc = static_cast<int>(coefficients.cols());
  const PaddedGrid g = plans_->NewGrid(geometry_, beta_, nc, FFTW_BACKWARD);
  Complex* const grid = g.buffer.get();
  // 1. Deconvolved modes into the zero-padded grid (mode l at cell l mod n2).
  ForEachMode(modes_, g.view.n2, g.view.plane, deconvolution_,
              [&](Eigen::Index row, std::size_t cell, double f) {
                for (int a = 0; a < nc; ++a)
                  grid[static_cast<std::size_t>(a) * g.view.cells + cell] =
                      f * coefficients(row, a);
              });
  // 2. g_m = sum_l b_l exp(+i 2 pi l m / n2): FFTW's backward transform.
  fftw_execute_dft(g.plan, AsFftw(grid), AsFftw(grid));
  // 3. Interpolate at each target with the kernel, in blocks of targets.
  return Interpolate(g.view, targets_, ResolveThreads(num_threads_));
}

Eigen::MatrixXcd Nufft2::Adjoint(const Eigen::MatrixXcd& values) const {
  CheckStrengths(values, targets_.cols(), "values (one row per target)");
  const auto nc = static_cast<int>(values.cols());
  const PaddedGrid g = plans_->NewGrid(geometry_, beta_, nc, FFTW_FORWARD);
  Complex* const grid = g.buffer.get();
  // Execute's steps transposed, in reverse: 3. spread each target's values with
  // the kernel; 2. b_l = sum_m g_m exp(-i 2 pi l m / n2), FFTW's forward
  // transform; 1. read the modes' cells, times the (real) deconvolution.
  SpreadPoints(grid, g.view, targets_, values, ResolveThreads(num_threads_));
  fftw_execute_dft(g.plan, AsFftw(grid), AsFftw(grid));
  Eigen::MatrixXcd out(static_cast<Eigen::Index>(num_modes()), nc);
  ForEachMode(modes_, g.view.n2, g.view.plane, deconvolution_,
              [&](Eigen::Index row, std::size_t cell, double f) {
                for (int a = 0; a < nc; ++a)
                  out(row, a) = f * grid[static_cast<std::size_t>(a) * g.view.cells + cell];
              });
  return out;
}

// ---- Type 3 ----------------------------------------------------------------

NufftGeometry Nufft3::GeometryFor(const Eigen::Matrix3Xd& points, const Eigen::Matrix3Xd& targets,
                                  double tolerance) {
  CheckTolerance(tolerance);
  NufftGeometry g;
  g.kernel_width = WidthFor(tolerance);
  for (int d = 0; d < 3; ++d) {
    const Range x = RangeOf(points, d), s = RangeOf(targets, d);
    // Dropping exp(i s' x') costs at most |s' x'| <= X S relative to sum |c_j|.
    if (x.half_width * s.half_width <= 1e-3 * tolerance) continue;
    ++g.active_dims;
    const double h = kPi / (kUpsampling * s.half_width);
    const int n = 2 * static_cast<int>(std::ceil(x.half_width / h + 0.5 * g.kernel_width + 1.0));
    g.spread_size[static_cast<std::size_t>(d)] = n;
    g.fft_size[static_cast<std::size_t>(d)] =
        NextSmooth(static_cast<int>(std::ceil(kUpsampling * n)));
  }
  return g;
}

Nufft3::Nufft3(const Eigen::Matrix3Xd& points, const Eigen::Matrix3Xd& targets,
               const NufftOptions& options)
    : geometry_(GeometryFor(points, targets, options.tolerance)),
      num_threads_(options.num_threads) {
  const int w = geometry_.kernel_width;
  beta_ = 2.30 * w;  // as in Nufft2
  const KernelTransform phi_hat(beta_, w);

  Eigen::Vector3d cx = Eigen::Vector3d::Zero(), cs = Eigen::Vector3d::Zero();
  for (int d = 0; d < 3; ++d) {
    Dim& dim = dims_[static_cast<std::size_t>(d)];
    const Range x = RangeOf(points, d), s = RangeOf(targets, d);
    dim.centre_x = cx[d] = x.centre;
    dim.centre_s = cs[d] = s.centre;
    dim.n = geometry_.spread_size[static_cast<std::size_t>(d)];
    dim.active = dim.n > 1;
    if (dim.active) dim.h = kPi / (kUpsampling * s.half_width);
  }
  points_ = points.colwise() - cx;
  // Centred targets; after the target factors they become the type-2 stage's.
  Eigen::Matrix3Xd centred = targets.colwise() - cs;

  // exp(i s . x) = exp(i s . C) exp(i D . x') exp(i s' . x').
  point_phase_.resize(points_.cols());
  for (Eigen::Index j = 0; j < points_.cols(); ++j) {
    const double p = cs.dot(points_.col(j));
    point_phase_[j] = Complex(std::cos(p), std::sin(p));
  }
  // Per target: exp(i s . C) prod_d h_d / psi_hat_d(s'_d), psi_hat = alpha phi_hat(alpha xi).
  target_factor_.resize(centred.cols());
  const auto m = static_cast<std::ptrdiff_t>(centred.cols());
#pragma omp parallel for num_threads(ResolveThreads(num_threads_)) schedule(static)
  for (std::ptrdiff_t k = 0; k < m; ++k) {
    double scale = 1.0;
    for (int d = 0; d < 3; ++d) {
      const Dim& dim = dims_[static_cast<std::size_t>(d)];
      if (!dim.active) continue;
      const double alpha = 0.5 * w * dim.h;
      scale *= dim.h / (alpha * phi_hat(alpha * centred(d, k)));
    }
    const double p = targets.col(k).dot(cx);
    target_factor_[k] = scale * Complex(std::cos(p), std::sin(p));
  }
  // Internally the trivial dimensions come first, so the innermost (contiguous)
  // grid loop always runs over an active dimension: planar arrays run as (x, y).
  std::array<int, 3> order{0, 1, 2};
  std::stable_partition(order.begin(), order.end(),
                        [&](int d) { return !dims_[static_cast<std::size_t>(d)].active; });
  // Stage 3: the spread grid (cell i <-> l = i - n/2) summed at s' h (radians
  // per cell) by a type-2 transform; its targets are built in the centred
  // matrix, so a dense grid holds one copy of them (rows permuted in place).
  const std::array<Dim, 3> dims = dims_;
  const Eigen::Matrix3Xd p = points_;
  for (int d = 0; d < 3; ++d) centred.row(d) *= dims[static_cast<std::size_t>(d)].h;
  std::array<int, 3> modes{};
  std::array<int, 3> at{0, 1, 2};  // at[d]: the row now holding dimension d
  for (int i = 0; i < 3; ++i) {
    const auto o = static_cast<std::size_t>(order[static_cast<std::size_t>(i)]);
    dims_[static_cast<std::size_t>(i)] = dims[o];
    modes[static_cast<std::size_t>(i)] = dims[o].n;
    points_.row(i) = p.row(static_cast<Eigen::Index>(o));
    const int from = at[o];
    if (from != i) {
      centred.row(i).swap(centred.row(from));
      for (int& r : at) {
        if (r == i) r = from;
      }
      at[o] = i;
    }
  }
  grid_sum_ = std::make_unique<const Nufft2>(modes, std::move(centred), options);
}

Eigen::Matrix3Xd Nufft3::GridCoordinates() const {
  // Cell l + n/2 in each dimension: the grid was sized so that no kernel reaches
  // past its edge (the modulo in KernelWeights never wraps).
  Eigen::Matrix3Xd u(3, points_.cols());
  for (int d = 0; d < 3; ++d) {
    const Dim& dim = dims_[static_cast<std::size_t>(d)];
    for (Eigen::Index j = 0; j < points_.cols(); ++j) u(d, j) = points_(d, j) / dim.h + dim.n / 2;
  }
  return u;
}

Eigen::MatrixXcd Nufft3::Execute(const Eigen::MatrixXcd& strengths) const {
  CheckStrengths(strengths, points_.cols(), "strengths (one row per point)");
  const auto nc = static_cast<int>(strengths.cols());
  const std::array<int, 3> n{dims_[0].n, dims_[1].n, dims_[2].n};
  const auto plane = static_cast<std::size_t>(n[1]) * static_cast<std::size_t>(n[2]);
  const std::size_t cells = static_cast<std::size_t>(n[0]) * plane;
  Eigen::MatrixXcd grid = Eigen::MatrixXcd::Zero(static_cast<Eigen::Index>(cells), nc);
  // Spread c_j exp(i D . x'_j) onto the grid.
  Eigen::MatrixXcd phased(points_.cols(), nc);
  for (int c = 0; c < nc; ++c) phased.col(c) = strengths.col(c).cwiseProduct(point_phase_);
  const GridView view{grid.data(), n, plane, cells, nc, beta_, geometry_.kernel_width};
  SpreadPoints(grid.data(), view, GridCoordinates(), phased, ResolveThreads(num_threads_));
  Eigen::MatrixXcd out = grid_sum_->Execute(grid);
  for (int a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(target_factor_);
  return out;
}

Eigen::MatrixXcd Nufft3::Adjoint(const Eigen::MatrixXcd& values) const {
  CheckStrengths(values, target_factor_.size(), "values (one row per target)");
  const auto nc = static_cast<int>(values.cols());
  const std::array<int, 3> n{dims_[0].n, dims_[1].n, dims_[2].n};
  const auto plane = static_cast<std::size_t>(n[1]) * static_cast<std::size_t>(n[2]);
  const std::size_t cells = static_cast<std::size_t>(n[0]) * plane;
  // Execute's steps transposed, in reverse.
  Eigen::MatrixXcd v(values.rows(), nc);
  for (int a = 0; a < nc; ++a) v.col(a) = values.col(a).cwiseProduct(target_factor_.conjugate());
  const Eigen::MatrixXcd grid = grid_sum_->Adjoint(v);
  const GridView view{grid.data(), n, plane, cells, nc, beta_, geometry_.kernel_width};
  Eigen::MatrixXcd out = Interpolate(view, GridCoordinates(), ResolveThreads(num_threads_));
  for (int a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(point_phase_.conjugate());
  return out;
}

}  // namespace lobecast
