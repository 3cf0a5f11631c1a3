#include "io/input/excitation_synthesis.h"

namespace lobecast {

void ApplyExcitationSynthesis(ArrayDescription& desc) {
  if (!desc.design) return;
  const DesignInfo& d = *desc.design;
  if (!d.nulls.empty()) {
    throw InputError(d.nulls.front().where,
                     "[[null]] (null placement) is not built yet in this version; remove the "
                     "[[null]] tables to synthesize the rest of the design");
  }
  if (d.objective) {
    throw InputError(d.objective->where,
                     "[objective] kind \"" + std::string(ToString(d.objective->kind)) +
                         "\" is not built yet in this version; remove the [objective] table "
                         "and use a [taper]");
  }
}

}  // namespace lobecast
