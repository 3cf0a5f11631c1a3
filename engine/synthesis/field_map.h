// The field map of a few directions: the linear map from the dipoles' terminal
// currents to the far field there (CONVENTIONS §1), as a dense matrix. Synthesis
// works on these few rows (null directions, the beam direction, side-lobe samples)
// rather than on whole patterns.
#pragma once

#include <complex>
#include <cstddef>

#include <Eigen/Core>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/types.h"

namespace lobecast {

// One direction, radians (theta from +z, phi from +x toward +y).
struct Direction {
  double theta_rad = 0;
  double phi_rad = 0;
};

// A unit polarization vector p = p_theta theta_hat + p_phi phi_hat (|p_theta|^2 +
// |p_phi|^2 = 1); the field's component along it is p^H E = conj(p_theta) E_theta +
// conj(p_phi) E_phi.
struct PolarizationVector {
  Complex theta = 1.0;
  Complex phi = 0.0;
  static PolarizationVector Theta() { return {1.0, 0.0}; }
  static PolarizationVector Phi() { return {0.0, 1.0}; }
  // Ludwig's third definition (polarization.h): x_hat's co-polar unit vector at
  // azimuth phi is cos(phi) theta_hat - sin(phi) phi_hat; y_hat's sin(phi) theta_hat
  // + cos(phi) phi_hat.
  static PolarizationVector LudwigX(double phi_rad);
  static PolarizationVector LudwigY(double phi_rad);
  // IEEE Std 145-2013 with exp(+jwt) (CONVENTIONS §2): RHCP (theta_hat - j phi_hat)/sqrt2,
  // LHCP (theta_hat + j phi_hat)/sqrt2.
  static PolarizationVector RightCircular();
  static PolarizationVector LeftCircular();
  // Throws InvalidArgument unless finite with |p| = 1 within 1e-9.
  void Validate() const;
};

// Rows 0..K-1: rE_theta at the K directions per ampere of each dipole's current
// (V/A); rows K..2K-1: rE_phi. Zero rows where a ground zeroes the field. Exact
// (direct sums). For few directions (K <= kAdjointMapLimit) from 2K adjoint
// executions of one plan (A^H applied to unit fields, O(N K^2)); for more, column by
// column from one-dipole plans (O(N K)).
inline constexpr std::size_t kAdjointMapLimit = 16;
Eigen::MatrixXcd FieldMap(const Array& array, const Directions& directions);
// The adjoint route on a plan of the caller's (any method).
Eigen::MatrixXcd FieldMap(const FieldPlan& plan);

// p^H E at one direction per ampere of each dipole's current (a row, V/A).
Eigen::RowVectorXcd PolarizedFieldRow(const Array& array, const Direction& direction,
                                      const PolarizationVector& polarization);

}  // namespace lobecast
