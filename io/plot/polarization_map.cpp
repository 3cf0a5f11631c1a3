#include "io/plot/polarization_map.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/decibels.h"
#include "io/plot/colormap.h"
#include "io/plot/frame.h"

namespace lobecast::plot {

MapGeometry DrawPolarizationMap(const Canvas& c, const StoredResult& r, const PlotOptions& o) {
  const AngularGrid& grid = r.result.grid;
  const PatternResult& p = r.result;
  const std::size_t n = grid.size();
  const double ar_max = o.axial_ratio_max_db;
  // Axial ratio clamped to [0, ar_max] (linear, +inf, becomes ar_max); the
  // directivity in dB below the peak decides "weak field".
  std::vector<double> ar(n), rel_db(n), sense(n);
  const double peak = p.directivity.size() > 0 ? p.directivity.maxCoeff() : 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    const double a = p.axial_ratio_db[static_cast<Eigen::Index>(k)];
    ar[k] = std::isnan(a) ? ar_max : std::clamp(a, 0.0, ar_max);
    rel_db[k] = peak > 0 ? ToDb(p.directivity[static_cast<Eigen::Index>(k)] / peak) : -1e300;
    rel_db[k] = std::max(rel_db[k], -1e300);
    sense[k] = ar[k] >= ar_max ? 0.0 : static_cast<double>(p.sense[k]);
  }

  const double top_y = DrawTitleBlock(
      c, {ArrayLine(r),
          Format("Polarization: axial ratio, dB (0 dB circular) and sense (IEEE Std 145-2013); "
                 "AR %g dB or more counts as near linear",
                 ar_max),
          ProjectionDescription(o.projection) +
              Format("; white: field more than %g dB below the peak", o.floor_db)});

  const double f = c.font_px();
  const bool uv = o.projection == MapProjection::kUv;
  const double left_margin = uv ? 2.6 * f : 4.6 * f;
  const double gap = uv ? 2.0 * f : 5.2 * f;
  const double key_h = uv ? 5.2 * f : 6.6 * f;  // x labels and the key below each panel
  const double panel_w = 0.5 * (c.width() - left_margin - gap - 1.2 * f);
  const double panel_top = top_y + 0.8 * f;
  const double panel_h = c.height() - panel_top - key_h - (uv ? 0.0 : 1.6 * f);
  MapGeometry g;
  g.panels.push_back(LayoutPanel(o.projection, grid, left_margin, panel_top, panel_w, panel_h));
  g.panels.push_back(
      LayoutPanel(o.projection, grid, left_margin + panel_w + gap, panel_top, panel_w, panel_h));

  const GridSampler ar_s(grid, ar), weak_s(grid, rel_db), sense_s(grid, sense);
  auto weak = [&](double theta, double phi) {
    const auto v = weak_s.Linear(theta, phi);
    return !v || *v < -o.floor_db;
  };
  PaintPanel(c, g.panels[0], [&](double theta, double phi) -> std::optional<std::uint32_t> {
    const auto v = ar_s.Linear(theta, phi);
    if (!v || weak(theta, phi)) return std::nullopt;
    return ToArgb32(Ramp(1.0 - *v / ar_max));
  });
  PaintPanel(c, g.panels[1], [&](double theta, double phi) -> std::optional<std::uint32_t> {
    const auto v = sense_s.Nearest(theta, phi);
    if (!v || weak(theta, phi)) return std::nullopt;
    return ToArgb32(SenseColour(static_cast<int>(*v)));
  });
  const auto contour = Contours(grid, ar, 3.0);
  for (const MapPanel& panel : g.panels) {
    c.SetColour({0, 0, 0, 0.8});
    SetSolid(c, 1.3);
    DrawContourSegments(c, panel, contour);
    SetSolid(c, 1.0);
    DrawPanelAxes(c, panel);
  }
  c.SetColour(TextColour());
  for (const MapPanel& panel : g.panels) {
    const bool first = &panel == &g.panels[0];
    c.Text(panel.left_px + 0.5 * panel.width_px, panel.top_px - 0.3 * f,
           first ? "axial ratio (dB)" : "sense", f, HAlign::kCentre, VAlign::kBottom, true);
  }

  // Keys below the panels.
  const double key_y = g.panels[0].top_px + g.panels[0].height_px + (uv ? 2.4 : 4.0) * f;
  g.bar.horizontal = true;
  g.bar.left_px = g.panels[0].left_px + 0.1 * g.panels[0].width_px;
  g.bar.width_px = 0.8 * g.panels[0].width_px;
  g.bar.top_px = key_y + 1.0 * f;
  g.bar.height_px = 0.9 * f;
  // The bar runs left (near linear, dark) to right (circular, light): ramp t =
  // 1 - AR / max, drawn as value = max - AR.
  g.bar.value_bottom = 0;
  g.bar.value_top = ar_max;
  g.db_top = 0;
  g.db_floor = ar_max;
  {
    cairo_t* cr = c.cr();
    const ColourBar& bar = g.bar;
    const int steps = 256;
    for (int k = 0; k < steps; ++k) {
      const Rgb rgb = Ramp((k + 0.5) / steps);
      cairo_set_source_rgb(cr, rgb.r, rgb.g, rgb.b);
      cairo_rectangle(cr, bar.left_px + k * bar.width_px / steps, bar.top_px,
                      bar.width_px / steps + 0.6, bar.height_px);
      cairo_fill(cr);
    }
    c.SetColour(TextColour());
    SetSolid(c, 1.0);
    cairo_rectangle(cr, bar.left_px, bar.top_px, bar.width_px, bar.height_px);
    cairo_stroke(cr);
    const double step = ar_max > 25 ? 10 : (ar_max > 10 ? 5 : 1);
    for (double v = 0; v <= ar_max + 1e-9; v += step) {
      const double x = bar.left_px + bar.width_px * (1.0 - v / ar_max);
      cairo_move_to(cr, x, bar.top_px + bar.height_px);
      cairo_line_to(cr, x, bar.top_px + bar.height_px + 0.3 * f);
      cairo_stroke(cr);
      c.Text(x, bar.top_px + bar.height_px + 0.4 * f,
             v >= ar_max - 1e-9 ? Format("≥%g", v) : Format("%g", v), 0.85 * f, HAlign::kCentre,
             VAlign::kTop);
    }
    c.Text(bar.left_px + 0.5 * bar.width_px, bar.top_px - 0.3 * f,
           "axial ratio, dB  (black line: AR = 3 dB)", 0.85 * f, HAlign::kCentre, VAlign::kBottom);
  }
  // Sense swatches.
  {
    cairo_t* cr = c.cr();
    const MapPanel& panel = g.panels[1];
    double x = panel.left_px;
    const double y = key_y + 1.0 * f;
    struct Entry {
      int sense;
      const char* text;
    };
    for (const Entry e :
         {Entry{+1, "right-hand"}, Entry{-1, "left-hand"}, Entry{0, "near linear"}}) {
      const Rgb rgb = SenseColour(e.sense);
      cairo_set_source_rgb(cr, rgb.r, rgb.g, rgb.b);
      cairo_rectangle(cr, x, y, 1.2 * f, 0.9 * f);
      cairo_fill_preserve(cr);
      c.SetColour(TextColour());
      SetSolid(c, 0.8);
      cairo_stroke(cr);
      x += 1.6 * f;
      x += c.Text(x, y + 0.45 * f, e.text, 0.85 * f, HAlign::kLeft, VAlign::kMiddle) + 1.2 * f;
    }
  }
  return g;
}

}  // namespace lobecast::plot
