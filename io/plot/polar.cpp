#include "io/plot/polar.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "engine/ground.h"
#include "io/plot/cut_traces.h"
#include "io/plot/frame.h"

namespace lobecast::plot {

double PolarGeometry::RadiusOf(double db) const {
  const double v = std::clamp(std::isnan(db) ? db_floor : db, db_floor, db_top);
  return radius_px * (v - db_floor) / (db_top - db_floor);
}

void PolarGeometry::PointOf(double angle_deg, double db, double* x_px, double* y_px) const {
  // Screen angle measured clockwise from the top.
  const double a = (theta_cut ? 90.0 - angle_deg : angle_deg) * kPi / 180.0;
  const double r = RadiusOf(db);
  *x_px = centre_x_px + r * std::sin(a);
  *y_px = centre_y_px - r * std::cos(a);
}

PolarGeometry DrawPolar(const Canvas& c, const StoredResult& r, const PatternAnalysis* analysis,
                        const PlotOptions& o) {
  const CutTraces t = MakeCutTraces(r, analysis, o);
  // Screen angle of sample k (the cut angle itself on grid cuts).
  auto angle_of = [&](std::size_t k) {
    return t.cut.screen_deg.empty() ? t.cut.angle_deg[k] : t.cut.screen_deg[k];
  };
  cairo_t* cr = c.cr();
  const double f = c.font_px();

  const double top_y = DrawTitleBlock(c, t.title_lines);
  PolarGeometry g;
  g.theta_cut = t.cut.spec.plane == CutPlane::kThetaConstant;
  g.db_top = t.scale_top_db;
  g.db_floor = t.scale_floor_db;
  g.peak_db = t.peak_db;
  if (r.array.ground == Ground::kPec && !g.theta_cut) {
    g.upper_half = !t.cut.angle_deg.empty();
    for (std::size_t k = 0; k < t.cut.angle_deg.size(); ++k)
      if (std::fabs(angle_of(k)) > 90.0 + 1e-6) g.upper_half = false;
  }
  const double legend_w = std::max(0.33 * c.width(), 21.0 * f);
  const double margin = 2.6 * f;  // room for the angle labels outside the rim
  const double avail_w = c.width() - legend_w;
  const double avail_h = c.height() - top_y - 0.5 * f;
  g.radius_px = std::max(10.0, 0.5 * std::min(avail_w, avail_h) - margin);
  g.centre_x_px = 0.5 * avail_w;
  g.centre_y_px = top_y + 0.5 * avail_h;
  if (g.upper_half) {  // the half disc fills the frame: centre on the bottom edge
    g.radius_px = std::max(10.0, std::min(0.5 * avail_w, avail_h - 1.5 * f) - margin);
    g.centre_y_px = top_y + 0.5 * avail_h + 0.5 * (g.radius_px + margin) - 0.5 * f;
  }
  // Circles, or upper half circles (cairo angles run clockwise from +x on screen).
  const double arc_from = g.upper_half ? kPi : 0.0, arc_to = 2 * kPi;

  // Rings and their labels.
  const double step = DbLabelStep(g.db_top - g.db_floor);
  c.SetColour(GridColour());
  SetSolid(c, 1.0);
  std::vector<double> rings;
  for (double v = g.db_top; v > g.db_floor + 0.25 * step; v -= step) rings.push_back(v);
  for (double v : rings) {
    cairo_new_sub_path(cr);
    cairo_arc(cr, g.centre_x_px, g.centre_y_px, g.RadiusOf(v), arc_from, arc_to);
  }
  cairo_stroke(cr);
  // Spokes and angle labels every 30 deg.
  for (int k = 0; k < 12; ++k) {
    const double angle = g.theta_cut ? 30.0 * k : -150.0 + 30.0 * k;
    if (g.upper_half && std::fabs(angle) > 90.0) continue;
    double x0, y0, x1, y1;
    g.PointOf(angle, g.db_floor, &x0, &y0);
    g.PointOf(angle, g.db_top, &x1, &y1);
    c.SetColour(GridColour());
    cairo_move_to(cr, x0, y0);
    cairo_line_to(cr, x1, y1);
    cairo_stroke(cr);
    const double a = (g.theta_cut ? 90.0 - angle : angle) * kPi / 180.0;
    const double lr = g.radius_px + 1.2 * f;
    const double lx = g.centre_x_px + lr * std::sin(a), ly = g.centre_y_px - lr * std::cos(a);
    c.SetColour(TextColour());
    c.Text(lx, ly, Tick(angle) + "°", 0.9 * f, HAlign::kCentre, VAlign::kMiddle);
  }
  c.SetColour(TextColour());
  c.Text(g.centre_x_px, g.centre_y_px - g.radius_px - 2.3 * f,
         g.theta_cut                 ? "phi (deg)"
         : !t.cut.screen_deg.empty() ? (t.cut.up.z() > 1e-6 ? "angle from +z in this plane (deg)"
                                                            : "angle from the peak (deg)")
                                     : "theta (deg); +z up",
         0.9 * f, HAlign::kCentre, VAlign::kMiddle);
  // -3 dB level.
  const double half = g.peak_db - 3.0;
  if (half > g.db_floor) {
    c.SetColour(HalfPowerColour());
    SetDashed(c, 1.4, 6);
    cairo_new_sub_path(cr);
    cairo_arc(cr, g.centre_x_px, g.centre_y_px, g.RadiusOf(half), arc_from, arc_to);
    cairo_stroke(cr);
  }

  // Traces: the companion first, so the main trace stays on top.
  auto draw_trace = [&](const std::vector<double>& db, const Colour& colour, double width) {
    DrawTrace(c, colour, width, db.size(), [&](std::size_t k) {
      std::pair<double, double> p;
      g.PointOf(angle_of(k), db[k], &p.first, &p.second);
      return p;
    });
  };
  if (!t.no_field) {
    if (!t.companion_db.empty()) draw_trace(t.companion_db, CompanionTraceColour(), 1.8);
    draw_trace(t.main_db, MainTraceColour(), 2.4);
  }

  // Ring labels with their unit along a ray between two spokes, over the traces on an
  // opaque box, so a trace never hides a label's minus sign.
  const double label_angle = g.theta_cut ? 75.0 : 15.0;
  for (double v : rings) {
    double x, y;
    g.PointOf(label_angle, v, &x, &y);
    c.SetColour(TextColour());
    c.BoxedText(x, y, Tick(v) + " " + t.units, 0.85 * f, HAlign::kCentre, VAlign::kMiddle, 1.0);
  }
  if (t.no_field) {
    c.SetColour(TextColour());
    c.BoxedText(g.centre_x_px, g.centre_y_px + 0.35 * g.radius_px, kNoFieldInCutText, f,
                HAlign::kCentre, VAlign::kMiddle, 1.0);
  }

  // Peak marker.
  if (!t.no_field && t.peak_index < t.main_db.size()) {
    double x, y;
    g.PointOf(angle_of(t.peak_index), t.main_db[t.peak_index], &x, &y);
    c.SetColour(MarkerColour());
    SetSolid(c, 1.2);
    cairo_new_sub_path(cr);
    cairo_arc(cr, x, y, 4.5, 0, 2 * kPi);
    cairo_stroke(cr);
  }

  // The analysis' null crossings on the rim, its half-power points on the -3 dB ring.
  if (analysis && t.cut.spec.principal() && !t.no_field) {
    for (const CutLabel& l : t.labels) {
      if (l.legend) continue;
      double x, y;
      g.PointOf(t.cut.ScreenAngleOfOffset(l.value), g.db_top, &x, &y);
      DrawNullMark(c, x, y, 0.33 * f);
    }
    const BeamCut& bc = t.cut.spec.plane == CutPlane::kElevation ? analysis->elevation_cut
                                                                 : analysis->orthogonal_cut;
    if (bc.half_power_found && half > g.db_floor) {
      c.SetColour(HalfPowerColour());
      SetSolid(c, 2.0);
      for (double off : {bc.half_power_lower_deg, bc.half_power_upper_deg}) {
        double x0, y0, x1, y1;
        const double a = t.cut.ScreenAngleOfOffset(off);
        g.PointOf(a, half - 0.06 * (g.db_top - g.db_floor), &x0, &y0);
        g.PointOf(a, half + 0.06 * (g.db_top - g.db_floor), &x1, &y1);
        cairo_move_to(cr, x0, y0);
        cairo_line_to(cr, x1, y1);
      }
      cairo_stroke(cr);
      SetSolid(c, 1.0);
    }
  }
  DrawCutLegend(c, t, c.width() - legend_w + 0.5 * f, top_y + 1.0 * f, legend_w - 1.0 * f);
  return g;
}

}  // namespace lobecast::plot
