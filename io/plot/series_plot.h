// Figures against one variable (frequency, scan angle) as stacked panels sharing
// the x axis: `plot --kind sweep` (peak directivity, beam direction, beamwidths and
// side-lobe level against frequency) and `scan --pattern-plot` (the same against scan
// angle). Each panel has its own y axis and unit and one or more series in the trace
// colours of every lobecast plot, dots on every sample, broken where a value is not
// finite (an undefined phi, a beam that never falls to half power); a marked x
// (the design frequency) gets a dashed vertical line.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "io/plot/canvas.h"

namespace lobecast::plot {

struct Series {
  std::string label;
  std::vector<double> y;  // one per x; NaN and infinities are left out
};

struct SeriesPanel {
  std::string y_title;  // with its unit
  std::vector<Series> series;
};

struct SeriesPlotSpec {
  std::vector<std::string> title_lines;  // the first bold
  std::string x_title;                   // with its unit
  std::vector<double> x;                 // need not be sorted (drawn in x order)
  std::vector<SeriesPanel> panels;       // top to bottom
  std::optional<double> marked_x;        // a dashed vertical line (the design frequency)
  std::string caption;
};

struct SeriesPanelGeometry {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;
  double x_min = 0, x_max = 1, y_min = 0, y_max = 1;
  double XOf(double x) const;
  double YOf(double y) const;
};

// Draws to `path` (.png, .svg or .pdf); returns each panel's geometry (top to
// bottom) so tests can find a value's pixel. Throws InputError for another
// extension or a bad size, IoError when the file cannot be written.
std::vector<SeriesPanelGeometry> WriteSeriesPlot(const SeriesPlotSpec& spec,
                                                 const std::string& path,
                                                 const ImageSize& size = {});

}  // namespace lobecast::plot
