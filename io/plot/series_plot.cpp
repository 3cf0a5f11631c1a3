#include "io/plot/series_plot.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <numeric>

#include "engine/constants.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

// A "nice" step (1, 2 or 5 times a power of ten) giving at most `max_intervals`.
double NiceStep(double span, int max_intervals) {
  if (!(span > 0)) return 1.0;
  const double raw = span / max_intervals;
  const double p = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0, 10.0})
    if (m * p >= raw) return m * p;
  return 10.0 * p;
}

// The finite range of a panel's values, widened to whole steps; a flat series gets
// a band of +-1 around it.
void YRange(const SeriesPanel& panel, double& lo, double& hi) {
  lo = INFINITY;
  hi = -INFINITY;
  for (const Series& s : panel.series)
    for (double v : s.y)
      if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  if (!std::isfinite(lo)) lo = 0, hi = 1;
  if (hi - lo < 1e-9 * std::max(1.0, std::abs(hi))) lo -= 1, hi += 1;
  const double step = NiceStep(hi - lo, 4);
  lo = step * std::floor(lo / step + 1e-9);
  hi = step * std::ceil(hi / step - 1e-9);
}

Colour SeriesColour(std::size_t k) {
  return k == 0 ? MainTraceColour() : (k == 1 ? CompanionTraceColour() : MarkerColour());
}

}  // namespace

double SeriesPanelGeometry::XOf(double x) const {
  return left_px + width_px * (x - x_min) / (x_max - x_min);
}

double SeriesPanelGeometry::YOf(double y) const {
  return top_px + height_px * (y_max - std::clamp(y, y_min, y_max)) / (y_max - y_min);
}

std::vector<SeriesPanelGeometry> WriteSeriesPlot(const SeriesPlotSpec& spec,
                                                 const std::string& path, const ImageSize& size) {
  Canvas c(path, size);
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  const double top_y = DrawTitleBlock(c, spec.title_lines);
  const std::vector<std::string> caption_lines =
      WrapText(c, spec.caption, 0.9 * f, c.width() - 1.6 * f);
  const double legend_w = std::max(0.2 * c.width(), 11.0 * f);

  // x in increasing order; the panels share it.
  std::vector<std::size_t> order(spec.x.size());
  std::iota(order.begin(), order.end(), std::size_t{0});
  std::stable_sort(order.begin(), order.end(),
                   [&](std::size_t a, std::size_t b) { return spec.x[a] < spec.x[b]; });
  double x_min = spec.x.empty() ? 0.0 : spec.x[order.front()];
  double x_max = spec.x.empty() ? 1.0 : spec.x[order.back()];
  if (!(x_max > x_min)) x_min -= 0.5, x_max += 0.5;

  const double left = std::round(4.6 * f);
  const double width = std::round(c.width() - legend_w - left - 1.0 * f);
  const double bottom_room = 3.4 * f + 1.25 * 0.9 * f * static_cast<double>(caption_lines.size());
  const double gap = 2.2 * f;
  const std::size_t np = std::max<std::size_t>(spec.panels.size(), 1);
  const double avail = c.height() - (top_y + 0.6 * f) - bottom_room - gap * (np - 1);
  const double panel_h = std::floor(avail / np);

  std::vector<SeriesPanelGeometry> out;
  double y0 = std::round(top_y + 0.6 * f);
  for (std::size_t p = 0; p < spec.panels.size(); ++p) {
    const SeriesPanel& panel = spec.panels[p];
    SeriesPanelGeometry g;
    g.left_px = left;
    g.top_px = y0;
    g.width_px = width;
    g.height_px = panel_h;
    g.x_min = x_min;
    g.x_max = x_max;
    YRange(panel, g.y_min, g.y_max);
    const FrameBox box{g.left_px, g.top_px, g.width_px, g.height_px};
    SetSolid(c, 1.0);
    const double ys = NiceStep(g.y_max - g.y_min, 4);
    for (double v = g.y_min; v <= g.y_max + 1e-9 * ys; v += ys)
      DrawGridRow(c, box, g.YOf(v), Tick(v));
    const bool last = p + 1 == spec.panels.size();
    const double xs = NiceStep(x_max - x_min, 8);
    for (double v = xs * std::ceil(x_min / xs - 1e-9); v <= x_max + 1e-9 * xs; v += xs)
      DrawGridColumn(c, box, g.XOf(v), last ? Tick(v) : "");
    DrawAxisTitlesAndOutline(c, box, last ? spec.x_title : "", panel.y_title);
    if (spec.marked_x) {
      c.SetColour(MarkerColour());
      SetDashed(c, 1.4, 5.0);
      cairo_move_to(cr, g.XOf(*spec.marked_x), g.top_px);
      cairo_line_to(cr, g.XOf(*spec.marked_x), g.top_px + g.height_px);
      cairo_stroke(cr);
    }
    // Each series: a polyline over runs of finite values, and a dot on each.
    double ly = g.top_px + 0.2 * f;
    const double lx = c.width() - legend_w + 0.5 * f;
    for (std::size_t k = 0; k < panel.series.size(); ++k) {
      const Series& s = panel.series[k];
      c.SetColour(SeriesColour(k));
      if (k == 1)
        SetDashed(c, 2.0, 7.0);
      else
        SetSolid(c, 2.0);
      cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
      bool open = false;
      for (std::size_t i : order) {
        const double v = i < s.y.size() ? s.y[i] : NAN;
        if (!std::isfinite(v)) {
          open = false;
          continue;
        }
        if (open)
          cairo_line_to(cr, g.XOf(spec.x[i]), g.YOf(v));
        else
          cairo_move_to(cr, g.XOf(spec.x[i]), g.YOf(v));
        open = true;
      }
      cairo_stroke(cr);
      for (std::size_t i : order) {
        const double v = i < s.y.size() ? s.y[i] : NAN;
        if (!std::isfinite(v)) continue;
        cairo_new_sub_path(cr);
        cairo_arc(cr, g.XOf(spec.x[i]), g.YOf(v), 2.8, 0, 2 * kPi);
      }
      cairo_fill(cr);
      // Legend swatch beside the panel.
      if (k == 1)
        SetDashed(c, 2.4, 7.0);
      else
        SetSolid(c, 2.4);
      cairo_move_to(cr, lx, ly + 0.55 * f);
      cairo_line_to(cr, lx + 2.0 * f, ly + 0.55 * f);
      cairo_stroke(cr);
      c.SetColour(TextColour());
      for (const std::string& part : WrapText(c, s.label, 0.9 * f, legend_w - 3.2 * f)) {
        c.Text(lx + 2.5 * f, ly, part, 0.9 * f, HAlign::kLeft, VAlign::kTop);
        ly += 1.2 * f;
      }
      ly += 0.3 * f;
    }
    out.push_back(g);
    y0 += panel_h + gap;
  }
  c.SetColour(TextColour());
  double caption_y = y0 - gap + 3.0 * f;
  for (const std::string& line : caption_lines) {
    c.Text(0.8 * f, caption_y, line, 0.9 * f, HAlign::kLeft, VAlign::kTop);
    caption_y += 1.25 * 0.9 * f;
  }
  c.Finish();
  return out;
}

}  // namespace lobecast::plot
