// Type-3 non-uniform fast Fourier transform in one to three dimensions,
//
//   f_k = sum_j c_j exp(+i s_k . x_j),   j < N points x_j,  k < M targets s_k,
//
// for several strength vectors c at once (the far field needs one or three: the
// moment components), to a requested tolerance. It follows the type-3 scheme of
// A. H. Barnett, J. Magland and L. af Klinteberg, "A parallel nonuniform fast
// Fourier transform library based on an 'exponential of semicircle' kernel",
// SIAM J. Sci. Comput. 41(5), C479-C504, 2019, sec. 3.3 and 4:
//  1. centre points and targets (pre- and post-phase factors);
//  2. spread the points onto a uniform grid of spacing h with the kernel
//     psi(t) = phi(t / alpha), phi(z) = exp(beta (sqrt(1 - z^2) - 1)) on |z| <= 1,
//     whose Fourier transform is negligible beyond the targets' band;
//  3. evaluate the grid's Fourier sum at the targets with a type-2 NUFFT
//     (deconvolve, zero-pad by 2, FFTW, interpolate with the same kernel);
//  4. divide by the kernel's Fourier transform at each target (by Gauss-Legendre
//     quadrature of phi, as in the paper).
// Kernel width w = ceil(log10(1/tolerance)) + 1 grid points, beta = 2.30 w,
// upsampling 2: the paper's choices (sec. 4.1 and its eq. 4.2 error model).
// The error in each f_k is about tolerance * sum_j |c_j|; tests/nufft_test.cpp
// checks this against direct sums.
//
// A dimension in which all points (or all targets) share one coordinate is
// exact after centring and costs nothing, so planar and linear arrays run as 2-D
// and 1-D transforms.
#pragma once

#include <array>
#include <complex>
#include <cstddef>
#include <memory>
#include <vector>

#include <Eigen/Core>

namespace lobecast {

namespace nufft_grid {
class KernelTransform;  // nufft_grid.h
}  // namespace nufft_grid

struct NufftOptions {
  // Requested accuracy, relative to sum_j |c_j|; 1e-14 to 1e-1.
  double tolerance = 1e-9;
  // OpenMP threads for the interpolation and phase steps; 0: OpenMP default.
  // The result does not depend on it.
  int num_threads = 0;
};

// f_k = sum_j c_j exp(+i s_k . x_j) for points and targets fixed at construction:
// Nufft3 for any points, LatticeSum (lattice.h) for points on a lattice. Both
// calls are const and thread-safe.
class PointSum {
 public:
  virtual ~PointSum() = default;
  // strengths: N x C (C = 1 to 3); returns K x C, each within about
  // tolerance * sum_j |c_j| (plus representation_error() * sum_j |c_j|).
  virtual Eigen::MatrixXcd Execute(const Eigen::MatrixXcd& strengths) const = 0;
  // The adjoint, g_j = sum_k v_k exp(-i s_k . x_j): values K x C (C = 1 to 3),
  // returns N x C. It is the exact adjoint of Execute as computed (the same
  // kernel, grids and factors, transposed and in reverse order), so
  // <Execute(c), v> = <c, Adjoint(v)> to rounding; against the exact sum each
  // output is within about tolerance * sum_k |v_k| (plus representation_error()
  // * sum_k |v_k|), the forward bound with the roles swapped.
  virtual Eigen::MatrixXcd Adjoint(const Eigen::MatrixXcd& values) const = 0;
  // An error beyond the kernel's, relative to sum_j |c_j| (0: none).
  virtual double representation_error() const { return 0.0; }

  // Execute in two halves, for many small sets of targets at one set of strengths
  // (off-grid searches): Prepare makes the strengths' transformed grid once
  // (O(grid log grid)); ExecuteAt sums it at any targets (3 x K) within the box of
  // the constructor's targets, O(w^d) a target, with Execute's error. A target's
  // value does not depend on the others of its call or on threads.
  struct Prepared {
    virtual ~Prepared() = default;
  };
  virtual std::shared_ptr<const Prepared> Prepare(const Eigen::MatrixXcd& strengths) const = 0;
  // prepared: from this object's Prepare.
  virtual Eigen::MatrixXcd ExecuteAt(const Prepared& prepared,
                                     const Eigen::Matrix3Xd& targets) const = 0;
};

// The sizes a transform will use, computable without building it (cost models).
struct NufftGeometry {
  int kernel_width = 0;                     // w, grid points per active dimension
  int active_dims = 0;                      // dimensions that need a grid
  std::array<int, 3> spread_size{1, 1, 1};  // grid the points are spread onto
  std::array<int, 3> fft_size{1, 1, 1};     // zero-padded FFT grid
  double fft_points() const { return static_cast<double>(fft_size[0]) * fft_size[1] * fft_size[2]; }
  double kernel_points() const;  // w^active_dims
};

// Type-2 NUFFT (uniform modes to non-uniform targets) in one to three dimensions,
//
//   f_k = sum_l c_l exp(+i l . t_k),   l_d = -floor(M_d / 2) .. M_d - 1 - floor(M_d / 2),
//
// the same scheme's second stage (Barnett et al. 2019, sec. 2): divide the modes
// by the kernel's Fourier transform, zero-pad by 2, FFTW, interpolate with the
// kernel at t_k (radians per mode step; the sum is 2 pi periodic, and t is
// reduced to one period first, which keeps 1e-9 up to |t| ~ 1e6 rad: as many
// digits as a double phase of that size has anyway).
// Error about tolerance * sum_l |c_l|. A dimension with M_d = 1 costs nothing.
// Nufft3 runs one as its last stage; arrays on a regular lattice use it directly
// (engine/field/lattice.h).
class Nufft2 {
 public:
  // modes: M_d >= 1 per dimension; targets: 3 x K.
  Nufft2(const std::array<int, 3>& modes, Eigen::Matrix3Xd targets,
         const NufftOptions& options = {});
  ~Nufft2();
  static NufftGeometry GeometryFor(const std::array<int, 3>& modes, double tolerance);

  // coefficients: (M_0 M_1 M_2) x C, C = 1 to 3, mode (l_0, l_1, l_2) in row
  // ((i_0 M_1) + i_1) M_2 + i_2 with i_d = l_d + floor(M_d / 2); returns K x C.
  // Thread-safe: concurrent calls share the FFTW plans, each with its own grid.
  Eigen::MatrixXcd Execute(const Eigen::MatrixXcd& coefficients) const;
  // The adjoint, a type-1 sum c_l = sum_k v_k exp(-i l . t_k) computed as the
  // transpose of Execute (spread, FFTW's forward transform, deconvolve): values
  // K x C, returns (M_0 M_1 M_2) x C in Execute's row order. Thread-safe.
  Eigen::MatrixXcd Adjoint(const Eigen::MatrixXcd& values) const;

  // Execute in two halves, for many small sets of targets at one coefficient set
  // (off-grid searches): Prepare makes the deconvolved, transformed grid (steps 1
  // and 2, O(grid log grid)); InterpolateAt reads it at any targets (3 x K, as
  // the constructor's; step 3, O(w^d) a target). A target's value does not depend
  // on the others of its call or on threads (one thread below 1024 targets).
  struct Prepared;  // nufft.cpp
  std::shared_ptr<const Prepared> Prepare(const Eigen::MatrixXcd& coefficients) const;
  Eigen::MatrixXcd InterpolateAt(const Prepared& prepared, Eigen::Matrix3Xd targets) const;

  const NufftGeometry& geometry() const { return geometry_; }
  std::size_t num_modes() const;

 private:
  struct Plans;  // FFTW plans, made once per component count (nufft.cpp)
  // Targets in grid units (in place), reduced to one period first.
  void ToGridUnits(Eigen::Matrix3Xd& targets) const;

  NufftGeometry geometry_;
  std::array<int, 3> modes_{1, 1, 1};
  double beta_ = 0;
  int num_threads_ = 0;
  Eigen::Matrix3Xd targets_;  // in grid units, t n2 / (2 pi), t reduced to [-pi, pi]
  std::array<std::vector<double>, 3> deconvolution_;  // h2 / psi2_hat(l), per mode
  std::unique_ptr<Plans> plans_;
};

class Nufft3 : public PointSum {
 public:
  // points_m: 3 x N, targets: 3 x M (any units with s . x in radians).
  Nufft3(const Eigen::Matrix3Xd& points, const Eigen::Matrix3Xd& targets,
         const NufftOptions& options = {});
  static NufftGeometry GeometryFor(const Eigen::Matrix3Xd& points, const Eigen::Matrix3Xd& targets,
                                   double tolerance);

  // strengths: N x C with C = 1, 2 or 3; returns M x C.
  Eigen::MatrixXcd Execute(const Eigen::MatrixXcd& strengths) const override;
  // values: M x C; returns N x C (PointSum::Adjoint).
  Eigen::MatrixXcd Adjoint(const Eigen::MatrixXcd& values) const override;
  // PointSum::Prepare and ExecuteAt: targets within the box of the constructor's.
  std::shared_ptr<const Prepared> Prepare(const Eigen::MatrixXcd& strengths) const override;
  Eigen::MatrixXcd ExecuteAt(const Prepared& prepared,
                             const Eigen::Matrix3Xd& targets) const override;

  const NufftGeometry& geometry() const { return geometry_; }

 private:
  struct Dim {
    bool active = false;
    double centre_x = 0, centre_s = 0;
    double half_s = 0;  // the constructor's targets span centre_s +- half_s
    double h = 1;       // spread grid spacing (units of x)
    int n = 1;          // spread grid size
  };
  Eigen::Matrix3Xd GridCoordinates() const;  // the points on the spread grid, cell units
  // The spread grid of c_j exp(i D . x'_j) (cells x C): Execute's first stage.
  Eigen::MatrixXcd SpreadGrid(const Eigen::MatrixXcd& strengths) const;
  // Per target: exp(i s . C) prod_d h_d / psi_hat_d(s'_d) (s in the caller's axes).
  std::complex<double> TargetFactor(const Eigen::Vector3d& s) const;
  // The type-2 stage's targets: s' h per internal dimension (s in the caller's axes).
  Eigen::Matrix3Xd StageTwoTargets(const Eigen::Matrix3Xd& targets) const;

  NufftGeometry geometry_;
  std::array<Dim, 3> dims_;           // internal order: the trivial dimensions first
  std::array<int, 3> axis_{0, 1, 2};  // axis_[i]: the caller's dimension in internal slot i
  double beta_ = 0;
  std::shared_ptr<const nufft_grid::KernelTransform> phi_hat_;  // the kernel's transform
  int num_threads_ = 0;
  Eigen::Matrix3Xd points_;                 // centred
  Eigen::VectorXcd point_phase_;            // exp(i D . x'), D the targets' centre
  Eigen::VectorXcd target_factor_;          // exp(i s . C) h^dims / psi_hat(s')
  std::unique_ptr<const Nufft2> grid_sum_;  // stage 3: the spread grid's Fourier sum
};

}  // namespace lobecast
