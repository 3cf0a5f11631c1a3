// A frequency sweep read back from a result file (the layout of sweep_writer.h), for
// `report`, `plot --kind sweep` and `export --sweep`.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "engine/sweep/frequency_sweep.h"

namespace lobecast {

struct StoredSweep {
  std::vector<FrequencyPoint> points;  // file order, the design frequency first
  double design_frequency_hz = 0;
  std::string steering;  // "phase", "delay" or "none"
  bool coupled = false;  // the circuit's columns are there
  std::string gain_definition;
};

// std::nullopt when the file has no /sweep group (a single-frequency result);
// NotAResultError when the group is there but incomplete or inconsistent. The
// (F, Nt, Np) directivity is not read.
std::optional<StoredSweep> ReadSweep(const std::string& path);

}  // namespace lobecast
