#include "io/input/solve_circuit.h"

namespace lobecast {

std::optional<CouplingResult> SolveArrayCircuit(
    ArrayDescription& desc, int num_threads, bool force_matrix,
    const std::function<void(int, double)>& solve_progress) {
  if (!NeedsCoupling(desc.ports, desc.wires)) return std::nullopt;
  CouplingOptions options;
  options.reference_impedance_ohm = desc.reference_impedance_ohm;
  options.num_threads = num_threads;
  options.force_matrix = force_matrix;
  options.iterative.progress = solve_progress;
  CouplingResult r = SolveCoupling(desc.array, desc.ports, desc.wires, options);
  desc.currents = r.circuit.current_a;
  return r;
}

}  // namespace lobecast
