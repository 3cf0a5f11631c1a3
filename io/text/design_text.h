// Text of a design (CONVENTIONS §3, design files): what `synth` prints, and the
// explicit array description it writes (plain [[dipole]] tables, or a CSV element
// table beside it for large arrays), which reads back to the same bits.
#pragma once

#include <cstddef>
#include <string>

#include "io/input/array_description.h"

namespace lobecast::text {

// The shortest text that reads back as v ("0.01", "1.05e+10"), and the content of a
// TOML basic string (quotes, backslashes and newlines escaped): for every file written
// from a design (ArrayFile, the sizing candidates).
std::string ShortestNumber(double v);
std::string TomlEscaped(const std::string& in);

// Lines: lattice and element count, taper and its efficiency, steering, grating
// lobes, notes of the excitation synthesis. Empty for a plain array description.
std::string DescribeDesign(const ArrayDescription& desc);

// Above this many dipoles `synth` writes them as a CSV table (when every dipole is
// current-forced; the CSV has no drive or load columns).
inline constexpr std::size_t kCsvThreshold = 256;

struct ArrayFileText {
  std::string toml;
  std::string csv;  // empty: the dipoles are [[dipole]] tables
};

// The explicit array description of `desc` (lengths in metres), headed by comments
// naming the design it came from and DescribeDesign's lines. csv_name: the CSV file
// the TOML names in dipoles_csv (relative to the TOML's folder), or empty for
// tables; ignored (tables) when a dipole has a drive or a load.
ArrayFileText ArrayFile(const ArrayDescription& desc, const std::string& csv_name);

// Whether ArrayFile would write a CSV for this description with a CSV name.
bool WritesCsv(const ArrayDescription& desc);

}  // namespace lobecast::text
