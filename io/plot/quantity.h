// What a plot shows: the quantity (total directivity, or the share of it in one
// polarization component, "partial directivity") and the polarization reference
// for co/cross. Values are linear (not dB); the plots convert.
//
// Partial directivity of a component E_c: D_c = D |E_c|^2 / (|E_theta|^2 +
// |E_phi|^2), so the parts of an orthogonal pair add up to D (IEEE Std 145-2013,
// "partial directivity"). Co and cross are Ludwig's third definition for a linear
// x or y reference, or the two circular hands (engine/polarization.h).
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "engine/polarization.h"
#include "io/hdf5/result_reader.h"

namespace lobecast::plot {

// kRealizedGain: 4 pi U / P_available (/pattern/realized_gain of a result with voltage
// sources, coupling.h), i.e. the directivity times P_rad / P_available
// (PlotOptions::realized_gain_factor): QuantityOf gives the directivity, and the cut
// and the map multiply by the factor.
enum class Quantity { kDirectivity, kCo, kCross, kTheta, kPhi, kRealizedGain };
// "directivity", "co", "cross", "theta", "phi", "realized-gain"
std::string_view ToString(Quantity q);
// Case-insensitive; std::nullopt for an unknown name.
std::optional<Quantity> QuantityFromString(std::string_view s);
// The component a trace is drawn against: co <-> cross, theta <-> phi;
// directivity has none.
std::optional<Quantity> CompanionOf(Quantity q);

// "auto" or a fixed reference.
struct ReferenceChoice {
  bool automatic = true;
  PolarizationReference fixed = PolarizationReference::kLinearX;
};
// "auto", "x", "y", "rhcp", "lhcp", "theta", "phi" (case-insensitive).
std::optional<ReferenceChoice> ReferenceChoiceFromString(std::string_view s);

// auto: AutoReference (engine/analysis/pattern_analysis.h).
PolarizationReference ResolveReference(const StoredResult& r, const ReferenceChoice& choice);

// Human-readable label, e.g. "co-pol (Ludwig-3, x reference)", "E_theta part".
std::string QuantityLabel(Quantity q, PolarizationReference ref);

// The quantity at flattened grid index k (theta-major), linear.
double QuantityAt(const StoredResult& r, std::size_t k, Quantity q, PolarizationReference ref);
// The same from a direction's field (V), directivity and phi (rad); co and cross parts
// below floor_v (PatternResult::field_floor_v) are exact zeros.
double QuantityOf(double directivity, Complex e_theta, Complex e_phi, double phi_rad, Quantity q,
                  PolarizationReference ref, double floor_v);
// The quantity over the whole grid, linear, theta-major.
std::vector<double> QuantityOnGrid(const StoredResult& r, Quantity q, PolarizationReference ref);

}  // namespace lobecast::plot
