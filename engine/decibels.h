// Decibels: the project's one conversion between linear ratios and dB.
//
// Conventions (every printed, stored and plotted dB value follows them):
//   - 10 log10 for powers and everything proportional to power (directivity,
//     intensity, a ratio of two of them); 20 log10 for field amplitudes.
//   - 0 and negative ratios give -inf: no power is below every floor (a negative
//     power ratio only arises from rounding). +inf gives +inf.
//   - NaN gives NaN (log10 of NaN): no number stays no number.
//   - A ratio of two powers that are both computed (XPD, front-to-back) treats one
//     below kRoundingPowerRatio of the other as zero (PowerRatioDb).
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

// A power ratio below which the smaller of two powers is rounding noise of the larger:
// 1e-30, i.e. a field below ~1e-15 of the other (a few ulps of double precision), 300 dB.
inline constexpr double kRoundingPowerRatio = 1e-30;

// 10 log10(numerator / denominator) for two powers (or directivities) >= 0 that are
// compared as a ratio (XPD, F/B): +inf when the denominator is below kRoundingPowerRatio
// of the numerator (zero up to rounding, not a finite ~320 dB of noise), -inf in the
// opposite case, NaN when both are zero.
inline double PowerRatioDb(double numerator, double denominator) {
  if (numerator == 0.0 && denominator == 0.0) return std::numeric_limits<double>::quiet_NaN();
  if (denominator <= kRoundingPowerRatio * numerator) {
    return std::numeric_limits<double>::infinity();
  }
  if (numerator <= kRoundingPowerRatio * denominator) {
    return -std::numeric_limits<double>::infinity();
  }
  return ToDb(numerator / denominator);
}

}  // namespace lobecast
