// Type-3 NUFFT: spreading, then a type-2 stage over the spread grid (nufft.h).
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
  GridView view = GridView::Of(nullptr, {dims_[0].n, dims_[1].n, dims_[2].n}, nc, beta_,
                               geometry_.kernel_width);
  Eigen::MatrixXcd grid = Eigen::MatrixXcd::Zero(static_cast<Eigen::Index>(view.cells), nc);
  view.grid = grid.data();
  // Spread c_j exp(i D . x'_j) onto the grid.
  Eigen::MatrixXcd phased(points_.cols(), nc);
  for (int c = 0; c < nc; ++c) phased.col(c) = strengths.col(c).cwiseProduct(point_phase_);
  SpreadPoints(grid.data(), view, GridCoordinates(), phased, ResolveThreads(num_threads_));
  Eigen::MatrixXcd out = grid_sum_->Execute(grid);
  for (int a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(target_factor_);
  return out;
}

Eigen::MatrixXcd Nufft3::Adjoint(const Eigen::MatrixXcd& values) const {
  CheckStrengths(values, target_factor_.size(), "values (one row per target)");
  const auto nc = static_cast<int>(values.cols());
  // Execute's steps transposed, in reverse.
  Eigen::MatrixXcd v(values.rows(), nc);
  for (int a = 0; a < nc; ++a) v.col(a) = values.col(a).cwiseProduct(target_factor_.conjugate());
  const Eigen::MatrixXcd grid = grid_sum_->Adjoint(v);
  GridView view = GridView::Of(nullptr, {dims_[0].n, dims_[1].n, dims_[2].n}, nc, beta_,
                               geometry_.kernel_width);
  view.grid = grid.data();
  Eigen::MatrixXcd out = Interpolate(view, GridCoordinates(), ResolveThreads(num_threads_));
  for (int a = 0; a < nc; ++a) out.col(a) = out.col(a).cwiseProduct(point_phase_.conjugate());
  return out;
}

}  // namespace lobecast
