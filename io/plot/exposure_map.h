// The exposure map (`lobecast exposure --map`): over the stored grid, the distance at
// which the far-field power density falls to the limit given, r = sqrt(P G / (4 pi
// S_lim)) (engine/link/exposure.h), in metres on the lobecast ramp from 0 (dark) to
// the largest distance (light), with contours, the worst direction marked, and the
// exposure caution in the title block. Drawn with the map machinery of map_panel.h
// and map.h (panel, raster, contours, colour bar) in any map projection.
#pragma once

#include <string>
#include <utility>

#include "io/hdf5/result_reader.h"
#include "io/plot/map.h"
#include "io/plot/options.h"

namespace lobecast::plot {

struct ExposureMapOptions {
  double power_w = 0;
  double gain_factor = 1;  // gain / directivity (link_station.h, GainBasis)
  std::string gain_name = "directivity";
  double limit_w_m2 = 0;
  std::pair<double, double> worst_deg{0, 0};  // (theta, phi) marked
  double worst_distance_m = 0;                // its label (the refined figure)
  double far_field_from_m = 0;                // drawn as a dashed contour when reached
  MapProjection projection = MapProjection::kThetaPhi;
  ImageSize size;
};

struct ExposureMapGeometry {
  MapPanel panel;
  ColourBar bar;  // metres, value_bottom 0
  double max_distance_m = 0;
  double contour_step_m = 0;
};

// Writes the map to `path` (.png, .svg or .pdf; atomically). Throws InputError for a
// bad extension or size, IoError when the file cannot be written.
ExposureMapGeometry WriteExposureMap(const StoredResult& r, const ExposureMapOptions& o,
                                     const std::string& path);

}  // namespace lobecast::plot
