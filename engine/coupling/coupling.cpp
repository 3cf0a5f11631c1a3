// Impedances, currents and powers of a coupled array (coupling.h).
#include "engine/coupling/coupling.h"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "engine/check.h"
#include "engine/coupling/self_impedance.h"
#include "engine/error.h"
#include "engine/ground.h"
#include "engine/power/impedance.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"

namespace lobecast {
namespace {

[[noreturn]] void Fail(std::size_t m, const std::string& what) {
  std::ostringstream s;
  s << "dipole " << m << ": " << what;
  throw InvalidArgument(s.str());
}

bool Given(double v) { return v != 0 && !std::isinf(v); }

}  // namespace

Complex PowerWaveReflection(Complex z, Complex z_ref) {
  return (z - std::conj(z_ref)) / (z + z_ref);
}

double Vswr(Complex reflection) {
  const double a = std::abs(reflection);
  if (std::isnan(a)) return a;
  return a < 1 ? (1 + a) / (1 - a) : std::numeric_limits<double>::infinity();
}

bool NeedsCoupling(const std::vector<Port>& ports, const std::vector<Wire>& wires) {
  for (const Port& p : ports)
    if (p.kind != PortKind::kCurrent) return true;
  for (const Wire& w : wires)
    if (w.radius_m > 0 || !std::isnan(w.reactance_ohm) || Given(w.conductivity_s_m)) return true;
  return false;
}

ClosePairs FindClosePairs(const Array& array) {
  ClosePairs out;
  out.closest_ratio = std::numeric_limits<double>::infinity();
  const std::size_t n = array.size();
  const bool pec = array.ground == Ground::kPec;
  for (std::size_t m = 0; m < n; ++m) {
    const Dipole& a = array.dipoles[m];
    // Over PEC each dipole also couples to every image, its own at twice its height.
    for (std::size_t q = pec ? m : m + 1; q < n; ++q) {
      if (pec) {
        const Dipole image = ImageOf(array.dipoles[q]);
        const double ratio =
            (a.position_m - image.position_m).norm() / std::max(a.length_m, image.length_m);
        if (ratio < 1) {
          ++out.count;
          if (out.first.size() < 8) out.first.emplace_back(m, q);
          out.closest_ratio = std::min(out.closest_ratio, ratio);
        }
      }
      if (q == m) continue;
      const Dipole& b = array.dipoles[q];
      // Crossed dipoles sharing a centre (a turnstile) do not couple at all.
      const double dist = (a.position_m - b.position_m).norm();
      if (dist == 0 && std::abs(a.orientation.dot(b.orientation)) <= 1e-12) continue;
      const double ratio = dist / std::max(a.length_m, b.length_m);
      if (ratio >= 1) continue;
      ++out.count;
      if (out.first.size() < 8) out.first.emplace_back(m, q);
      out.closest_ratio = std::min(out.closest_ratio, ratio);
    }
  }
  if (out.count == 0) out.closest_ratio = 0;
  return out;
}

// Dipoles at one point that are not orthogonal have no finite mutual reactance in
// the point-dipole model (impedance.h): refuse when either one's current must be
// solved for; two current-forced ones only lose their terminal voltages.
void CheckCoincident(const Array& array, const std::vector<Port>& ports) {
  for (std::size_t m = 0; m < array.size(); ++m) {
    for (std::size_t q = m + 1; q < array.size(); ++q) {
      const Dipole& a = array.dipoles[m];
      const Dipole& b = array.dipoles[q];
      if (a.position_m != b.position_m || std::abs(a.orientation.dot(b.orientation)) <= 1e-12)
        continue;
      if (ports[m].kind == PortKind::kCurrent && ports[q].kind == PortKind::kCurrent) continue;
      std::ostringstream s;
      s << "dipoles " << m << " and " << q
        << " share a point and are not orthogonal: the point-dipole model gives them no "
           "finite mutual reactance, so the circuit cannot be solved; expected them apart "
           "(several lengths) or crossed at right angles";
      throw InvalidArgument(s.str());
    }
  }
}

CouplingResult SolveCoupling(const Array& array, const std::vector<Port>& ports,
                             const std::vector<Wire>& wires, const CouplingOptions& options) {
  Validate(array);
  const std::size_t n = array.size();
  LOBECAST_CHECK_EQ(ports.size(), n);
  LOBECAST_CHECK_EQ(wires.size(), n);
  // Above the limit V = Z I is streamed row by row (O(N) memory); driven and loaded
  // ports get their currents from GMRES on such products (iterative_circuit.h).
  const bool streamed = n > options.max_dipoles && !options.force_matrix;
  const bool solved = std::any_of(ports.begin(), ports.end(),
                                  [](const Port& p) { return p.kind != PortKind::kCurrent; });
  const double z0 = options.reference_impedance_ohm;
  if (!std::isfinite(z0) || z0 <= 0) {
    std::ostringstream s;
    s << "reference impedance: found " << z0 << " ohm, expected a finite number > 0";
    throw InvalidArgument(s.str());
  }
  const double k = array.wavenumber_rad_m(), w = array.angular_frequency_rad_s();
  CouplingResult r;
  r.reference_impedance_ohm = z0;
  r.self_reactance_ohm.resize(static_cast<Eigen::Index>(n));
  r.loss_resistance_ohm = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n));
  for (std::size_t m = 0; m < n; ++m) {
    const Dipole& d = array.dipoles[m];
    const Wire& wire = wires[m];
    const auto e = static_cast<Eigen::Index>(m);
    if (!std::isnan(wire.reactance_ohm)) {
      if (!std::isfinite(wire.reactance_ohm)) Fail(m, "reactance is not finite");
      r.self_reactance_ohm[e] = wire.reactance_ohm;
    } else if (wire.radius_m > 0 && d.distribution == Distribution::kTriangular) {
      r.self_reactance_ohm[e] = SelfReactance(d, wire.radius_m, k);
    } else {
      r.self_reactance_ohm[e] = std::numeric_limits<double>::quiet_NaN();
    }
    if (Given(wire.conductivity_s_m)) {
      if (!(wire.radius_m > 0)) Fail(m, "a conductivity needs the wire radius (radius key)");
      const OhmicLoss loss = LossResistance(d, wire.radius_m, wire.conductivity_s_m, w);
      r.loss_resistance_ohm[e] = loss.resistance_ohm;
      if (!loss.skin_effect_valid) ++r.thin_for_skin_effect;
    }
    if (ports[m].kind != PortKind::kCurrent && std::isnan(r.self_reactance_ohm[e])) {
      Fail(m, std::string(ToString(ports[m].kind)) +
                  " needs the self reactance: give the wire radius (triangular current) or "
                  "self_reactance" +
                  (d.distribution == Distribution::kUniform
                       ? " (a uniform current's reactance depends on its end loading)"
                       : ""));
    }
  }
  // An unknown self reactance belongs to a current-forced element (checked above).
  // It enters only that element's own terminal voltage (Z_mm I_m), never another
  // port's equation, so the solve takes 0 for it, and that element's V and Z_in are
  // NaN (its accepted power 1/2 Re(V I*) does not depend on X_mm).
  Eigen::VectorXd xs = r.self_reactance_ohm;
  for (Eigen::Index e = 0; e < xs.size(); ++e)
    if (std::isnan(xs[e])) xs[e] = 0;
  CheckCoincident(array, ports);
  Eigen::MatrixXcd z;
  if (streamed && solved) {
    IterativeCircuitOptions iterative = options.iterative;
    iterative.num_threads = options.num_threads;
    IterativeCircuit solution =
        SolveCircuitIterative(array, xs, r.loss_resistance_ohm, ports, iterative);
    r.circuit = std::move(solution.circuit);
    r.radiated_w = solution.radiated_w;
    r.route = solution.route;
  } else if (streamed) {
    // Every current is given: V = (R + j X') I + j X_mm I_m + R_loss I_m, the rows
    // summed as the active resistances are (engine/power/power_large.h).
    Eigen::VectorXcd i(static_cast<Eigen::Index>(n));
    for (std::size_t m = 0; m < n; ++m) i[static_cast<Eigen::Index>(m)] = ports[m].current_a;
    const StreamedPower sp = RadiatedPowerStreamed(array, i, options.num_threads);
    Eigen::VectorXcd v = sp.impedance_product_v;
    for (Eigen::Index e = 0; e < v.size(); ++e)
      v[e] += Complex(r.loss_resistance_ohm[e], xs[e]) * i[e];
    r.circuit = CircuitFromVoltages(ports, std::move(i), std::move(v));
    r.radiated_w = sp.radiated_power_w;
  } else {
    z = ImpedanceMatrix(array, xs, options.num_threads);
    Eigen::MatrixXcd z_loss = z;
    z_loss.diagonal().real() += r.loss_resistance_ohm;
    r.circuit = SolveCircuit(z_loss, ports);
    r.radiated_w = RadiatedPower(z.real(), r.circuit.current_a);  // Re Z = R (impedance.h)
  }
  const double nan = std::numeric_limits<double>::quiet_NaN();
  r.active_impedance_ohm = r.circuit.input_impedance_ohm;
  r.active_impedance_ohm.real() -= r.loss_resistance_ohm;
  for (Eigen::Index e = 0; e < xs.size(); ++e) {
    if (!std::isnan(r.self_reactance_ohm[e])) continue;
    if (!streamed) z(e, e) = Complex(z(e, e).real(), nan);
    r.circuit.terminal_voltage_v[e] = Complex(nan, nan);
    r.circuit.input_impedance_ohm[e] = Complex(nan, nan);
    r.active_impedance_ohm[e] = Complex(nan, nan);
    // Accepted power needs only Re V I*, which X_mm does not change.
  }
  r.impedance_ohm = std::move(z);

  const Eigen::VectorXcd& i = r.circuit.current_a;
  const auto ne = static_cast<Eigen::Index>(n);
  r.reflection.resize(ne);
  r.vswr.resize(ne);
  for (Eigen::Index e = 0; e < ne; ++e) {
    if (ports[static_cast<std::size_t>(e)].kind == PortKind::kLoad) {  // no feed
      r.reflection[e] = Complex(nan, nan);
      r.vswr[e] = nan;
      continue;
    }
    r.reflection[e] = PowerWaveReflection(r.circuit.input_impedance_ohm[e], z0);
    r.vswr[e] = Vswr(r.reflection[e]);
  }
  r.ohmic_w = 0.5 * (r.loss_resistance_ohm.array() * i.cwiseAbs2().array()).sum();
  r.supplied_w = r.circuit.supplied_w.sum();
  for (std::size_t m = 0; m < n; ++m) {
    const auto e = static_cast<Eigen::Index>(m);
    if (ports[m].kind == PortKind::kLoad) {
      r.load_loss_w += r.circuit.port_loss_w[e];
    } else {
      r.source_loss_w += r.circuit.port_loss_w[e];
      r.accepted_w += r.circuit.accepted_w[e];  // 1/2 Re(V I*) at the fed terminals
    }
  }
  r.efficiency = r.accepted_w > 0 ? r.radiated_w / r.accepted_w : 0;
  bool all_sources = true, any_drive = false;
  double available = 0;
  for (std::size_t m = 0; m < n; ++m) {
    const Port& p = ports[m];
    if (p.kind == PortKind::kCurrent && i[static_cast<Eigen::Index>(m)] != Complex(0.0))
      all_sources = false;
    if (p.kind != PortKind::kDrive) continue;
    any_drive = true;
    if (!(p.impedance_ohm.real() > 0))
      all_sources = false;
    else
      available += std::norm(p.voltage_v) / (8 * p.impedance_ohm.real());
  }
  r.available_w = all_sources && any_drive ? available : 0;
  r.close_pairs = FindClosePairs(array);
  return r;
}

}  // namespace lobecast
