// For commands that read an array: solve its circuit when it has driven or
// loaded dipoles or wires, and put the solved terminal currents into
// desc.currents (CONVENTIONS §3: stored and used exactly as if given).
#pragma once

#include <functional>
#include <optional>

#include "engine/coupling/coupling.h"
#include "io/input/array_description.h"

namespace lobecast {

// force_matrix: CouplingOptions::force_matrix (the impedance matrix whatever the
// size; compute --resistance-matrix). solve_progress: IterativeCircuitOptions::progress
// (the iterations of a large array's solve, engine/coupling/iterative_circuit.h).
std::optional<CouplingResult> SolveArrayCircuit(
    ArrayDescription& desc, int num_threads, bool force_matrix = false,
    const std::function<void(int, double)>& solve_progress = {});

}  // namespace lobecast
