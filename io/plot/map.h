// Map: the quantity over the whole grid as an image in a projection
// (theta-phi, azimuth-elevation or u-v), on the lobecast ramp
// (plot_colormap.h) from the floor (dark) to the peak (light), with a colour
// bar, contour lines every `contour_step_db` below the peak (the -3 dB one in
// red), and the pattern analysis' null loci marked with crosses (a cone as a dotted
// curve), where the colour alone cannot show how deep they are.
#pragma once

#include <string>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/map_panel.h"
#include "io/plot/options.h"

namespace lobecast::plot {

// A vertical (or horizontal) colour bar: `value_top` at the top (right) end.
struct ColourBar {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;
  double value_top = 0, value_bottom = 0;
  bool horizontal = false;
};
// Draws the bar with ticks every `step` and a title; `t_of` maps a value to
// the ramp position in [0, 1].
void DrawColourBar(const Canvas& c, const ColourBar& bar, double step, const std::string& title);

struct MapGeometry {
  std::vector<MapPanel> panels;
  ColourBar bar;
  double db_top = 0, db_floor = 0;                   // plotted units, the ends of the colour scale
  std::vector<std::pair<double, double>> nulls_deg;  // (theta, phi) marked
};

// The nulls marked are the analysis' null loci (none when `analysis` is null).
MapGeometry DrawMap(const Canvas& c, const StoredResult& r, const PatternAnalysis* analysis,
                    const PlotOptions& o);

// Directions (theta, phi deg) that mark the analysis' null loci on a map: a point or a
// curve's deepest direction once, a cone every 2 deg around its axis (visible part).
std::vector<std::pair<double, double>> NullLocusMarks(const PatternAnalysis& a, Ground ground);

}  // namespace lobecast::plot
