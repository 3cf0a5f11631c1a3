// The port circuit of a large array without its impedance matrix (coupling.h, above
// CouplingOptions::max_dipoles): the unknown currents I_U of the driven and loaded
// ports solve
//
//   (Z_UU + diag Z_p) I_U = b_U - Z_UF I_F        (circuit.h)
//
// by restarted GMRES (Y. Saad and M. H. Schultz, "GMRES: a generalized minimal
// residual algorithm for solving nonsymmetric linear systems", SIAM J. Sci. Stat.
// Comput. 7, 1986; Saad, Iterative Methods for Sparse Linear Systems, 2nd ed., 2003,
// sec. 9.3.2 for right preconditioning). Z is complex symmetric, not Hermitian, so
// conjugate gradients do not apply; GMRES minimizes the true residual whatever the
// matrix, and with a right preconditioner the residual it monitors is the
// unpreconditioned one the stopping rule needs.
//
// Each product Z x is summed row by row as the streamed power is
// (RadiatedPowerStreamed, engine/power/power_large.h: (R + j X') x, the self
// reactance and loss added on the diagonal here): O(N^2) time, O(N) memory. The
// preconditioner is block-diagonal: the unknowns in a spatial (Morton) order on a
// lambda/4 grid, cut into blocks of up to 64 near neighbours, each block of
// Z_UU + diag Z_p built whole (ImpedanceMatrix of the sub-array) and factored by LU.
// A parasitic element and the driven one beside it mostly share a block, so the
// strong near coupling and the loads' resonances are inverted exactly and GMRES
// deals with the weak far coupling.
//
// Stopping rule: the true relative residual |b - A I| / |b| (b = b_U - Z_UF I_F)
// <= 1e-12, checked with a fresh product at each restart (so never on the Arnoldi
// estimate alone). The currents' relative error is at most the condition number
// times that, so the six digits the reports print hold up to a condition number of
// 1e5; the power balance supplied = radiated + losses errs by 1/2 Re(r^H I), below
// 1e-10 of the supplied power for such residuals. Not converged within
// max_iterations products: InvalidArgument naming the residual reached.
#pragma once

#include <cstddef>
#include <functional>
#include <vector>

#include <Eigen/Core>

#include "engine/coupling/circuit.h"
#include "engine/types.h"

namespace lobecast {

struct IterativeCircuitOptions {
  double target_relative_residual = 1e-12;
  int max_iterations = 500;     // products Z x in the Arnoldi steps, over all restarts
  int restart = 100;            // Krylov vectors kept: (restart + 1) N_U complex numbers
  std::size_t block_size = 64;  // unknowns per preconditioner block, at most
  int num_threads = 0;
  // Called on the calling thread after every iteration with its count and the
  // relative residual (GMRES' estimate between restarts, the true one at them).
  std::function<void(int iteration, double relative_residual)> progress;
};

// How the currents were found: by LU of the whole matrix, or iteratively.
struct CircuitRoute {
  bool iterative = false;
  int iterations = 0;            // products Z x in the Arnoldi steps
  int restarts = 0;              // fresh residual products
  double relative_residual = 0;  // the true one at the end; 0 for the direct route
  double target_residual = 0;    // the stopping rule
  std::size_t unknowns = 0;      // driven and loaded ports
  std::size_t blocks = 0;        // in the preconditioner
  double seconds = 0;            // wall time of the solve
};

// Z x without the matrix: ImpedanceMatrix(array, self_reactance_ohm) x +
// loss_resistance_ohm .* x (impedance.h), summed row by row. self_reactance_ohm
// and loss_resistance_ohm finite, one per dipole.
Eigen::VectorXcd ImpedanceProductStreamed(const Array& array,
                                          const Eigen::VectorXd& self_reactance_ohm,
                                          const Eigen::VectorXd& loss_resistance_ohm,
                                          const Eigen::VectorXcd& x, int num_threads = 0);

struct IterativeCircuit {
  CircuitSolution circuit;  // terminal voltages V = Z I from the last product (loss in Z)
  double radiated_w = 0;    // 1/2 I^H R I, from the same product's R rows
  CircuitRoute route;
};

// The circuit of circuit.h with Z = ImpedanceMatrix(array, self_reactance_ohm) +
// diag(loss_resistance_ohm), never stored. Throws InvalidArgument for a port value
// that is not finite, or when GMRES does not reach the target within
// max_iterations (the message gives the residual reached).
IterativeCircuit SolveCircuitIterative(const Array& array,
                                       const Eigen::VectorXd& self_reactance_ohm,
                                       const Eigen::VectorXd& loss_resistance_ohm,
                                       const std::vector<Port>& ports,
                                       const IterativeCircuitOptions& options = {});

}  // namespace lobecast
