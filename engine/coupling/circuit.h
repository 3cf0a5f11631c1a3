// The circuit of an array: what drives each dipole's terminals, and the currents
// that then flow. With Z the N x N impedance matrix (engine/power/impedance.h, with
// self reactances and any loss resistance on its diagonal), the terminal voltages
// are V = Z I (the induced-EMF model, CONVENTIONS §1), and each port adds one
// equation:
//
//   current  I_m given (an ideal current source: today's `current` key);
//   drive    a voltage source V_s behind an impedance Z_s:  V_m = V_s - Z_s I_m;
//   load     a passive impedance Z_L (0 a short circuit):   V_m = -Z_L I_m.
//
// The unknown currents solve (Z_UU + diag Z_p) I_U = b_U - Z_UF I_F (U the driven
// and loaded ports, F the current-forced ones), by LU with partial pivoting.
// Powers are peak-phasor time averages, 1/2 Re(V I*).
#pragma once

#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

enum class PortKind { kCurrent, kDrive, kLoad };
std::string_view ToString(PortKind k);  // "current", "drive", "load"

struct Port {
  PortKind kind = PortKind::kCurrent;
  Complex current_a = 0.0;      // kCurrent: the terminal current (A peak)
  Complex voltage_v = 0.0;      // kDrive: the source voltage (V peak)
  Complex impedance_ohm = 0.0;  // kDrive: source impedance; kLoad: load impedance
};

struct CircuitSolution {
  Eigen::VectorXcd current_a;            // terminal currents, every port
  Eigen::VectorXcd terminal_voltage_v;   // V = Z I
  Eigen::VectorXcd input_impedance_ohm;  // V_m / I_m (NaN where I_m = 0): the active impedance
  Eigen::VectorXd accepted_w;            // 1/2 Re(V_m I_m*): into each element's terminals
  Eigen::VectorXd supplied_w;            // by each source: 1/2 Re(V_s I*) for drive, = accepted
                                         //   for a current port, 0 for a load
  Eigen::VectorXd port_loss_w;           // in source and load impedances: 1/2 |I|^2 Re Z_p
};

// Throws InvalidArgument (naming the dipole) when a port value is not finite.
void CheckPortValues(const std::vector<Port>& ports);

// Sizes must agree (a failed LOBECAST_CHECK otherwise). Throws InvalidArgument when a
// port value is not finite, or the
// circuit is singular (no unique currents: e.g. lossless resonant loads).
CircuitSolution SolveCircuit(const Eigen::MatrixXcd& impedance_ohm, const std::vector<Port>& ports);

// The per-port figures (input impedance, accepted, supplied and port-loss powers)
// from the currents and the terminal voltages V = Z I, however V was found: the tail
// of SolveCircuit, and the whole of it for current-forced arrays whose V is summed
// row by row without the matrix (coupling.h).
CircuitSolution CircuitFromVoltages(const std::vector<Port>& ports, Eigen::VectorXcd current_a,
                                    Eigen::VectorXcd terminal_voltage_v);

}  // namespace lobecast
