#include "io/hdf5/coupling_reader.h"

#include "io/hdf5/hdf5_file.h"
#include "io/hdf5/schema.h"
#include "io/io_error.h"

namespace lobecast {
namespace {

using schema::S;

template <typename T>
Eigen::Matrix<T, Eigen::Dynamic, 1> Column(const std::vector<T>& v, std::size_t n,
                                           const std::string& path, std::string_view name) {
  if (v.size() != n) {
    throw IoError(path, S(name) + " has " + std::to_string(v.size()) + " values for " +
                            std::to_string(n) + " dipoles");
  }
  return Eigen::Map<const Eigen::Matrix<T, Eigen::Dynamic, 1>>(v.data(),
                                                               static_cast<Eigen::Index>(n));
}

std::optional<StoredCoupling> ReadOpenCoupling(const std::string& path, const Array& array,
                                               const Eigen::VectorXcd& currents) {
  namespace s = schema;
  hdf5::Handle file = hdf5::OpenFileReadOnly(path);
  if (!hdf5::Exists(file, S(s::kCouplingGroup))) return std::nullopt;
  const std::size_t n = array.size();
  StoredCoupling out;
  CouplingResult& c = out.result;
  hdf5::Handle g = hdf5::OpenGroup(file, S(s::kCouplingGroup));
  s::VisitCouplingTotals(c, [&](std::string_view name, double& value) {
    value = hdf5::ReadDoubleAttribute(g, S(name));
  });

  const std::vector<std::string> kinds = hdf5::ReadStrings(file, S(s::kPortKind.path));
  const Eigen::VectorXcd source =
      Column(hdf5::ReadComplex(file, S(s::kSourceVoltage.path)), n, path, s::kSourceVoltage.path);
  const Eigen::VectorXcd port_z =
      Column(hdf5::ReadComplex(file, S(s::kPortImpedance.path)), n, path, s::kPortImpedance.path);
  if (kinds.size() != n) {
    throw IoError(path, S(s::kPortKind.path) + " has " + std::to_string(kinds.size()) +
                            " values for " + std::to_string(n) + " dipoles");
  }
  for (std::size_t m = 0; m < n; ++m) {
    Port p;
    const auto e = static_cast<Eigen::Index>(m);
    if (kinds[m] == ToString(PortKind::kDrive)) {
      p.kind = PortKind::kDrive;
    } else if (kinds[m] == ToString(PortKind::kLoad)) {
      p.kind = PortKind::kLoad;
    } else if (kinds[m] == ToString(PortKind::kCurrent)) {
      p.current_a = currents[e];
    } else {
      throw IoError(path, "not a valid lobecast result: unknown port kind '" + kinds[m] + "'");
    }
    p.voltage_v = source[e];
    p.impedance_ohm = port_z[e];
    out.ports.push_back(p);
  }
  c.circuit.current_a = currents;
  c.circuit.terminal_voltage_v = Column(hdf5::ReadComplex(file, S(s::kTerminalVoltage.path)), n,
                                        path, s::kTerminalVoltage.path);
  c.circuit.input_impedance_ohm =
      Column(hdf5::ReadComplex(file, S(s::kInputImpedance.path)), n, path, s::kInputImpedance.path);
  c.active_impedance_ohm = Column(hdf5::ReadComplex(file, S(s::kActiveImpedance.path)), n, path,
                                  s::kActiveImpedance.path);
  c.self_reactance_ohm =
      Column(hdf5::ReadDoubles(file, S(s::kSelfReactance.path)), n, path, s::kSelfReactance.path);
  c.loss_resistance_ohm =
      Column(hdf5::ReadDoubles(file, S(s::kLossResistance.path)), n, path, s::kLossResistance.path);
  c.reflection =
      Column(hdf5::ReadComplex(file, S(s::kReflection.path)), n, path, s::kReflection.path);
  c.vswr = Column(hdf5::ReadDoubles(file, S(s::kVswr.path)), n, path, s::kVswr.path);
  c.circuit.accepted_w = Column(hdf5::ReadDoubles(file, S(s::kElementAccepted.path)), n, path,
                                s::kElementAccepted.path);
  c.circuit.supplied_w = Column(hdf5::ReadDoubles(file, S(s::kElementSupplied.path)), n, path,
                                s::kElementSupplied.path);
  c.close_pairs = FindClosePairs(array);
  return out;
}

}  // namespace

std::optional<StoredCoupling> ReadCoupling(const std::string& path, const Array& array,
                                           const Eigen::VectorXcd& currents) {
  hdf5::ErrorSilencer silencer;
  try {
    return ReadOpenCoupling(path, array, currents);
  } catch (const NotAResultError&) {
    throw;
  } catch (const IoError& e) {
    throw NotAResultError(path, std::string(kIncompleteResult) + e.detail());
  }
}

}  // namespace lobecast
