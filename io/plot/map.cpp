#include "io/plot/map.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include <Eigen/Geometry>
#include "engine/decibels.h"
#include "io/plot/colormap.h"
#include "io/plot/frame.h"

#include "engine/analysis/pattern_probe.h"
#include "engine/ground.h"

namespace lobecast::plot {

void DrawColourBar(const Canvas& c, const ColourBar& bar, double step, const std::string& title) {
  cairo_t* cr = c.cr();
  const double f = 0.9 * c.font_px();
  const int n = 256;
  for (int k = 0; k < n; ++k) {
    const Rgb rgb = Ramp((k + 0.5) / n);
    cairo_set_source_rgb(cr, rgb.r, rgb.g, rgb.b);
    if (bar.horizontal) {
      const double w = bar.width_px / n;
      cairo_rectangle(cr, bar.left_px + k * w, bar.top_px, w + 0.6, bar.height_px);
    } else {
      const double h = bar.height_px / n;
      cairo_rectangle(cr, bar.left_px, bar.top_px + bar.height_px - (k + 1) * h, bar.width_px,
                      h + 0.6);
    }
    cairo_fill(cr);
  }
  c.SetColour(TextColour());
  SetSolid(c, 1.0);
  cairo_rectangle(cr, bar.left_px, bar.top_px, bar.width_px, bar.height_px);
  cairo_stroke(cr);
  const double span = bar.value_top - bar.value_bottom;
  for (double v = step * std::floor(bar.value_top / step + 1e-9); v >= bar.value_bottom - 1e-9;
       v -= step) {
    const double f01 = (v - bar.value_bottom) / span;
    if (bar.horizontal) {
      const double x = bar.left_px + f01 * bar.width_px;
      cairo_move_to(cr, x, bar.top_px + bar.height_px);
      cairo_line_to(cr, x, bar.top_px + bar.height_px + 0.3 * f);
      cairo_stroke(cr);
      c.Text(x, bar.top_px + bar.height_px + 0.45 * f, Tick(v), f, HAlign::kCentre, VAlign::kTop);
    } else {
      const double y = bar.top_px + bar.height_px - f01 * bar.height_px;
      cairo_move_to(cr, bar.left_px + bar.width_px, y);
      cairo_line_to(cr, bar.left_px + bar.width_px + 0.3 * f, y);
      cairo_stroke(cr);
      c.Text(bar.left_px + bar.width_px + 0.5 * f, y, Tick(v), f, HAlign::kLeft, VAlign::kMiddle);
    }
  }
  if (bar.horizontal)
    c.Text(bar.left_px + 0.5 * bar.width_px, bar.top_px - 0.4 * f, title, f, HAlign::kCentre,
           VAlign::kBottom);
  else
    c.Text(bar.left_px + 0.5 * bar.width_px, bar.top_px - 0.6 * f, title, f, HAlign::kCentre,
           VAlign::kBottom);
}

std::vector<std::pair<double, double>> NullLocusMarks(const PatternAnalysis& a, Ground ground) {
  std::vector<std::pair<double, double>> out;
  for (const NullLocus& l : a.null_loci) {
    if (!l.cone) {
      out.emplace_back(l.direction.theta_deg, l.direction.phi_deg);
      continue;
    }
    const Vec3 axis = UnitVectorAt(l.axis.theta_deg * kDegree, l.axis.phi_deg * kDegree);
    const Vec3 t = std::fabs(axis.x()) < 0.9 ? Vec3::UnitX() : Vec3::UnitY();
    const Vec3 u = axis.cross(t).normalized(), w = axis.cross(u);
    const double alpha = l.half_angle_deg * kDegree;
    for (int k = 0; k < 180; ++k) {
      const double psi = 2 * kPi * k / 180;
      const Vec3 p =
          std::cos(alpha) * axis + std::sin(alpha) * (std::cos(psi) * u + std::sin(psi) * w);
      const SphericalAngles s = AnglesOf(p);
      if (BelowGround(ground, s.theta_rad)) continue;
      out.emplace_back(s.theta_rad / kDegree, s.phi_rad / kDegree);
    }
  }
  return out;
}

MapGeometry DrawMap(const Canvas& c, const StoredResult& r, const PatternAnalysis* analysis,
                    const PlotOptions& o) {
  const AngularGrid& grid = r.result.grid;
  const Quantity q = o.quantity.value_or(Quantity::kDirectivity);  // cuts: CutQuantity
  const PolarizationReference ref = ResolveReference(r, o.reference);
  std::vector<double> db = QuantityOnGrid(r, q, ref);
  // The realized gain: the directivity times P_rad / P_available (quantity.h).
  const double scale = q == Quantity::kRealizedGain ? o.realized_gain_factor : 1.0;
  for (double& v : db) v = ToDb(v * scale);
  double peak = -std::numeric_limits<double>::infinity();
  for (double v : db) peak = std::max(peak, v);
  if (!std::isfinite(peak)) peak = 0;
  if (o.normalized)
    for (double& v : db) v -= peak;
  const double top = o.normalized ? 0.0 : peak;
  MapGeometry g;
  g.db_top = top;
  g.db_floor = top - o.floor_db;
  // Clamped copy for colours and contours: zeros sit at the floor.
  std::vector<double> clamped(db);
  for (double& v : clamped) v = std::clamp(std::isnan(v) ? g.db_floor : v, g.db_floor, g.db_top);

  const std::string units = o.normalized ? "dB" : "dBi";
  const bool partial = q != Quantity::kDirectivity && q != Quantity::kRealizedGain;
  std::string what = std::string(q == Quantity::kDirectivity ? "Directivity"
                                 : partial                   ? "Partial directivity"
                                           : "Realized gain 4 pi U / P_available (mismatch and "
                                             "losses included)") +
                     ", " + units + (partial ? ": " + QuantityLabel(q, ref) : "");
  if (o.normalized) what += Format(" relative to the peak (%.2f dBi)", peak);
  what += Format("; contours every %g dB, red -3 dB", o.contour_step_db);
  if (analysis) what += "; × null loci of the analysis";
  const std::string map_line =
      ProjectionDescription(o.projection) + Format("; grid theta %g..%g°, phi %g..%g°",
                                                   grid.theta_deg.front(), grid.theta_deg.back(),
                                                   grid.phi_deg.front(), grid.phi_deg.back());
  const double top_y = DrawTitleBlock(c, {ArrayLine(r), what, map_line});

  const double f = c.font_px();
  const double bar_w = 1.4 * f;
  const double right_w = bar_w + 5.0 * f;
  const double left_margin = o.projection == MapProjection::kUv ? 3.0 * f : 4.6 * f;
  const double bottom_margin = o.projection == MapProjection::kUv ? 2.0 * f : 3.6 * f;
  const MapPanel panel = LayoutPanel(o.projection, grid, left_margin, top_y + 1.2 * f,
                                     c.width() - left_margin - right_w - 1.0 * f,
                                     c.height() - top_y - 1.2 * f - bottom_margin);
  g.panels.push_back(panel);

  const GridSampler sampler(grid, clamped);
  const double span = g.db_top - g.db_floor;
  PaintPanel(c, panel, [&](double theta, double phi) -> std::optional<std::uint32_t> {
    const auto v = sampler.Linear(theta, phi);
    if (!v) return std::nullopt;
    return ToArgb32(Ramp((*v - g.db_floor) / span));
  });

  // Contours: thin dark lines every step; the -3 dB one dashed in the half-power colour.
  for (double level = g.db_top - o.contour_step_db; level > g.db_floor + 1e-9;
       level -= o.contour_step_db) {
    c.SetColour({0.05, 0.05, 0.05, 0.55});
    SetSolid(c, 0.9);
    DrawContourSegments(c, panel, Contours(grid, clamped, level));
  }
  c.SetColour(HalfPowerColour());
  SetSolid(c, 1.5);
  DrawContourSegments(c, panel, Contours(grid, clamped, g.db_top - 3.0));
  SetSolid(c, 1.0);

  // Nulls, at most one per 2.5 text heights so a null ring stays readable.
  std::vector<std::pair<double, double>> placed;
  const std::vector<std::pair<double, double>> marks =
      analysis ? NullLocusMarks(*analysis, r.array.ground)
               : std::vector<std::pair<double, double>>{};
  for (const auto& [theta_deg, phi_deg] : marks) {
    // On theta-phi and az-el a pole is a whole edge: mark it in the middle.
    const bool pole = std::fabs(std::sin(theta_deg * kPi / 180.0)) < 1e-9;
    const double phi = pole && o.projection != MapProjection::kUv
                           ? 0.5 * (panel.phi_min_deg + panel.phi_max_deg)
                           : phi_deg;
    double x, y;
    if (!panel.ToDevice(theta_deg, phi, &x, &y)) continue;
    if (x < panel.left_px || x > panel.left_px + panel.width_px || y < panel.top_px ||
        y > panel.top_px + panel.height_px)
      continue;
    bool crowded = false;
    for (const auto& [px, py] : placed)
      if (std::hypot(px - x, py - y) < 2.5 * f) crowded = true;
    if (crowded || placed.size() >= 400) continue;
    placed.emplace_back(x, y);
    g.nulls_deg.emplace_back(theta_deg, phi_deg);
    DrawNullMark(c, x, y, 0.33 * f);
  }
  DrawPanelAxes(c, panel);

  g.bar.left_px = c.width() - right_w;
  g.bar.top_px = panel.top_px + 1.0 * f;
  g.bar.width_px = bar_w;
  g.bar.height_px = std::max(2.0 * f, panel.height_px - 1.0 * f);
  g.bar.value_top = g.db_top;
  g.bar.value_bottom = g.db_floor;
  DrawColourBar(c, g.bar, DbLabelStep(span), units);
  return g;
}

}  // namespace lobecast::plot
