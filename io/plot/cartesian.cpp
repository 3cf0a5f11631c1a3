#include "io/plot/cartesian.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>

#include "io/plot/cut_traces.h"
#include "io/plot/frame.h"

namespace lobecast::plot {

double CartesianGeometry::XOf(double angle_deg) const {
  return left_px + width_px * (angle_deg - angle_min_deg) / (angle_max_deg - angle_min_deg);
}

double CartesianGeometry::YOf(double db) const {
  const double v = std::clamp(std::isnan(db) ? db_floor : db, db_floor, db_top);
  return top_px + height_px * (db_top - v) / (db_top - db_floor);
}

CartesianGeometry DrawCartesian(const Canvas& c, const StoredResult& r, const PlotOptions& o) {
  const CutTraces t = MakeCutTraces(r, o);
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  const double top_y = DrawTitleBlock(c, t.title_lines);
  const double legend_w = std::max(0.30 * c.width(), 20.0 * f);

  CartesianGeometry g;
  g.left_px = std::round(4.2 * f);
  g.top_px = std::round(top_y + 0.6 * f);
  g.width_px = std::round(c.width() - legend_w - g.left_px - 1.0 * f);
  g.height_px = std::round(c.height() - g.top_px - 3.4 * f);
  g.angle_min_deg = t.cut.angle_deg.empty() ? 0 : t.cut.angle_deg.front();
  g.angle_max_deg = t.cut.angle_deg.empty() ? 1 : t.cut.angle_deg.back();
  if (g.angle_max_deg <= g.angle_min_deg) g.angle_max_deg = g.angle_min_deg + 1;
  g.db_top = t.scale_top_db;
  g.db_floor = t.scale_floor_db;

  // Grid and axis labels.
  const FrameBox box{g.left_px, g.top_px, g.width_px, g.height_px};
  const double step = DbLabelStep(g.db_top - g.db_floor);
  SetSolid(c, 1.0);
  for (double v = g.db_top; v >= g.db_floor - 1e-9; v -= step)
    DrawGridRow(c, box, g.YOf(v), Tick(v));
  for (double a = 30.0 * std::ceil(g.angle_min_deg / 30.0 - 1e-9); a <= g.angle_max_deg + 1e-9;
       a += 30.0)
    DrawGridColumn(c, box, g.XOf(a), Tick(a));
  DrawAxisTitlesAndOutline(
      c, box,
      t.cut.spec.plane == CutPlane::kPhiConstant
          ? "signed theta (deg): + on the cut's phi half, - on the opposite half"
          : "phi (deg), from +x toward +y",
      t.units);

  // No clip: every level is clamped into the frame, and a clip would shave the
  // trace where it runs along the top (the peak) or the bottom (the floor).
  // -3 dB level and the beamwidth between the crossings.
  const double half = t.peak_db - 3.0;
  if (half > g.db_floor) {
    c.SetColour(HalfPowerColour());
    SetDashed(c, 1.4, 6);
    cairo_move_to(cr, g.left_px, g.YOf(half));
    cairo_line_to(cr, g.left_px + g.width_px, g.YOf(half));
    cairo_stroke(cr);
  }
  auto draw_trace = [&](const std::vector<double>& db, const Colour& colour, double width) {
    DrawTrace(c, colour, width, db.size(), [&](std::size_t k) {
      return std::pair<double, double>(g.XOf(t.cut.angle_deg[k]), g.YOf(db[k]));
    });
  };
  if (t.no_field) {
    c.SetColour(TextColour());
    c.BoxedText(g.left_px + 0.5 * g.width_px, g.top_px + 0.5 * g.height_px, kNoFieldInCutText, f,
                HAlign::kCentre, VAlign::kMiddle, 1.0);
  } else {
    if (!t.companion_db.empty()) draw_trace(t.companion_db, CompanionTraceColour(), 1.8);
    draw_trace(t.main_db, MainTraceColour(), 2.4);
  }

  BeamFigures b = t.beam;
  if (!(t.peak_db - 3.0 > g.db_floor)) b.has_hpbw = b.has_side_lobe = false;
  if (b.has_hpbw) {
    // Crossings on a wrapped cut may lie beyond an end: draw them folded back in.
    auto fold = [&](double a) {
      const double span = g.angle_max_deg - g.angle_min_deg;
      while (a < g.angle_min_deg && span >= 359.999) a += 360.0;
      while (a > g.angle_max_deg && span >= 359.999) a -= 360.0;
      return a;
    };
    const double y = g.YOf(half);
    const double xl = g.XOf(fold(b.hpbw_left_deg)), xr = g.XOf(fold(b.hpbw_right_deg));
    c.SetColour(HalfPowerColour());
    SetSolid(c, 1.2);
    for (double x : {xl, xr}) {
      cairo_move_to(cr, x, y - 0.6 * f);
      cairo_line_to(cr, x, y + 0.6 * f);
    }
    cairo_stroke(cr);
    if (xr > xl) {
      cairo_move_to(cr, xl, y + 0.3 * f);
      cairo_line_to(cr, xr, y + 0.3 * f);
      cairo_stroke(cr);
    }
    c.SetColour(TextColour());
    c.BoxedText(0.5 * (xl + xr), y + 0.9 * f, Format("HPBW %.1f°", b.hpbw_deg), 0.9 * f,
                HAlign::kCentre, VAlign::kTop);
  }
  if (!t.main_db.empty() && !t.no_field) {
    const std::size_t p = t.peak_index;
    c.SetColour(MarkerColour());
    SetSolid(c, 1.2);
    cairo_new_sub_path(cr);
    cairo_arc(cr, g.XOf(t.cut.angle_deg[p]), g.YOf(t.main_db[p]), 4.5, 0, 2 * kPi);
    cairo_stroke(cr);
  }
  if (b.has_side_lobe && t.main_db[b.side_lobe_index] > g.db_floor) {
    const double x = g.XOf(t.cut.angle_deg[b.side_lobe_index]);
    const double y = g.YOf(t.main_db[b.side_lobe_index]);
    c.SetColour(MarkerColour());
    SetSolid(c, 1.2);
    cairo_move_to(cr, x, y - 5);
    cairo_line_to(cr, x - 5, y - 13);
    cairo_line_to(cr, x + 5, y - 13);
    cairo_close_path(cr);
    cairo_stroke(cr);
    c.SetColour(TextColour());
    c.BoxedText(x, y - 14, Format("side lobe %.1f dB", b.side_lobe_rel_db + 0.0), 0.85 * f,
                HAlign::kCentre, VAlign::kBottom);
  }

  DrawCutLegend(c, t, c.width() - legend_w + 0.5 * f, top_y + 1.0 * f, legend_w - 1.0 * f,
                /*with_beam_figures=*/true);
  return g;
}

}  // namespace lobecast::plot
