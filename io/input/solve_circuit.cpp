#include "io/input/solve_circuit.h"

namespace lobecast {

std::optional<CouplingResult> SolveArrayCircuit(ArrayDescription& desc, int num_threads) {
  if (!NeedsCoupling(desc.ports, desc.wires)) return std::nullopt;
  CouplingOptions options;
  options.reference_impedance_ohm = desc.reference_impedance_ohm;
  options.num_threads = num_threads;
  CouplingResult r = SolveCoupling(desc.array, desc.ports, desc.wires, options);
  for (std::size_t m = 0; m < desc.array.size(); ++m)
    desc.array.dipoles[m].current_a = r.circuit.current_a[static_cast<Eigen::Index>(m)];
  return r;
}

}  // namespace lobecast
