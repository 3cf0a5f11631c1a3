#include "io/plot/exposure_map.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <vector>

#include "engine/link/exposure.h"
#include "io/plot/colormap.h"
#include "io/plot/frame.h"
#include "io/plot/map_panel.h"

namespace lobecast::plot {
namespace {

// 1, 2 or 5 times a power of ten, about a fifth of `span`.
double NiceStep(double span) {
  if (!(span > 0)) return 1;
  const double raw = span / 5, p = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0})
    if (m * p >= raw) return m * p;
  return 10 * p;
}

}  // namespace

ExposureMapGeometry WriteExposureMap(const StoredResult& r, const ExposureMapOptions& o,
                                     const std::string& path) {
  Canvas c(path, o.size);
  const AngularGrid& grid = r.result.grid;
  std::vector<double> metres(static_cast<std::size_t>(r.result.directivity.size()));
  ExposureMapGeometry g;
  for (std::size_t i = 0; i < metres.size(); ++i) {
    const double gain = r.result.directivity[static_cast<Eigen::Index>(i)] * o.gain_factor;
    metres[i] = DistanceToDensity(o.power_w * gain, o.limit_w_m2);
    g.max_distance_m = std::max(g.max_distance_m, metres[i]);
  }
  const double top = g.max_distance_m > 0 ? g.max_distance_m : 1.0;
  g.contour_step_m = NiceStep(top);

  std::string what =
      Format(
          "Distance (m) at which the far-field power density falls to %g W/m^2 (the limit "
          "given) for %g W, from the %s; ",
          o.limit_w_m2, o.power_w, o.gain_name.c_str()) +
      Format("contours every %g m, + the worst direction", g.contour_step_m);
  if (o.far_field_from_m > 0 && o.far_field_from_m < top) {
    what += Format("; red: the far-field distance %.3g m (closer, the estimate does not hold)",
                   o.far_field_from_m);
  }
  const std::string map_line =
      ProjectionDescription(o.projection) + Format("; grid theta %g..%g°, phi %g..%g°",
                                                   grid.theta_deg.front(), grid.theta_deg.back(),
                                                   grid.phi_deg.front(), grid.phi_deg.back());
  const std::string caution =
      "FAR-FIELD ESTIMATE ONLY: the near field and reflections (ground!) can raise exposure; "
      "compliance must be established under the applicable regulations by qualified persons.";
  const double top_y = DrawTitleBlock(c, {ArrayLine(r), what, map_line, caution});

  const double f = c.font_px();
  const double bar_w = 1.4 * f;
  const double right_w = bar_w + 5.0 * f;
  const double left_margin = o.projection == MapProjection::kUv ? 3.0 * f : 4.6 * f;
  const double bottom_margin = o.projection == MapProjection::kUv ? 2.0 * f : 3.6 * f;
  g.panel = LayoutPanel(o.projection, grid, left_margin, top_y + 1.2 * f,
                        c.width() - left_margin - right_w - 1.0 * f,
                        c.height() - top_y - 1.2 * f - bottom_margin);
  const GridSampler sampler(grid, metres);
  PaintPanel(c, g.panel, [&](double theta, double phi) -> std::optional<std::uint32_t> {
    const auto v = sampler.Linear(theta, phi);
    if (!v) return std::nullopt;
    return ToArgb32(Ramp(std::clamp(*v / top, 0.0, 1.0)));
  });
  c.SetColour({0.05, 0.05, 0.05, 0.55});
  SetSolid(c, 0.9);
  for (double level = g.contour_step_m; level < top - 1e-9 * top; level += g.contour_step_m) {
    DrawContourSegments(c, g.panel, Contours(grid, metres, level));
  }
  // Where the far field begins: closer than this the estimate does not hold.
  if (o.far_field_from_m > 0 && o.far_field_from_m < top) {
    c.SetColour(HalfPowerColour());
    SetSolid(c, 1.5);
    DrawContourSegments(c, g.panel, Contours(grid, metres, o.far_field_from_m));
  }
  double x, y;
  if (g.panel.ToDevice(o.worst_deg.first, o.worst_deg.second, &x, &y)) {
    c.SetColour(MarkerColour());
    SetSolid(c, 2.0);
    const double s = 0.5 * f;
    cairo_move_to(c.cr(), x - s, y);
    cairo_line_to(c.cr(), x + s, y);
    cairo_move_to(c.cr(), x, y - s);
    cairo_line_to(c.cr(), x, y + s);
    cairo_stroke(c.cr());
    // The label on the side with room: left of the mark in the right half of the panel.
    const bool left = x > g.panel.left_px + 0.5 * g.panel.width_px;
    c.BoxedText(x + (left ? -0.7 : 0.7) * f, y - 0.4 * f, Format("%.3g m", o.worst_distance_m),
                0.9 * f, left ? HAlign::kRight : HAlign::kLeft, VAlign::kBottom);
  }
  SetSolid(c, 1.0);
  DrawPanelAxes(c, g.panel);

  g.bar.left_px = c.width() - right_w;
  g.bar.top_px = g.panel.top_px + 1.0 * f;
  g.bar.width_px = bar_w;
  g.bar.height_px = std::max(2.0 * f, g.panel.height_px - 1.0 * f);
  g.bar.value_top = top;
  g.bar.value_bottom = 0;
  DrawColourBar(c, g.bar, g.contour_step_m, "m");
  c.Finish();
  return g;
}

}  // namespace lobecast::plot
