// Human-readable text for the terminal: the array as described, and the short
// summary `compute` prints. Plain text, units on every number.
#pragma once

#include <string>
#include <string_view>

#include "engine/pattern.h"
#include "io/input/array_description.h"

namespace lobecast::text {

// "theta 30 deg, phi 45 deg"; on the z axis, where phi is immaterial, "theta 0 deg (the +z axis)".
std::string FormatDirection(double theta_deg, double phi_deg);
// "433.92 MHz", "2.45 GHz", "50 kHz".
std::string FormatFrequency(double hz);
// 10 log10(x) with one decimal, "-inf" for 0.
std::string FormatDb(double linear);

// What `check` prints: name, frequency, wavelength, ground, grid, dipoles.
std::string DescribeArray(const ArrayDescription& desc);

// What `compute` prints after a run. A streamed run passes the analysis' view as
// `result` (it holds the peak, engine/pattern_stream.h) and the grid computed as
// `computed_grid`.
std::string DescribeResult(const ArrayDescription& desc, const PatternResult& result,
                           const std::string& output_path, double wall_seconds,
                           const AngularGrid* computed_grid = nullptr);

// The safety note printed with every result (CONVENTIONS §5).
std::string SafetyNote();
// A note for people: `label` ("note:"), then `text` wrapped at about 88 columns with
// continuation lines under its first word.
std::string WrappedNote(std::string_view label, std::string_view text);

// The power line of `check` and `compute`: "power  P W radiated for the given (or
// solved) currents (closed form)", and a caution line when P keeps fewer than
// kPowerDigitsWanted digits (PowerDigitsNote). how replaces "closed form" (e.g. the
// quadrature and its bound).
std::string PowerLine(const ArrayDescription& desc, double radiated_power_w,
                      double power_significant_digits, std::string_view how = "closed form");

}  // namespace lobecast::text
