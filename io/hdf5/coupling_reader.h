// The circuit of a coupled array read back from a result file (the layout of
// io/hdf5/coupling_writer.h), for `lobecast report`.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "engine/coupling/coupling.h"
#include "engine/types.h"

namespace lobecast {

struct StoredCoupling {
  std::vector<Port> ports;
  // What the file records: impedances, reflection, VSWR, the power budget; the
  // closeness caution recomputed from the array. The impedance matrix is not read.
  CouplingResult result;
};

// std::nullopt when the file has no /coupling group (no driven or loaded dipoles);
// IoError when the group is there but damaged. `array` and `currents` are the
// file's own (StoredResult).
std::optional<StoredCoupling> ReadCoupling(const std::string& path, const Array& array,
                                           const Eigen::VectorXcd& currents);

}  // namespace lobecast
