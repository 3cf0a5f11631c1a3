// For commands that read an array: solve its circuit when it has driven or
// loaded dipoles or wires, and put the solved terminal currents into
// desc.currents (CONVENTIONS §3: stored and used exactly as if given).
#pragma once

#include <optional>

#include "engine/coupling/coupling.h"
#include "io/input/array_description.h"

namespace lobecast {

std::optional<CouplingResult> SolveArrayCircuit(ArrayDescription& desc, int num_threads);

}  // namespace lobecast
