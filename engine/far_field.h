// Exact far field of an array of elemental dipoles by direct superposition
// (CONVENTIONS §1; Balanis 4th ed. sec. 4.2 for one dipole):
//
//   rE(r_hat) = (j w mu0 / 4 pi) sum_n I_n Le_n [r_hat x (r_hat x u_n)] exp(+j k r_hat . r_n)
//
// reported as rE_theta, rE_phi in volts. The plan holds everything that does not
// depend on the currents (source moments, directions, projection vectors), so it
// can be executed for many current vectors (synthesis, tolerance studies).
#pragma once

#include <cstddef>
#include <vector>

#include <Eigen/Core>

#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

struct FarField {
  Eigen::VectorXcd e_theta;  // rE_theta per direction, V
  Eigen::VectorXcd e_phi;    // rE_phi per direction, V
  std::size_t size() const { return static_cast<std::size_t>(e_theta.size()); }
};

struct FieldOptions {
  // OpenMP threads across directions; 0 uses the OpenMP default. The result does
  // not depend on it: each direction's sum runs over the sources in a fixed order.
  int num_threads = 0;
};

class FieldPlan {
 public:
  // Throws InvalidArgument if the array is invalid (see Validate in types.h).
  FieldPlan(const Array& array, const Directions& directions, const FieldOptions& options = {});

  // currents_a: one complex peak current per dipole (images follow automatically).
  FarField Execute(const Eigen::VectorXcd& currents_a) const;
  // Fills a caller-owned FarField (resized as needed) for directions
  // [first, first + out.size()) -- lets callers process a grid in chunks.
  void ExecuteRange(const Eigen::VectorXcd& currents_a, std::size_t first, std::size_t count,
                    FarField& out) const;

  std::size_t num_dipoles() const { return num_dipoles_; }
  std::size_t num_sources() const { return static_cast<std::size_t>(source_pos_.cols()); }
  std::size_t num_directions() const { return static_cast<std::size_t>(k_r_hat_.cols()); }

 private:
  std::size_t num_dipoles_ = 0;
  Ground ground_ = Ground::kNone;
  double prefactor_ = 0.0;                    // w mu0 / (4 pi)
  Eigen::Matrix3Xd source_pos_;               // m
  Eigen::Matrix3Xd source_moment_;            // Le * u, m
  std::vector<int> source_dipole_;            // which dipole's current drives the source
  Eigen::Matrix3Xd k_r_hat_;                  // k r_hat, rad/m
  Eigen::Matrix3Xd theta_hat_;
  Eigen::Matrix3Xd phi_hat_;
  std::vector<unsigned char> zeroed_;         // 1 where the ground forces E = 0
  int num_threads_ = 0;
};

}  // namespace lobecast
