// The scan impedance (engine/coupling/scan.h) as a picture: each element's active
// reflection |Gamma| (linear, 0 at the bottom, 1 at the top) against the scan angle
// theta (deg), one line per element in colours from the lobecast ramp
// (colormap.h), with the title, axis labels, a legend and a caption saying what
// Gamma is measured against. Up to kScanPlotAllUpTo elements every element is
// drawn; beyond that the worst, the median and the best by mean |Gamma| over the
// scan. A |Gamma| above 1 (an active resistance below zero) raises the top of
// the axis rather than being clipped.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "engine/coupling/scan.h"
#include "io/plot/canvas.h"

namespace lobecast::plot {

inline constexpr Eigen::Index kScanPlotAllUpTo = 16;
// Neighbouring ramp colours get close with many lines: beyond this many, every
// second line (in legend order) is dashed as well.
inline constexpr std::size_t kScanPlotSolidUpTo = 4;

struct ScanPlotLabels {
  std::string array_name;  // "unnamed array" when empty
  double frequency_hz = 0;
  // What Gamma is measured against, the text the table prints after "against".
  std::string reference;
};

// One drawn line: the element (column of the table), its colour and legend text.
struct ScanPlotLine {
  Eigen::Index element = 0;
  Colour colour;
  std::string label;    // "#3", or "#3 worst" when a few stand for many
  bool dashed = false;  // every second line when more than kScanPlotSolidUpTo are drawn
};

struct ScanPlotGeometry {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;  // the plot frame
  double theta_min_deg = 0, theta_max_deg = 0;                  // left and right edges
  double gamma_top = 1;                                         // top edge (bottom is 0)
  std::vector<ScanPlotLine> lines;                              // in legend order
  double XOf(double theta_deg) const;
  // Clamped to the frame.
  double YOf(double gamma) const;
};

// The elements drawn for a table with `n` columns, in legend order: all of them
// up to kScanPlotAllUpTo, else the worst, the median and the best by mean |Gamma|
// (an element with no finite |Gamma| ranks last and is never the median or best).
std::vector<Eigen::Index> ScanPlotElements(const ScanImpedanceTable& t);

// Draws to `path` (.png, .svg or .pdf). Throws InputError for another extension or
// a bad size, IoError when the file cannot be written; nothing is left at `path`
// on failure.
ScanPlotGeometry WriteScanPlot(const ScanImpedanceTable& t, const ScanPlotLabels& labels,
                               const std::string& path, const ImageSize& size = {});

}  // namespace lobecast::plot
