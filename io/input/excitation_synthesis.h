// The one place where a design's [[null]] directions and [objective] act on the
// currents (CONVENTIONS §3, design files). Called by the design reader after the
// taper and the steering, before the engine's final checks, so every command that
// reads a design gets the same currents.
#pragma once

#include "io/input/array_description.h"

namespace lobecast {

// Changes desc.currents (and the generated ports and design->polar_currents) as the
// nulls and objective ask, and keeps what the engine achieved in design->max_directivity, envelope
// and null_placement (for the design text). Does nothing without nulls or an objective. Throws
// InputError (located at the [[null]] or [objective] table) for a design that cannot be met.
void ApplyExcitationSynthesis(ArrayDescription& desc);

}  // namespace lobecast
