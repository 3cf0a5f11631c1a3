// An array description as read from a file: the engine's Array and grid, plus
// everything io/ and cli/ need to talk about it (names, source text, where each
// dipole was written, warnings). Describe first, compute later: the engine never
// sees files, and error messages can still point at a line.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "engine/coupling/circuit.h"
#include "engine/coupling/coupling.h"
#include "engine/grid.h"
#include "engine/types.h"
#include "io/input/design.h"
#include "io/input_error.h"

namespace lobecast {

struct ArrayDescription {
  // Free text carried to the output; empty when the file has no `name` /
  // `description` key.
  std::string name;
  std::string description;

  // The TOML file as given (path for messages) and its verbatim text, embedded in
  // the HDF5 result so a result file documents its own input.
  std::string source_path;
  std::string source_text;
  // The CSV file named by `dipoles_csv` (resolved path) and its verbatim text;
  // both empty when the description has no CSV.
  std::string csv_path;
  std::string csv_text;

  // Unit the file used for positions and lengths ("m", "cm", "mm", "wavelength").
  // Informational: every value in `array` is already in metres.
  std::string length_unit = "m";

  Array array;  // frequency, ground and dipoles, SI; orientations are unit vectors
  // A frequency sweep (`frequencies`): every frequency to compute, in the file's order,
  // the first the design frequency (== array.frequency_hz: steering, wavelength units).
  // Empty when the file gives `frequency`.
  std::vector<double> frequencies_hz;
  // The terminal currents (A, complex peak), one per dipole, kept apart from the
  // geometry: the given currents, and 0 for driven and loaded dipoles until
  // SolveArrayCircuit (solve_circuit.h) fills them from the solved circuit.
  Eigen::VectorXcd currents;

  // What drives each dipole (one per dipole): a forced current (its value is also in
  // `currents`), a voltage source behind an impedance, or a load; and each dipole's
  // wire (radius, self reactance, conductivity; all optional); CSV rows as
  // [[dipole]] tables (io/input/csv_dipoles.h: the port column).
  std::vector<Port> ports;
  std::vector<Wire> wires;
  double reference_impedance_ohm = 50;  // `reference_impedance`: Z0 for reflection and VSWR

  AngleRange theta;  // degrees, as written (or the defaults)
  AngleRange phi;
  AngularGrid grid;  // theta.Values() x phi.Values()

  // Where dipole i was defined: its [[dipole]] table header or its CSV row.
  std::vector<SourceLocation> dipole_locations;

  // Accepted but worth saying, one line each, "FILE:LINE:COL: warning: ..."
  // (e.g. a dipole longer than lambda/10, a grid stop not on the step lattice).
  std::vector<std::string> warnings;

  // Set when the file is a design (it has a [lattice] table): what it asked for and
  // what was generated (io/input/design.h). Unset for a plain array description.
  std::optional<DesignInfo> design;
};

}  // namespace lobecast
