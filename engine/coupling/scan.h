// Scan impedance of a phased array: the active impedance of every element as the
// beam is steered (engine/synthesis/steering.h), Z_act,m(r_hat0) = (Z I)_m / I_m with
// I_n = a_n exp(-j k r_hat0 . r_n), and its reflection coefficient against a
// reference impedance Z_r per element: the power-wave reflection
// Gamma = (Z - conj(Z_r)) / (Z + Z_r) (K. Kurokawa, "Power waves and the scattering
// matrix", IEEE Trans. MTT-13, 1965), which for a real Z_r is the usual one and for
// Z_r = conj(the element's impedance at one scan angle), a source conjugate-matched
// there, is 0 at that angle:
// the common way to show the mismatch that scanning adds, 1 - |Gamma|^2 the
// fraction of available power accepted. A mismatch that grows with scan angle (or an element whose
// reflection approaches 1: scan blindness) shows here before it shows on the range.
// Z holds the self reactances and losses on its diagonal (coupling.h); the
// amplitudes a_n are the array's own taper.
#pragma once

#include <vector>

#include <Eigen/Core>

#include "engine/coupling/coupling.h"
#include "engine/types.h"

namespace lobecast {

struct ScanImpedanceTable {
  std::vector<double> theta_rad, phi_rad;  // the scan directions (S)
  Eigen::MatrixXcd active_impedance_ohm;   // (S, N); NaN where a_n = 0
  Eigen::MatrixXcd reflection;             // (S, N) against the reference impedance
  Eigen::VectorXd accepted_w;              // (S) 1/2 I^H Re(Z) I: radiated + ohmic, per scan
};

// theta and phi of the same length; amplitudes and reference impedances one per
// dipole (amplitudes complex: a taper may carry phases of its own).
ScanImpedanceTable ScanImpedance(const Array& array, const Eigen::MatrixXcd& impedance_ohm,
                                 const Eigen::VectorXcd& amplitudes,
                                 const std::vector<double>& theta_rad,
                                 const std::vector<double>& phi_rad,
                                 const Eigen::VectorXcd& reference_impedance_ohm);

// The same table without the N x N matrix, for arrays above
// CouplingOptions::max_dipoles: each direction's Z I summed row by row
// (RadiatedPowerStreamed, engine/power/power_large.h), O(S N^2) time and O(N)
// memory. diagonal_ohm is what the circuit's Z adds on its diagonal beyond the
// radiation terms: j X_self + R_loss per dipole (finite).
ScanImpedanceTable ScanImpedanceStreamed(const Array& array, const Eigen::VectorXcd& diagonal_ohm,
                                         const Eigen::VectorXcd& amplitudes,
                                         const std::vector<double>& theta_rad,
                                         const std::vector<double>& phi_rad,
                                         const Eigen::VectorXcd& reference_impedance_ohm,
                                         int num_threads = 0);

}  // namespace lobecast
