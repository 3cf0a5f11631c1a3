// Points on a regular lattice: detection, and their exponential sums by a
// type-2 NUFFT (nufft.h) instead of a type-3 one.
//
// Points x_j = o + (a_0 n_0, a_1 n_1, a_2 n_2), integers 0 <= n_d < M_d, form an
// axis-aligned rectangular lattice (a triangular lattice whose rows are offset by
// half a pitch is a rectangular lattice of half the pitch, half filled). Then
//
//   sum_j c_j exp(i s . x_j) = exp(i s . o) sum_n C_n exp(i sum_d n_d (s_d a_d)),
//
// a type-2 sum over the sites, C_n the strengths summed per site, at targets
// t_d = s_d a_d (radians per pitch). Compared with the type-3 path there is no
// spreading and no per-target kernel transform, and the FFT grid depends on the
// site counts M_d only, not on pitch times |s|: sparse lattices (pitch above
// half a wavelength) cost no more than dense ones. A dimension with fewer sites
// than the kernel is wide (a plane and its image over ground: two) is summed
// layer by layer, one lower-dimensional transform per layer (at most 16 layers).
#pragma once

#include <array>
#include <cstddef>
#include <memory>
#include <optional>
#include <vector>

#include <Eigen/Core>

#include "engine/field/nufft.h"

namespace lobecast {

struct AxisLattice {
  Eigen::Vector3d origin = Eigen::Vector3d::Zero();  // site n = (0, 0, 0)
  Eigen::Vector3d pitch = Eigen::Vector3d::Zero();   // a_d; 0 where sites[d] == 1
  std::array<int, 3> sites{1, 1, 1};                 // M_d
  std::vector<std::array<int, 3>> index;             // n of each point
  double max_offset = 0;                             // largest |x_j - site|, in the points' units
  double num_sites() const { return static_cast<double>(sites[0]) * sites[1] * sites[2]; }
};

// The lattice of the points (3 x N), or std::nullopt when some point lies
// farther than max_offset along an axis (sqrt(3) max_offset in all) from every
// candidate lattice with at most max_sites sites, or a coordinate is not finite.
// max_offset on the result is the actual largest distance. Pitches are searched as the smallest gap
// between distinct coordinates divided by 1 to 8, so thinned and offset-row lattices are found.
std::optional<AxisLattice> FindAxisLattice(const Eigen::Matrix3Xd& points, double max_offset,
                                           double max_sites);

// Sizes of a LatticeSum, computable without building it (cost models).
struct LatticeShape {
  int layers = 1;           // lower-dimensional transforms per execution
  NufftGeometry per_layer;  // each layer's type-2 transform
};

class LatticeSum : public PointSum {
 public:
  // targets: 3 x K (s, with s . x in radians).
  LatticeSum(const AxisLattice& lattice, const Eigen::Matrix3Xd& targets,
             const NufftOptions& options = {});
  static LatticeShape ShapeFor(const AxisLattice& lattice, double tolerance);

  // strengths: N x C (one row per point of the lattice), C = 1 to 3; K x C.
  Eigen::MatrixXcd Execute(const Eigen::MatrixXcd& strengths) const override;
  // values: K x C; returns N x C (PointSum::Adjoint; points on one site get the
  // same value).
  Eigen::MatrixXcd Adjoint(const Eigen::MatrixXcd& values) const override;
  // max_k |s_k| * max_offset: the phase error of placing points on their sites.
  double representation_error() const override { return representation_error_; }

  // PointSum::Prepare and ExecuteAt (Nufft2::Prepare per layer); placing the points on
  // their sites adds max_k |s_k| * max_offset of phase for these targets.
  std::shared_ptr<const Prepared> Prepare(const Eigen::MatrixXcd& strengths) const override;
  Eigen::MatrixXcd ExecuteAt(const Prepared& prepared,
                             const Eigen::Matrix3Xd& targets) const override;

  const LatticeShape& shape() const { return shape_; }

 private:
  // Throws unless m is rows x 1 to 3.
  void CheckRows(const Eigen::MatrixXcd& m, std::size_t rows, const char* what) const;
  // The strengths summed per site, one mode matrix per layer (in point order).
  std::vector<Eigen::MatrixXcd> LayerCoefficients(const Eigen::MatrixXcd& strengths) const;
  // exp(i sum over layered dimensions of t_d n_d) per target, n the layer's site.
  Eigen::VectorXcd LayerPhases(int layer) const;

  LatticeShape shape_;
  std::size_t num_points_ = 0;
  std::array<int, 3> order_{0, 1, 2};  // dimension d of the lattice in mode slot i
  std::array<int, 3> modes_{1, 1, 1};  // the layer transform's modes, per slot
  Eigen::Vector3d origin_ = Eigen::Vector3d::Zero();
  Eigen::Vector3d pitch_ = Eigen::Vector3d::Zero();
  std::vector<int> layered_;             // lattice dimensions summed layer by layer
  std::vector<int> layered_sites_;       // their site counts
  std::vector<int> point_layer_;         // per point
  std::vector<Eigen::Index> point_row_;  // per point: its mode row in the layer
  std::unique_ptr<const Nufft2> layer_sum_;
  Eigen::MatrixXd layer_targets_;   // (layered dims) x K: s_d a_d
  Eigen::VectorXcd target_factor_;  // exp(i s . o) exp(i sum_active t_d floor(M_d / 2))
  int num_threads_ = 0;
  double representation_error_ = 0;
};

}  // namespace lobecast
