// Decibels: the project's one conversion between linear ratios and dB.
//
// Conventions (every printed, stored and plotted dB value follows them):
//   - 10 log10 for powers and everything proportional to power (directivity,
//     intensity, a ratio of two of them); 20 log10 for field amplitudes.
//   - 0 and negative ratios give -inf: no power is below every floor (a negative
//     power ratio only arises from rounding). +inf gives +inf.
//   - NaN gives NaN (log10 of NaN): no number stays no number.
//   - A ratio of two powers (XPD, front-to-back) is +-inf against an exact zero
//     (PowerRatioDb). Powers that are rounding are made exact zeros before, by the
//     numerical floor (engine/rounding_floor.h), not here.
#pragma once

#include <cmath>
#include <limits>

namespace lobecast {

// 10 log10(ratio) of a power ratio: -inf for ratio <= 0, NaN for NaN.
inline double ToDb(double ratio) {
  if (ratio <= 0.0) return -std::numeric_limits<double>::infinity();
  return 10.0 * std::log10(ratio);
}

// 20 log10(ratio) of a field-amplitude ratio: -inf for ratio <= 0, NaN for NaN.
inline double AmplitudeToDb(double ratio) {
  if (ratio <= 0.0) return -std::numeric_limits<double>::infinity();
  return 20.0 * std::log10(ratio);
}

// The power ratio of a level in dB: 10^(db / 10).
inline double FromDb(double db) { return std::pow(10.0, db / 10.0); }

// 10 log10(numerator / denominator) for two powers (or directivities) >= 0 that are
// compared as a ratio (XPD, F/B): +inf when the denominator is zero (the callers floor
// their fields first, so a rounding-level power is an exact zero here), -inf when the
// numerator is, NaN when both are.
inline double PowerRatioDb(double numerator, double denominator) {
  if (numerator <= 0.0 && denominator <= 0.0) return std::numeric_limits<double>::quiet_NaN();
  if (denominator <= 0.0) return std::numeric_limits<double>::infinity();
  if (numerator <= 0.0) return -std::numeric_limits<double>::infinity();
  return ToDb(numerator / denominator);
}

}  // namespace lobecast
