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

#include "engine/check.h"
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
  phi_hat_ = std::make_shared<const KernelTransform>(beta_, w);

  std::array<Dim, 3> dims;  // in the caller's order
  Eigen::Vector3d cx = Eigen::Vector3d::Zero(), cs = Eigen::Vector3d::Zero();
  for (int d = 0; d < 3; ++d) {
    Dim& dim = dims[static_cast<std::size_t>(d)];
    const Range x = RangeOf(points, d), s = RangeOf(targets, d);
    dim.centre_x = cx[d] = x.centre;
    dim.centre_s = cs[d] = s.centre;
    dim.half_s = s.half_width;
    dim.n = geometry_.spread_size[static_cast<std::size_t>(d)];
    dim.active = dim.n > 1;
    if (dim.active) dim.h = kPi / (kUpsampling * s.half_width);
  }
  const Eigen::Matrix3Xd centred = points.colwise() - cx;

  // exp(i s . x) = exp(i s . C) exp(i D . x') exp(i s' . x').
  point_phase_.resize(centred.cols());
  for (Eigen::Index j = 0; j < centred.cols(); ++j) {
    const double p = cs.dot(centred.col(j));
    point_phase_[j] = Complex(std::cos(p), std::sin(p));
  }
  // Internally the trivial dimensions come first, so the innermost (contiguous)
  // grid loop always runs over an active dimension: planar arrays run as (x, y).
  std::stable_partition(axis_.begin(), axis_.end(),
                        [&](int d) { return !dims[static_cast<std::size_t>(d)].active; });
  points_.resize(3, centred.cols());
  std::array<int, 3> modes{};
  for (std::size_t i = 0; i < 3; ++i) {
    const auto d = static_cast<std::size_t>(axis_[i]);
    dims_[i] = dims[d];
    modes[i] = dims[d].n;
    points_.row(static_cast<Eigen::Index>(i)) = centred.row(static_cast<Eigen::Index>(d));
  }
  target_factor_.resize(targets.cols());
  const auto m = static_cast<std::ptrdiff_t>(targets.cols());
#pragma omp parallel for num_threads(ResolveThreads(num_threads_)) schedule(static)
  for (std::ptrdiff_t k = 0; k < m; ++k) target_factor_[k] = TargetFactor(targets.col(k));
  // Stage 3: the spread grid (cell i <-> l = i - n/2) summed at s' h (radians per
  // cell) by a type-2 transform.
  grid_sum_ = std::make_unique<const Nufft2>(modes, StageTwoTargets(targets), options);
}

Complex Nufft3::TargetFactor(const Eigen::Vector3d& s) const {
  // prod_d h_d / psi_hat_d(s'_d), psi_hat = alpha phi_hat(alpha xi), in the caller's
  // order of dimensions.
  const int w = geometry_.kernel_width;
  const KernelTransform& phi_hat = *phi_hat_;
  std::array<const Dim*, 3> dim{};
  for (std::size_t i = 0; i < 3; ++i) dim[static_cast<std::size_t>(axis_[i])] = &dims_[i];
  double scale = 1.0;
  Eigen::Vector3d cx;
  for (std::size_t d = 0; d < 3; ++d) {
    cx[static_cast<Eigen::Index>(d)] = dim[d]->centre_x;
    if (!dim[d]->active) continue;
    const double alpha = 0.5 * w * dim[d]->h;
    scale *=
        dim[d]->h / (alpha * phi_hat(alpha * (s[static_cast<Eigen::Index>(d)] - dim[d]->centre_s)));
  }
  const double p = s.dot(cx);
  return scale * Complex(std::cos(p), std::sin(p));
}

Eigen::Matrix3Xd Nufft3::StageTwoTargets(const Eigen::Matrix3Xd& targets) const {
  Eigen::Matrix3Xd t(3, targets.cols());
  if (targets.cols() == 0) return t;  // no data: a row of it would offset a null pointer
  for (std::size_t i = 0; i < 3; ++i) {
    const Dim& dim = dims_[i];
    const auto r = static_cast<Eigen::Index>(i);
    t.row(r) = (targets.row(axis_[i]).array() - dim.centre_s) * dim.h;
  }
  return t;
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

Eigen::MatrixXcd Nufft3::SpreadGrid(const Eigen::MatrixXcd& strengths) const {
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
  return grid;
}

Eigen::MatrixXcd Nufft3::Execute(const Eigen::MatrixXcd& strengths) const {
  Eigen::MatrixXcd out = grid_sum_->Execute(SpreadGrid(strengths));
  for (Eigen::Index a = 0; a < out.cols(); ++a)
    out.col(a) = out.col(a).cwiseProduct(target_factor_);
  return out;
}

namespace {
struct Type3Prepared : PointSum::Prepared {
  const Nufft3* owner = nullptr;
  std::shared_ptr<const Nufft2::Prepared> grid;
};
}  // namespace

std::shared_ptr<const PointSum::Prepared> Nufft3::Prepare(const Eigen::MatrixXcd& strengths) const {
  auto p = std::make_shared<Type3Prepared>();
  p->owner = this;
  p->grid = grid_sum_->Prepare(SpreadGrid(strengths));
  return p;
}

Eigen::MatrixXcd Nufft3::ExecuteAt(const Prepared& prepared,
                                   const Eigen::Matrix3Xd& targets) const {
  const auto* p = dynamic_cast<const Type3Prepared*>(&prepared);
  if (!p || p->owner != this)
    throw InternalError("Nufft3::ExecuteAt: found another transform's prepared grid");
  // Outside the box of the constructor's targets the deconvolution grows and the grid
  // aliases: the error would exceed the bound unseen.
  for (Eigen::Index k = 0; k < targets.cols(); ++k) {
    for (std::size_t i = 0; i < 3; ++i) {
      const Dim& dim = dims_[i];
      const double off = std::abs(targets(axis_[i], k) - dim.centre_s);
      if (!(off <= dim.half_s * (1 + 1e-9) + 1e-12 * (std::abs(dim.centre_s) + dim.half_s)))
        throw InternalError("Nufft3::ExecuteAt: found a target outside the transform's box");
    }
  }
  Eigen::MatrixXcd out = grid_sum_->InterpolateAt(*p->grid, StageTwoTargets(targets));
  for (Eigen::Index k = 0; k < targets.cols(); ++k) out.row(k) *= TargetFactor(targets.col(k));
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
