// The circuit of a coupled array in a result file (written by `compute` when the
// array has driven or loaded dipoles or wires; engine/coupling/coupling.h):
//
//   /power/impedance_ohm        (N,N) complex ohm: Z, self reactance and ohmic loss
//                               resistance on the diagonal (NaN imaginary part where
//                               a self reactance is unknown)
//   /power/active_impedance_ohm (N) complex ohm: V_m / I_m (NaN where unknown)
//   /pattern/realized_gain      (Nt,Np) linear: 4 pi U / P_ref; /pattern attribute
//                               `realized_gain_definition` says which
//                               (P_ref the sources' available power where every
//                               source is a voltage source with resistance, else the
//                               accepted power: then it is the gain)
//   /coupling                   attributes reference_impedance_ohm, supplied_w,
//                               accepted_w, radiated_w, ohmic_w, port_loss_w,
//                               available_w, efficiency
//     port_kind (N) string "current" | "drive" | "load"
//     source_voltage_v (N) complex V peak (0 unless drive)
//     port_impedance_ohm (N) complex ohm (source or load impedance; 0 for current)
//     terminal_voltage_v (N) complex V peak, self_reactance_ohm (N) ohm,
//     loss_resistance_ohm (N) ohm, reflection (N) complex 1 (against the
//     reference impedance), vswr (N) 1, accepted_w (N) W, supplied_w (N) W
#pragma once

#include <vector>

#include "engine/coupling/coupling.h"
#include "engine/pattern.h"
#include "io/hdf5/result_writer.h"

namespace lobecast {

// The power against which realized gain is referred (W), and its definition text.
struct RealizedGainReference {
  double power_w = 0;
  const char* definition = "";
};
RealizedGainReference RealizedGainReferenceOf(const CouplingResult& coupling);

void WriteCoupling(PatternFileWriter& writer, const CouplingResult& coupling,
                   const std::vector<Port>& ports, const PatternResult& result);

}  // namespace lobecast
