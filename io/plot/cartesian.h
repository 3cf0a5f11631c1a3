// Cartesian cut: the same traces as the polar cut against the cut angle (deg),
// levels in dBi (or dB below the cut's peak) from the floor up, with the -3 dB
// level and the figures of the pattern analysis: on a principal plane its half-power
// points and null crossings (offsets from the peak) are marked.
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

// The figures come from `analysis` (may be null: none drawn). A cut that goes round
// the whole circle is drawn centred on its largest sample when that lies more than
// 90 deg from the middle (an endfire beam at phi = 0 is not split across the edges).
CartesianGeometry DrawCartesian(const Canvas& c, const StoredResult& r,
                                const PatternAnalysis* analysis, const PlotOptions& o);

}  // namespace lobecast::plot
