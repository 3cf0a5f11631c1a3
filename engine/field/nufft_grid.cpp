// What the NUFFTs share: FFTW ownership, kernel, spreading, interpolation (nufft_grid.h).
#include "engine/field/nufft_grid.h"

#include <algorithm>
#include <cmath>
#include <new>
#include <sstream>

#include <omp.h>

#include "engine/error.h"
#include "engine/field/exp.h"
#include "engine/field/kernel_clones.h"
#include "engine/field/sincos.h"
#include "engine/quadrature.h"

namespace lobecast::nufft_grid {

std::mutex& FftwPlannerMutex() {
  static std::mutex m;
  return m;
}

FftwBuffer AllocateFftw(std::size_t n) {
  auto* p = static_cast<Complex*>(fftw_malloc(sizeof(Complex) * n));
  if (!p) throw std::bad_alloc();
  return FftwBuffer(p);
}

void FftwPlanDestroy::operator()(fftw_plan p) const {
  const std::lock_guard<std::mutex> lock(FftwPlannerMutex());
  fftw_destroy_plan(p);
}

int WidthFor(double tolerance) {
  // Barnett et al. 2019, sec. 4.1: w = ceil(log10(1/eps)) + 1 at sigma = 2.
  const int w = static_cast<int>(std::ceil(std::log10(1.0 / tolerance))) + 1;
  return std::clamp(w, 2, kMaxWidth);
}

int NextSmooth(int m) {
  for (int n = std::max(2, m + (m & 1));; n += 2) {
    int r = n;
    for (int p : {2, 3, 5}) {
      while (r % p == 0) r /= p;
    }
    if (r == 1) return n;
  }
}

namespace {

// The ES kernel phi(z) = exp(beta (sqrt(1 - z^2) - 1)), zero outside |z| <= 1.
inline double Kernel(double beta, double z) {
  const double q = 1.0 - z * z;
  return q > 0 ? std::exp(beta * (std::sqrt(q) - 1.0)) : 0.0;
}

}  // namespace

KernelTransform::KernelTransform(double beta, int width) {
  // 2 (w + 6) nodes: the quadrature error then stays three or more orders below
  // the kernel's own tolerance for every width (checked against 600 nodes while
  // writing this; the sqrt endpoint singularity caps convergence at the e^-beta
  // level, which is the tolerance itself). phi is even: the nodes z > 0 carry
  // both halves.
  const QuadratureRule rule = GaussLegendre(2 * (width + 6));
  const std::size_t half = rule.nodes.size() / 2;
  for (std::size_t i = rule.nodes.size(); i-- > half;) {
    const double z = rule.nodes[i];
    nodes_.push_back(z);
    weights_.push_back(2.0 * rule.weights[i] * Kernel(beta, z));
  }
}

double KernelTransform::operator()(double xi) const {
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

Range RangeOf(const Eigen::Matrix3Xd& m, int d) {
  if (m.cols() == 0) return {0.0, 0.0};
  const double lo = m.row(d).minCoeff(), hi = m.row(d).maxCoeff();
  return {0.5 * (lo + hi), 0.5 * (hi - lo)};
}

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

GridView GridView::Of(const Complex* grid, const std::array<int, 3>& n2, int nc, double beta,
                      int w) {
  const std::size_t plane = static_cast<std::size_t>(n2[1]) * static_cast<std::size_t>(n2[2]);
  return GridView{grid, n2, plane, static_cast<std::size_t>(n2[0]) * plane, nc, beta, w};
}

namespace {

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

}  // namespace

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

}  // namespace lobecast::nufft_grid
