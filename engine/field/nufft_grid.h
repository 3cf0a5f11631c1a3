// Internal to engine/field: what the type-2 and type-3 NUFFTs (nufft.cpp,
// nufft3.cpp) share: FFTW ownership, the exponential-of-semicircle kernel and its
// Fourier transform, grid sizes, and spreading to and interpolation from a grid
// (Barnett, Magland and af Klinteberg, SIAM J. Sci. Comput. 41, 2019). Not a
// public header.
#pragma once

#include <array>
#include <complex>
#include <cstddef>
#include <memory>
#include <mutex>
#include <type_traits>
#include <vector>

#include <fftw3.h>
#include <Eigen/Core>

namespace lobecast::nufft_grid {

using Complex = std::complex<double>;

inline constexpr double kUpsampling = 2.0;  // sigma, for both the spread and the FFT grid
inline constexpr int kMaxWidth = 16;

// FFTW's planner (fftw_plan_* and fftw_destroy_plan) is not thread-safe;
// execution is, also of one plan on several arrays at once (FFTW 3 manual,
// sec. 5.4 "Thread safety" and 4.6 "New-array Execute Functions").
std::mutex& FftwPlannerMutex();

// An fftw_malloc'd array (SIMD-aligned, so every buffer has the alignment the
// plans were made for), freed by fftw_free.
struct FftwFree {
  void operator()(Complex* p) const { fftw_free(p); }
};
using FftwBuffer = std::unique_ptr<Complex[], FftwFree>;
FftwBuffer AllocateFftw(std::size_t n);
inline fftw_complex* AsFftw(Complex* p) { return reinterpret_cast<fftw_complex*>(p); }

struct FftwPlanDestroy {
  void operator()(fftw_plan p) const;
};
using FftwPlan = std::unique_ptr<std::remove_pointer_t<fftw_plan>, FftwPlanDestroy>;

// Kernel width (cells) for a tolerance: ceil(log10(1/eps)) + 1 at sigma = 2.
int WidthFor(double tolerance);
// Smallest even n >= m whose only prime factors are 2, 3 and 5 (fast for FFTW).
int NextSmooth(int m);

// phi_hat(xi) = int_{-1}^{1} phi(z) cos(xi z) dz of the kernel
// phi(z) = exp(beta (sqrt(1 - z^2) - 1)), by Gauss-Legendre quadrature on the
// half interval (phi is even), as Barnett et al. 2019 do (sec. 3.1.1).
class KernelTransform {
 public:
  KernelTransform(double beta, int width);
  double operator()(double xi) const;

 private:
  std::vector<double> nodes_, weights_;
};

struct Range {
  double centre, half_width;
};
// Centre and half width of row d of m (0, 0 for no columns).
Range RangeOf(const Eigen::Matrix3Xd& m, int d);

// Rejects a tolerance outside 1e-14 to 1e-1, naming it.
void CheckTolerance(double tolerance);
// Rejects a matrix without `rows` rows or with other than 1 to 3 columns.
void CheckStrengths(const Eigen::MatrixXcd& c, Eigen::Index rows, const char* what);

// A grid of n2 cells per dimension and nc components, as spreading and
// interpolation address it.
struct GridView {
  const Complex* grid;
  std::array<int, 3> n2;
  std::size_t plane, cells;  // n2[1] n2[2], and all cells of one component
  int nc;                    // components
  double beta;
  int w;

  // The view of a grid of n2 cells (plane and cells worked out); grid may be set later.
  static GridView Of(const Complex* grid, const std::array<int, 3>& n2, int nc, double beta, int w);
};

// grid(cells around point j) += kernel weights * values(j, :) for every point j
// (grid units in coords); the result does not depend on the thread count.
void SpreadPoints(Complex* grid, const GridView& g, const Eigen::Matrix3Xd& coords,
                  const Eigen::MatrixXcd& values, int threads);
// The transpose: out(k, :) = the kernel-weighted grid around every column k of
// coords (grid units), in parallel blocks.
Eigen::MatrixXcd Interpolate(const GridView& g, const Eigen::Matrix3Xd& coords, int threads);

}  // namespace lobecast::nufft_grid
