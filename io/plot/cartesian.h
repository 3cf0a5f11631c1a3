// Cartesian cut: the same traces as the polar cut against the cut angle (deg),
// levels in dBi (or dB below the cut's peak) from the floor up, with the -3 dB
// level, the half-power beamwidth (between the linearly interpolated -3 dB
// crossings) and the highest side lobe annotated.
#pragma once

#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/options.h"

namespace lobecast::plot {

struct CartesianGeometry {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;  // the plot frame
  double angle_min_deg = 0, angle_max_deg = 0;                  // left and right edges
  double db_top = 0, db_floor = 0;                              // top and bottom edges
  double XOf(double angle_deg) const;
  // Clamped to the frame; -inf and NaN go to the floor.
  double YOf(double db) const;
};

CartesianGeometry DrawCartesian(const Canvas& c, const StoredResult& r, const PlotOptions& o);

}  // namespace lobecast::plot
