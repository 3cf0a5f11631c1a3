// Radiated power and active resistances for large arrays without the resistance
// matrix: the same closed forms as radiated_power.h and impedance.h (CONVENTIONS §1),
//
//   P = 1/2 Re(I^H R I),  R_act,m = Re(Z_act,m) = Re(((R + j X') I)_m / I_m),
//
// X' the mutual reactances (X'_mm = 0 in free space, m's own image over PEC: the
// active resistance does not need the self reactance). (R I)_m and (X' I)_m are
// summed row by row as the kernels are generated. O(N^2) time like the matrix route
// but O(N) memory, so 10^5 dipoles need megabytes instead of 80 GB. The rows are
// independent and each runs over the sources in a fixed order, so the result does
// not depend on the thread count. The inner loop is vectorized
// (engine/field/sincos.h); pairs closer than x = k d < 2 take the series of
// RadiationKernelAt, as the matrix route does, and a dipole near its own PEC image
// takes SelfResistanceOverGround (no cancellation between the two).
#pragma once

#include <functional>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

struct StreamedPower {
  double radiated_power_w = 0;
  // 1/2 sum |I_m| |R_ms| |I_s| over the terms as summed (PowerTermMagnitudes of
  // radiated_power.h; a dipole with its own image over PEC is one term).
  double term_magnitudes_w = 0;
  // Re Z_act,m (impedance.h); NaN where I_m = 0, or where a dipole at the same
  // point couples with no finite reactance.
  Eigen::VectorXd active_resistance_ohm;
  // ((R + j X') I)_m (V): Z I with every self reactance left out (X'_mm = 0 in free
  // space, m's own image over PEC), so V_m = this + j X_mm I_m for a known X_mm, and
  // Z_act,m = V_m / I_m (impedance.h): the active impedance without the matrix.
  Eigen::VectorXcd impedance_product_v;
};

// Throws InvalidArgument for an invalid array or currents (ValidateCurrents).
// num_threads: 0 uses the OpenMP default.
// progress (optional) is called on the calling thread with the fraction of rows
// summed, rising to 1, a few hundred times at most.
StreamedPower RadiatedPowerStreamed(const Array& array, const Eigen::VectorXcd& currents_a,
                                    int num_threads = 0,
                                    const std::function<void(double)>& progress = {});

// R x (ohm times the units of x) row by row, the same sums as RadiatedPowerStreamed
// without the reactances: for iterative solvers on R (engine/synthesis) where the
// N x N matrix would not fit. x is checked as currents (ValidateCurrents).
Eigen::VectorXcd ResistanceProductStreamed(const Array& array, const Eigen::VectorXcd& x,
                                           int num_threads = 0);

}  // namespace lobecast
