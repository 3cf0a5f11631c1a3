// What currents really flow: the impedance matrix of the array (mutual terms in
// closed form, self reactance from the wire or given, ohmic loss), the circuit of
// its ports, and the figures a designer matches and budgets with.
//
// Per element: Z_in = V / I (the active impedance, self reactance and loss
// included), the reflection coefficient against a real reference impedance Z0,
// Gamma = (Z_in - Z0) / (Z_in + Z0), and VSWR = (1 + |Gamma|) / (1 - |Gamma|)
// (IEEE Std 145-2013 terms). For the array: the power supplied by the sources; the
// power the antenna accepts from them (at the driven and current-forced ports:
// radiated + lost in the wires + lost in the loads of parasitic elements, which
// belong to the antenna); the radiation efficiency e = P_rad / P_accepted, so that
// gain = e D (IEEE Std 145-2013: gain referred to the net accepted power); and,
// when every driven port is a voltage source with a resistive part, the available
// power sum |V_s|^2 / (8 R_s) and realized gain = 4 pi U / P_available (mismatch
// included). Reflection and VSWR describe a feed: NaN for loaded elements.
#pragma once

#include <cstddef>
#include <limits>
#include <utility>
#include <vector>

#include <Eigen/Core>

#include "engine/coupling/circuit.h"
#include "engine/coupling/iterative_circuit.h"
#include "engine/types.h"

namespace lobecast {

// The wire of one dipole. radius_m = 0: not given. reactance_ohm NaN: from the
// wire (needs a radius and a triangular current). conductivity_s_m = 0 (or +inf):
// a perfect conductor, no ohmic loss.
struct Wire {
  double radius_m = 0;
  double reactance_ohm = std::numeric_limits<double>::quiet_NaN();
  double conductivity_s_m = 0;
};

struct CouplingOptions {
  double reference_impedance_ohm = 50;  // Z0 for Gamma and VSWR, real, > 0
  int num_threads = 0;
  // Up to this many dipoles the impedance matrix is built whole (16 N^2 bytes) and
  // the driven and loaded ports are solved by LU (O(N^3)). Beyond it, unless
  // force_matrix: V = Z I, the active and input impedances and the power budget come
  // from rows summed one at a time (O(N^2) time, O(N) memory;
  // CouplingResult::impedance_ohm is then empty), and the currents of driven and
  // loaded ports from GMRES on such products (iterative_circuit.h; O(N^2) per
  // iteration), refused when it does not converge.
  std::size_t max_dipoles = 4096;
  bool force_matrix = false;            // build the matrix whatever the size (asked for)
  IterativeCircuitOptions iterative{};  // num_threads is taken from above
};

// Pairs of dipoles closer than their longer length: the point-dipole mutual
// impedance assumes each sees the other as a point, which holds for separations
// of several lengths (common practice) and fails when they are comparable. Over
// PEC a dipole and an image count too ((m, m): m's own image, at twice its height).
struct ClosePairs {
  std::size_t count = 0;                                   // all such pairs
  std::vector<std::pair<std::size_t, std::size_t>> first;  // up to 8 of them, (m, n), m < n
  double closest_ratio = 0;                                // min separation / longer length
};
ClosePairs FindClosePairs(const Array& array);

struct CouplingResult {
  // Z (CONVENTIONS §1: Re Z = R exactly), self reactances on the diagonal (NaN
  // where unknown); the loss resistances are apart, the circuit adds them. Empty
  // (0 x 0) above CouplingOptions::max_dipoles without force_matrix.
  Eigen::MatrixXcd impedance_ohm;
  Eigen::VectorXd self_reactance_ohm;  // X_self per dipole (NaN where unknown)
  Eigen::VectorXd loss_resistance_ohm;
  // Dipoles whose wire is thinner than twice its skin depth: their loss resistance
  // is underestimated (self_impedance.h).
  std::size_t thin_for_skin_effect = 0;
  CircuitSolution circuit;  // currents, voltages, input impedances V/I (loss included)
  CircuitRoute route;       // direct (LU, or no unknown currents) or iterative
  Eigen::VectorXcd active_impedance_ohm;  // sum_n Z_mn I_n / I_m (CONVENTIONS §1, no loss)
  Eigen::VectorXcd reflection;            // Gamma against Z0 (NaN where I = 0)
  Eigen::VectorXd vswr;
  double reference_impedance_ohm = 50;
  double supplied_w = 0;     // by all sources (drive and current ports)
  double accepted_w = 0;     // from the sources: radiated + ohmic + load_loss
  double radiated_w = 0;     // 1/2 I^H R I
  double ohmic_w = 0;        // in the wires
  double load_loss_w = 0;    // in the loads of parasitic elements
  double source_loss_w = 0;  // in the sources' own impedances
  double available_w = 0;    // sum |V_s|^2 / (8 R_s); 0 when not defined
  double efficiency = 1;     // radiated / accepted
  ClosePairs close_pairs;    // where the coupling model is stretched
};

// The power-wave reflection coefficient of an impedance z against a reference
// z_ref, (z - conj(z_ref)) / (z + z_ref) (K. Kurokawa, "Power waves and the
// scattering matrix", IEEE Trans. MTT-13, 1965): the usual (z - Z0) / (z + Z0) for
// a real Z0, and 0 for a source conjugate-matched to z.
Complex PowerWaveReflection(Complex z, Complex z_ref);
// VSWR = (1 + |Gamma|) / (1 - |Gamma|): +inf for |Gamma| >= 1, NaN for NaN.
double Vswr(Complex reflection);

// True when the array needs a circuit solve: any port that is not a current
// source, or any wire given (radius, reactance, conductivity).
bool NeedsCoupling(const std::vector<Port>& ports, const std::vector<Wire>& wires);

// Throws InvalidArgument (naming the dipole) when a driven or loaded dipole has no
// known self reactance, a wire property is out of range, or the circuit is singular.
CouplingResult SolveCoupling(const Array& array, const std::vector<Port>& ports,
                             const std::vector<Wire>& wires, const CouplingOptions& options = {});

}  // namespace lobecast
