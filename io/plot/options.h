// What to plot and how: the options behind `lobecast plot`, with defaults in
// place and units in the names.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "io/plot/canvas.h"
#include "io/plot/cuts.h"
#include "io/plot/quantity.h"

namespace lobecast::plot {

enum class PlotKind { kPolar, kCartesian, kMap, kPolarization };
std::string_view ToString(PlotKind k);  // "polar", "cartesian", "map", "polarization"
std::optional<PlotKind> PlotKindFromString(std::string_view s);

// How a map places directions on the page:
//   theta-phi  phi across (deg), theta down (0 at the top)
//   az-el      azimuth = phi (from +x toward +y) across, elevation = 90 - theta up
//   uv         u = sin(theta) cos(phi) across, v = sin(theta) sin(phi) up: the
//              upper hemisphere (theta <= 90) seen from above, the unit disk
enum class MapProjection { kThetaPhi, kAzEl, kUv };
std::string_view ToString(MapProjection p);  // "theta-phi", "az-el", "uv"
std::optional<MapProjection> MapProjectionFromString(std::string_view s);

struct PlotOptions {
  PlotKind kind = PlotKind::kPolar;
  // Cuts (polar, cartesian): the principal plane phi = 0 unless asked.
  CutSpec cut;
  // Unset: for cuts co/cross or E_theta/E_phi (see CutQuantity in
  // plot_cut_traces.h), for maps total directivity.
  std::optional<Quantity> quantity;
  // For Quantity::kRealizedGain: P_rad / P_available from the result's /coupling
  // (the realized gain is the directivity times it); unused otherwise.
  double realized_gain_factor = 0;
  ReferenceChoice reference;  // for co/cross; auto by default
  // The lowest level shown, dB below the plotted peak. 40 dB keeps side lobes
  // of ordinary tapers in view without letting nulls flatten the scale.
  double floor_db = 40.0;
  // dB relative to the peak (0 dB at the peak) instead of dBi.
  bool normalized = false;
  MapProjection projection = MapProjection::kThetaPhi;
  // Spacing of map contour lines, dB (3 dB resolves the main beam, 10 dB the
  // side lobes).
  double contour_step_db = 10.0;
  // Axial ratios at or above this count as "near linear" on the polarization
  // map's colour scale, dB.
  double axial_ratio_max_db = 30.0;
  ImageSize size;

  // False, with a message naming the option, the value and the rule, unless
  // 1 <= floor_db <= 200, 0.5 <= contour_step_db <= 50,
  // 1 <= axial_ratio_max_db <= 100 and the size is valid.
  bool IsValid(std::string* why) const;
};

}  // namespace lobecast::plot
