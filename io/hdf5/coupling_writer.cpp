// The circuit of a coupled array in a result file (coupling_writer.h).
#include "io/hdf5/coupling_writer.h"

#include <iterator>
#include <string>

#include "io/hdf5/schema.h"

namespace lobecast {

RealizedGainReference RealizedGainReferenceOf(const CouplingResult& c) {
  if (c.available_w > 0) {
    return {c.available_w,
            "4 pi U / P_available, P_available = sum |V_s|^2 / (8 R_s) over the voltage "
            "sources (realized gain: mismatch, port and ohmic losses included)"};
  }
  return {c.accepted_w,
          "4 pi U / P_accepted, P_accepted the net power the antenna accepts from its sources "
          "(ohmic and parasitic-load losses included; IEEE Std 145-2013 gain: current-forced "
          "ports have no available power, so no realized gain)"};
}

void WriteCoupling(PatternFileWriter& w, const CouplingResult& c, const std::vector<Port>& ports,
                   const PatternResult& result) {
  namespace s = schema;
  const std::size_t n = ports.size();
  auto table = [&](const s::Dataset& d, std::vector<std::size_t> dims, const auto* data) {
    w.WriteTable(std::string(d.path), dims, data, d.units);
  };
  // Eigen is column-major; Z is symmetric, so the row-major file layout is the same.
  // Above the coupling limit the impedances were streamed: no matrix to store.
  if (c.impedance_ohm.size() > 0) table(s::kImpedance, {n, n}, c.impedance_ohm.data());
  table(s::kActiveImpedance, {n}, c.active_impedance_ohm.data());

  // Realized gain where the sources have an available power, else the gain.
  const RealizedGainReference ref = RealizedGainReferenceOf(c);
  const Eigen::VectorXd gain = result.directivity * (c.radiated_w / ref.power_w);
  table(c.available_w > 0 ? s::kRealizedGain : s::kGain,
        {result.grid.theta_deg.size(), result.grid.phi_deg.size()}, gain.data());
  w.WriteStringAttribute(std::string(s::kPatternGroup), std::string(s::kGainDefinitionAttribute),
                         ref.definition);

  s::VisitCouplingTotals(c, [&](std::string_view name, double value) {
    w.WriteAttribute(std::string(s::kCouplingGroup), std::string(name), value);
  });
  std::vector<std::string> kinds;
  Eigen::VectorXcd source(static_cast<Eigen::Index>(n)), port_z(static_cast<Eigen::Index>(n));
  for (std::size_t m = 0; m < n; ++m) {
    const auto e = static_cast<Eigen::Index>(m);
    kinds.emplace_back(ToString(ports[m].kind));
    source[e] = ports[m].kind == PortKind::kDrive ? ports[m].voltage_v : Complex(0.0);
    port_z[e] = ports[m].kind == PortKind::kCurrent ? Complex(0.0) : ports[m].impedance_ohm;
  }
  w.WriteStrings(std::string(s::kPortKind.path), kinds, s::kPortKind.units);
  table(s::kSourceVoltage, {n}, source.data());
  table(s::kPortImpedance, {n}, port_z.data());
  table(s::kTerminalVoltage, {n}, c.circuit.terminal_voltage_v.data());
  table(s::kInputImpedance, {n}, c.circuit.input_impedance_ohm.data());
  table(s::kSelfReactance, {n}, c.self_reactance_ohm.data());
  table(s::kLossResistance, {n}, c.loss_resistance_ohm.data());
  table(s::kReflection, {n}, c.reflection.data());
  table(s::kVswr, {n}, c.vswr.data());
  table(s::kElementAccepted, {n}, c.circuit.accepted_w.data());
  table(s::kElementSupplied, {n}, c.circuit.supplied_w.data());
}

}  // namespace lobecast
