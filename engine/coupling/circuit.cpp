// The array's circuit (circuit.h).
#include "engine/coupling/circuit.h"

#include <cmath>
#include <limits>
#include <sstream>
#include <utility>

#include <Eigen/LU>

#include "engine/check.h"
#include "engine/error.h"

namespace lobecast {
namespace {

bool Finite(Complex c) { return std::isfinite(c.real()) && std::isfinite(c.imag()); }

}  // namespace

std::string_view ToString(PortKind k) {
  switch (k) {
    case PortKind::kCurrent:
      return "current";
    case PortKind::kDrive:
      return "drive";
    case PortKind::kLoad:
      return "load";
  }
  return "current";
}

void CheckPortValues(const std::vector<Port>& ports) {
  for (std::size_t m = 0; m < ports.size(); ++m) {
    const Port& p = ports[m];
    if (Finite(p.current_a) && Finite(p.voltage_v) && Finite(p.impedance_ohm)) continue;
    std::ostringstream s;
    s << "dipole " << m << ": " << ToString(p.kind) << " values are not finite";
    throw InvalidArgument(s.str());
  }
}

CircuitSolution SolveCircuit(const Eigen::MatrixXcd& z, const std::vector<Port>& ports) {
  const auto n = static_cast<Eigen::Index>(ports.size());
  LOBECAST_CHECK_EQ(z.rows(), n);
  LOBECAST_CHECK_EQ(z.cols(), n);
  CheckPortValues(ports);
  std::vector<Eigen::Index> unknown, forced;
  for (Eigen::Index m = 0; m < n; ++m)
    (ports[static_cast<std::size_t>(m)].kind == PortKind::kCurrent ? forced : unknown).push_back(m);
  // Only the rows of the unknown currents enter the solve: a NaN elsewhere (the
  // self reactance of a current-forced element, coupling.h) touches only that
  // element's own terminal voltage.
  for (Eigen::Index i : unknown) {
    if (!z.row(i).allFinite()) {
      std::ostringstream s;
      s << "dipole " << i << ": its impedances are not finite (a self reactance or a mutual "
        << "reactance is unknown); expected a radius or self_reactance for every driven or "
           "loaded dipole";
      throw InvalidArgument(s.str());
    }
  }
  CircuitSolution out;
  out.current_a = Eigen::VectorXcd::Zero(n);
  for (Eigen::Index m : forced) out.current_a[m] = ports[static_cast<std::size_t>(m)].current_a;
  if (!unknown.empty()) {
    const auto nu = static_cast<Eigen::Index>(unknown.size());
    Eigen::MatrixXcd a(nu, nu);
    Eigen::VectorXcd b(nu);
    for (Eigen::Index i = 0; i < nu; ++i) {
      const Port& p = ports[static_cast<std::size_t>(unknown[i])];
      for (Eigen::Index j = 0; j < nu; ++j) a(i, j) = z(unknown[i], unknown[j]);
      a(i, i) += p.impedance_ohm;
      b[i] = p.kind == PortKind::kDrive ? p.voltage_v : Complex(0.0);
      for (Eigen::Index f : forced) b[i] -= z(unknown[i], f) * out.current_a[f];
    }
    const Eigen::PartialPivLU<Eigen::MatrixXcd> lu(a);
    const Eigen::VectorXcd x = lu.solve(b);
    // Partial pivoting does not report singularity: check the residual and the
    // reciprocal condition estimate.
    const double rcond = lu.rcond();
    if (!(rcond > 1e-14) || !x.allFinite()) {
      std::ostringstream s;
      s << "circuit: the driven and loaded dipoles have no unique currents (reciprocal "
           "condition number "
        << rcond << "); expected sources or loads with some resistance off resonance";
      throw InvalidArgument(s.str());
    }
    for (Eigen::Index i = 0; i < nu; ++i) out.current_a[unknown[i]] = x[i];
  }
  // The voltages before the currents are moved: the order in which arguments are
  // evaluated is unspecified (clang moved them first: z times an empty vector).
  Eigen::VectorXcd voltage_v = z * out.current_a;
  return CircuitFromVoltages(ports, std::move(out.current_a), std::move(voltage_v));
}

CircuitSolution CircuitFromVoltages(const std::vector<Port>& ports, Eigen::VectorXcd current_a,
                                    Eigen::VectorXcd terminal_voltage_v) {
  const auto n = static_cast<Eigen::Index>(ports.size());
  LOBECAST_CHECK_EQ(current_a.size(), n);
  LOBECAST_CHECK_EQ(terminal_voltage_v.size(), n);
  CircuitSolution out;
  out.current_a = std::move(current_a);
  out.terminal_voltage_v = std::move(terminal_voltage_v);
  const Eigen::VectorXcd& i = out.current_a;
  out.input_impedance_ohm.resize(n);
  out.accepted_w.resize(n);
  out.supplied_w.resize(n);
  out.port_loss_w.resize(n);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (Eigen::Index m = 0; m < n; ++m) {
    const Port& p = ports[static_cast<std::size_t>(m)];
    const Complex v = out.terminal_voltage_v[m];
    out.input_impedance_ohm[m] = i[m] == Complex(0.0) ? Complex(nan, nan) : v / i[m];
    out.accepted_w[m] = 0.5 * (v * std::conj(i[m])).real();
    out.port_loss_w[m] =
        p.kind == PortKind::kCurrent ? 0.0 : 0.5 * std::norm(i[m]) * p.impedance_ohm.real();
    switch (p.kind) {
      case PortKind::kCurrent:
        out.supplied_w[m] = out.accepted_w[m];
        break;
      case PortKind::kDrive:
        out.supplied_w[m] = 0.5 * (p.voltage_v * std::conj(i[m])).real();
        break;
      case PortKind::kLoad:
        out.supplied_w[m] = 0.0;
        break;
    }
  }
  return out;
}

}  // namespace lobecast
