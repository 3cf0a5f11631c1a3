// The circuit of a coupled array in a result file (written by `compute` when the
// array has driven or loaded dipoles or wires; engine/coupling/coupling.h):
//
//   /power/impedance_ohm        (N,N) complex ohm: Z (Re Z = /power/resistance_ohm),
//                               self reactances on the diagonal (NaN imaginary part
//                               where unknown); no loss resistance. Absent above
//                               the coupling limit (4096 dipoles, current-forced
//                               arrays: streamed) unless compute --resistance-matrix
//   /power/active_impedance_ohm (N) complex ohm: sum_n Z_mn I_n / I_m (CONVENTIONS §1)
//   /pattern/realized_gain      (Nt,Np) linear: 4 pi U / P_available, when every source
//                               is a voltage source with resistance; otherwise
//   /pattern/gain               (Nt,Np) linear: 4 pi U / P_accepted; the /pattern
//                               attribute `gain_definition` says which
//   /coupling                   attributes reference_impedance_ohm, supplied_w,
//                               accepted_w (radiated + ohmic + load_loss), radiated_w,
//                               ohmic_w, load_loss_w, source_loss_w, available_w,
//                               efficiency (radiated / accepted)
//     port_kind (N) string "current" | "drive" | "load"
//     source_voltage_v (N) complex V peak (0 unless drive)
//     port_impedance_ohm (N) complex ohm (source or load impedance; 0 for current)
//     terminal_voltage_v (N) complex V peak, input_impedance_ohm (N) complex ohm
//     (V / I, loss included), self_reactance_ohm (N) ohm, loss_resistance_ohm (N) ohm,
//     reflection (N) complex 1 (against the reference impedance; NaN for loads),
//     vswr (N) 1 (NaN for loads), accepted_w (N) W, supplied_w (N) W
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
