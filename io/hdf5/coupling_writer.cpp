// The circuit of a coupled array in a result file (coupling_writer.h).
#include "io/hdf5/coupling_writer.h"

#include <string>

namespace lobecast {

RealizedGainReference RealizedGainReferenceOf(const CouplingResult& c) {
  if (c.available_w > 0) {
    return {c.available_w,
            "4 pi U / P_available, P_available = sum |V_s|^2 / (8 R_s) over the voltage "
            "sources (realized gain: mismatch, port and ohmic losses included)"};
  }
  return {c.accepted_w,
          "4 pi U / P_accepted (current-forced ports have no available power: this is the "
          "gain, ohmic loss included, IEEE Std 145-2013)"};
}

void WriteCoupling(PatternFileWriter& w, const CouplingResult& c, const std::vector<Port>& ports,
                   const PatternResult& result) {
  const std::size_t n = ports.size();
  w.WriteTable("/power/impedance_ohm", {n, n}, c.impedance_ohm.data(), "ohm");
  // Eigen is column-major; Z is symmetric, so the row-major file layout is the same.
  w.WriteTable("/power/active_impedance_ohm", {n}, c.circuit.input_impedance_ohm.data(), "ohm");

  const RealizedGainReference ref = RealizedGainReferenceOf(c);
  const Eigen::VectorXd gain = result.directivity * (c.radiated_w / ref.power_w);
  w.WriteTable("/pattern/realized_gain", {result.grid.theta_deg.size(), result.grid.phi_deg.size()},
               gain.data(), "1");
  w.WriteStringAttribute("/pattern", "realized_gain_definition", ref.definition);

  const std::string g = "/coupling";
  w.WriteAttribute(g, "reference_impedance_ohm", c.reference_impedance_ohm);
  w.WriteAttribute(g, "supplied_w", c.supplied_w);
  w.WriteAttribute(g, "accepted_w", c.accepted_w);
  w.WriteAttribute(g, "radiated_w", c.radiated_w);
  w.WriteAttribute(g, "ohmic_w", c.ohmic_w);
  w.WriteAttribute(g, "port_loss_w", c.port_loss_w);
  w.WriteAttribute(g, "available_w", c.available_w);
  w.WriteAttribute(g, "efficiency", c.efficiency);
  std::vector<std::string> kinds;
  Eigen::VectorXcd source(static_cast<Eigen::Index>(n)), port_z(static_cast<Eigen::Index>(n));
  for (std::size_t m = 0; m < n; ++m) {
    const auto e = static_cast<Eigen::Index>(m);
    kinds.emplace_back(ToString(ports[m].kind));
    source[e] = ports[m].kind == PortKind::kDrive ? ports[m].voltage_v : Complex(0.0);
    port_z[e] = ports[m].kind == PortKind::kCurrent ? Complex(0.0) : ports[m].impedance_ohm;
  }
  w.WriteStrings(g + "/port_kind", kinds, "1");
  w.WriteTable(g + "/source_voltage_v", {n}, source.data(), "V");
  w.WriteTable(g + "/port_impedance_ohm", {n}, port_z.data(), "ohm");
  w.WriteTable(g + "/terminal_voltage_v", {n}, c.circuit.terminal_voltage_v.data(), "V");
  w.WriteTable(g + "/self_reactance_ohm", {n}, c.self_reactance_ohm.data(), "ohm");
  w.WriteTable(g + "/loss_resistance_ohm", {n}, c.loss_resistance_ohm.data(), "ohm");
  w.WriteTable(g + "/reflection", {n}, c.reflection.data(), "1");
  w.WriteTable(g + "/vswr", {n}, c.vswr.data(), "1");
  w.WriteTable(g + "/accepted_w", {n}, c.circuit.accepted_w.data(), "W");
  w.WriteTable(g + "/supplied_w", {n}, c.circuit.supplied_w.data(), "W");
}

}  // namespace lobecast
