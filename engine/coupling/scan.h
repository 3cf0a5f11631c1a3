// Scan impedance of a phased array: the active impedance of every element as the
// beam is steered (engine/synthesis/steering.h), Z_act,m(r_hat0) = (Z I)_m / I_m with
// I_n = a_n exp(-j k r_hat0 . r_n), and its reflection coefficient against a real
// reference impedance. A mismatch that grows with scan angle (or an element whose
// reflection approaches 1: scan blindness) shows here before it shows on the range.
// Z holds the self reactances and losses on its diagonal (coupling.h); the
// amplitudes a_n are the array's own taper.
#pragma once

#include <vector>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

struct ScanImpedanceTable {
  std::vector<double> theta_rad, phi_rad;  // the scan directions (S)
  Eigen::MatrixXcd active_impedance_ohm;   // (S, N); NaN where a_n = 0
  Eigen::MatrixXcd reflection;             // (S, N) against the reference impedance
  Eigen::VectorXd accepted_w;              // (S) 1/2 I^H Re(Z) I: radiated + ohmic, per scan
};

// theta and phi of the same length; amplitudes one per dipole (complex: a taper may
// carry phases of its own). Throws InvalidArgument for a non-positive reference
// impedance.
ScanImpedanceTable ScanImpedance(const Array& array, const Eigen::MatrixXcd& impedance_ohm,
                                 const Eigen::VectorXcd& amplitudes,
                                 const std::vector<double>& theta_rad,
                                 const std::vector<double>& phi_rad,
                                 double reference_impedance_ohm);

}  // namespace lobecast
