// What every lobecast plot shares: the title block (array name, frequency,
// quantity with units, cut or map definition), the trace and grid colours, and
// number formatting for labels.
#pragma once

#include <cstddef>
#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"

namespace lobecast::plot {

// "433.92 MHz", "2.45 GHz".
std::string FormatFrequency(double hz);
// A tick label: "%g" without a "-0".
std::string Tick(double v);
// printf-style into a std::string.
std::string Format(const char* fmt, ...) __attribute__((format(printf, 1, 2)));

// The array's name (or the input file's stem, or "unnamed array"), frequency,
// element count and ground: "Orrindale Lane calibration probe - 433.92 MHz, 1 dipole, free space".
std::string ArrayLine(const StoredResult& r);

// Splits `text` into lines no wider than `width_px` at spaces (a single word
// wider than that keeps a line of its own).
std::vector<std::string> WrapText(const Canvas& c, const std::string& text, double size_px,
                                  double width_px, bool bold = false);

// Draws the title block at the top left: the first line bold, the rest
// regular, each wrapped to the canvas width less equal margins on both sides.
// Returns the y just below it (px).
double DrawTitleBlock(const Canvas& c, const std::vector<std::string>& lines);

// Trace styles: the main trace, its companion (co/cross), guides.
Colour MainTraceColour();
Colour CompanionTraceColour();
Colour GridColour();
Colour TextColour();
Colour HalfPowerColour();
Colour MarkerColour();

// Sets line width and dash for a trace or a guide line.
void SetSolid(const Canvas& c, double width_px);
// A null's mark: an x of half-size s px, black on a white halo, at (x, y).
void DrawNullMark(const Canvas& c, double x, double y, double s);
void SetDashed(const Canvas& c, double width_px, double dash_px);

// Strokes a trace: the solid polyline through point_px(0) .. point_px(n - 1)
// (device x, y) with round joins.
void DrawTrace(const Canvas& c, const Colour& colour, double width_px, std::size_t n,
               const std::function<std::pair<double, double>(std::size_t)>& point_px);

// A cartesian plot frame in device px.
struct FrameBox {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;
};
// A grey grid line across the frame at height y (a row) or at x (a column), with
// its tick label outside the frame (left of it, or below it).
void DrawGridRow(const Canvas& c, const FrameBox& b, double y, const std::string& label);
void DrawGridColumn(const Canvas& c, const FrameBox& b, double x, const std::string& label);
// The axis titles (x under the tick labels, y turned up along the left edge) and
// the frame's outline.
void DrawAxisTitlesAndOutline(const Canvas& c, const FrameBox& b, const std::string& x_title,
                              const std::string& y_title);

// A step for ring / axis labels in dB: 10 when the range spans more than 25 dB,
// 5 above 10 dB, else 2.
double DbLabelStep(double range_db);

}  // namespace lobecast::plot
