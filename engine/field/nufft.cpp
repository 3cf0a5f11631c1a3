// Type-2 NUFFT with the exponential-of-semicircle kernel (nufft.h).
#include "engine/field/nufft.h"

#include <algorithm>
#include <cmath>
#include <memory>
#include <mutex>
#include <new>
#include <sstream>
#include <utility>

#include <fftw3.h>

#include "engine/constants.h"
#include "engine/error.h"
#include "engine/field/nufft_grid.h"
#include "engine/threads.h"

namespace lobecast {

using namespace nufft_grid;  // internal helpers of the NUFFTs (nufft_grid.h)

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
    GridView view = GridView::Of(nullptr, g.fft_size, nc, beta, g.kernel_width);
    const std::size_t size = view.cells * static_cast<std::size_t>(nc);
    FftwBuffer buffer = AllocateFftw(size);
    Complex* const grid = buffer.get();
    const fftw_plan plan = Get(g.fft_size, nc, sign, grid);
    std::fill(grid, grid + size, Complex(0.0));
    view.grid = grid;
    return PaddedGrid{std::move(buffer), plan, view};
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
  ToGridUnits(targets);
  targets_ = std::move(targets);
}

void Nufft2::ToGridUnits(Eigen::Matrix3Xd& targets) const {
  // Reduced to one period first so large t keep their digits.
  for (Eigen::Index k = 0; k < targets.cols(); ++k) {
    for (int d = 0; d < 3; ++d) {
      const int n2 = geometry_.fft_size[static_cast<std::size_t>(d)];
      const double t = targets(d, k);
      targets(d, k) =
          n2 == 1 ? 0.0 : (t - 2.0 * kPi * std::nearbyint(t / (2.0 * kPi))) * n2 / (2.0 * kPi);
    }
  }
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

struct Nufft2::Prepared {
  FftwBuffer buffer;
  GridView view;
};

Eigen::MatrixXcd Nufft2::Execute(const Eigen::MatrixXcd& coefficients) const {
  // Steps 1 and 2 (Prepare), then 3: interpolate at each target with the kernel, in
  // blocks of targets.
  return Interpolate(Prepare(coefficients)->view, targets_, ResolveThreads(num_threads_));
}

std::shared_ptr<const Nufft2::Prepared> Nufft2::Prepare(
    const Eigen::MatrixXcd& coefficients) const {
  CheckStrengths(coefficients, static_cast<Eigen::Index>(num_modes()), "coefficients");
  const auto nc = static_cast<int>(coefficients.cols());
  PaddedGrid g = plans_->NewGrid(geometry_, beta_, nc, FFTW_BACKWARD);
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
  auto p = std::make_shared<Prepared>();
  p->buffer = std::move(g.buffer);
  p->view = g.view;
  return p;
}

Eigen::MatrixXcd Nufft2::InterpolateAt(const Prepared& prepared, Eigen::Matrix3Xd targets) const {
  ToGridUnits(targets);
  const int threads = targets.cols() < 1024 ? 1 : ResolveThreads(num_threads_);
  return Interpolate(prepared.view, targets, threads);
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

}  // namespace lobecast
