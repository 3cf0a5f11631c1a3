// Reading an array description (TOML) into an ArrayDescription.
//
// The CONVENTIONS §3 minimum always works; this reader adds a few keys around it.
// Every key, its type and default (keys are case-sensitive; unknown keys are
// errors at every level, so a typo never falls back to a default silently):
//
//   name         = "..."       optional free text, carried to the output
//   description  = "..."       optional free text, carried to the output
//   frequency    = 433.92e6    REQUIRED. A number is Hz; a string carries its unit:
//                  "433.92 MHz" with unit Hz, kHz, MHz, GHz or THz, spelled
//                  exactly so ("mHz" is rejected, never read as MHz). > 0, finite.
//   frequencies  = ["9.5 GHz", "10 GHz", 10.5e9]
//                              instead of `frequency` (both: an error): a frequency
//                              sweep. Each value as `frequency`; at least one, all
//                              distinct (1e-9 relative). The FIRST is the design
//                              frequency: steering, length_unit = "wavelength", the
//                              usual result datasets. Or a band:
//                  { start = "9 GHz", stop = "11 GHz", count = 21, design = "10 GHz" }
//                              count (>= 1) points from start to stop (> start when
//                              count > 1), evenly spaced; design (optional, default
//                              start) goes first and is not repeated. Lengths are
//                              checked against the highest frequency's wavelength.
//   ground       = "none"      "none" (default) or "pec" (the plane z = 0; every
//                              dipole must then be at z > 0). Case-insensitive.
//   length_unit  = "m"         unit of every position and length, in TOML and CSV:
//                              "m" (default), "cm", "mm" or "wavelength" (c0/f).
//   dipoles_csv  = "file.csv"  optional CSV of dipoles (format in csv_dipoles.h),
//                              relative to the TOML file's directory.
//   [grid]                     optional; degrees, stop inclusive
//   theta = { start, stop, step }   default { start = 0, stop = 180, step = 1 };
//                                   0 <= start <= stop <= 180
//   phi   = { start, stop, step }   default { start = 0, stop = 360, step = 1 };
//                                   0 <= start <= stop <= 360
//           In a range table start and stop are required, step defaults to 1 and
//           must be > 0. A bare number (theta = 90) is a single angle (a cut).
//   [[dipole]]                 zero or more; together with the CSV rows at least one
//   position     = [x, y, z]   REQUIRED, length_unit
//   orientation  = [ux, uy, uz] REQUIRED, any non-zero vector, normalized on read
//   length       = 0.01        REQUIRED, length_unit, > 0
//   distribution = "uniform"   or "triangular"; default uniform. Case-insensitive.
//   current      = { magnitude = 1.0, phase = 0.0 }
//                              REQUIRED (no default drive: the currents are the
//                              design, and a silent 1 A would hide a forgotten
//                              line). magnitude A peak, required, >= 0 (0 switches
//                              an element off; a negative value is refused, use
//                              phase = 180); phase degrees, default 0.
//
// Dipole order, which is the index in every message and output dataset: the
// [[dipole]] tables in file order, then the CSV rows in file order.
//
// Physical checks with located messages: a dipole longer than lambda/2 is refused
// and one longer than lambda/10 gets a warning (the short-dipole model holds for
// l well below lambda/10 -- common practice, Balanis 4th ed. ch. 4; CONVENTIONS §1).
// The engine's Validate() runs last as a backstop.
#pragma once

#include <string>
#include <string_view>

#include "io/input/array_description.h"
#include "io/input_error.h"

namespace lobecast {

// Reads and parses `path`. Throws InputError for any rejected input, including a
// file that cannot be read.
ArrayDescription ReadArrayDescription(const std::string& path);

// Parses TOML text. path_for_messages names the file in messages and becomes
// source_path; base_dir_for_csv resolves a relative `dipoles_csv` (empty: the
// current directory). Throws InputError.
ArrayDescription ParseArrayDescription(std::string_view text, const std::string& path_for_messages,
                                       const std::string& base_dir_for_csv);

}  // namespace lobecast
