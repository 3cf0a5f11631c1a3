// Dipoles from a CSV table, for arrays too large to write as [[dipole]] tables.
//
// Format (one dipole per row):
//   # comment lines and blank lines are skipped anywhere
//   x, y, z, ux, uy, uz, length, magnitude, phase, distribution
//   0.0, 0.0, 0.17, 0, 0, 1, 0.01, 1.0, 0.0, uniform
// - The first non-blank, non-comment line is the header. Columns are found by
//   header name (case-insensitive, any order); x, y, z, ux, uy, uz, length,
//   magnitude and phase are required, distribution is optional (an empty cell or a
//   missing column means uniform), and so are radius (length unit), self_reactance
//   (ohm) and conductivity (S/m), the wire keys of a [[dipole]] table (an empty cell
//   or a missing column: not given). Unknown or repeated header names are errors,
//   like unknown TOML keys.
// - Circuit columns, the current, drive and load keys of a [[dipole]] table
//   (CONVENTIONS §3): `port` is current, drive or load (case-insensitive; an empty
//   cell or no port column: current). With a port column, magnitude and phase are
//   optional columns. Per row:
//     current  magnitude (A peak, required), phase (deg, default 0)
//     drive    voltage (V peak, >= 0, required), phase (deg of the voltage, default
//              0), resistance and reactance (ohm: the source impedance; resistance
//              default the reference impedance, reactance 0)
//     load     resistance and reactance (ohm, default 0: both empty is a short)
//   A cell that belongs to another kind of row is an error (a magnitude in a drive
//   row, a voltage in a load row...), never ignored; resistances are >= 0. A drive
//   or load row needs a self reactance (a self_reactance cell, or a radius cell
//   with a triangular distribution), as in TOML.
//     x, y, z, ux, uy, uz, length, distribution, radius, port, magnitude, phase, voltage,
//     resistance, reactance 0, 0, 0, 0, 0, 1, 0.1, triangular, 0.001, drive, , 0, 1, 50, 0.25, 0,
//     0, 0, 0, 1, 0.1, triangular, 0.001, load, , , , 0, -300 0.5, 0, 0, 0, 0, 1, 0.1, triangular,
//     , current, 0.5, 90, , ,
// - Cells are separated by commas and trimmed of blanks; there is no quoting (no
//   cell ever needs a comma). A header with ';' in it (a spreadsheet's export in a
//   decimal-comma locale) is refused with a hint to save it with ',' separators. Every row has
//   exactly as many cells as the header.
// - x, y, z and length are in the description's length_unit; (ux, uy, uz) is any
//   non-zero vector, normalized on read; magnitude is A peak (>= 0), phase degrees.
//
// Errors are InputError located at the CSV file, line and column of the cell,
// keyed 'dipole[N].<column>' with N the dipole's 0-based index in the whole array.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "engine/coupling/coupling.h"
#include "engine/types.h"
#include "io/input_error.h"

namespace lobecast {

// Header names the reader knows, in the order error messages list them.
inline constexpr std::string_view kCsvColumnList =
    "x, y, z, ux, uy, uz, length, magnitude, phase, distribution, radius, self_reactance, "
    "conductivity, port, voltage, resistance, reactance";

struct CsvDipole {
  Dipole dipole;               // position and length in metres, orientation normalized
  Port port;                   // current (as current_a), drive or load
  Complex current_a = 0.0;     // the row's terminal current (A, complex peak); 0 unless current
  Wire wire;                   // radius (m), self_reactance, conductivity when given
  SourceLocation row;          // the row (column 1)
  SourceLocation z_cell;       // the z cell, for ground-plane checks
  SourceLocation length_cell;  // the length cell, for wavelength checks
};

// metres_per_unit converts x, y, z and length to metres; first_index is the array
// index of the first row's dipole (the number of dipoles defined before the CSV);
// reference_impedance_ohm is a drive row's default source resistance (the
// description's reference_impedance). Checks what a row alone can tell (numbers,
// finite, length > 0, magnitude >= 0, orientation non-zero, distribution known, one
// kind of port with its cells); the caller checks the rest.
std::vector<CsvDipole> ParseCsvDipoles(std::string_view text, const std::string& path_for_messages,
                                       double metres_per_unit, std::size_t first_index,
                                       double reference_impedance_ohm = 50);

}  // namespace lobecast
