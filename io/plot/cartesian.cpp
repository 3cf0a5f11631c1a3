#include "io/plot/cartesian.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <utility>
#include <vector>

#include "io/plot/cut_traces.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

// A cut that goes round the whole circle with its largest sample more than 90 deg from
// the middle (near or across an edge), re-ordered so that sample is in the middle
// (angles then run from the peak - 180 to the peak + 180 deg).
void CentreOnPeak(CutTraces* t) {
  Cut& cut = t->cut;
  const std::size_t n = cut.angle_deg.size();
  if (n < 3 || cut.spec.principal() || t->no_field) return;
  const double step = cut.angle_deg[1] - cut.angle_deg[0];
  if (cut.angle_deg.back() - cut.angle_deg.front() + step < 360.0 - 1e-6) return;
  const double pa = cut.angle_deg[t->peak_index];
  // A peak within 90 deg of the middle is well inside: the cut stays as it is.
  if (std::fabs(pa - 0.5 * (cut.angle_deg.front() + cut.angle_deg.back())) <= 90.0) return;
  std::vector<std::pair<double, std::size_t>> order;
  for (std::size_t k = 0; k < n; ++k) {
    const double a = pa + std::remainder(cut.angle_deg[k] - pa, 360.0);
    if (std::any_of(order.begin(), order.end(),
                    [&](const auto& o) { return std::fabs(o.first - a) < 1e-9; }))
      continue;  // phi = 360 repeats phi = 0
    order.emplace_back(a, k);
  }
  std::stable_sort(order.begin(), order.end(),
                   [](const auto& x, const auto& y) { return x.first < y.first; });
  auto pick = [&](const std::vector<double>& v) {
    std::vector<double> out;
    if (v.empty()) return out;
    for (const auto& o : order) out.push_back(v[o.second]);
    return out;
  };
  std::vector<double> angles;
  for (const auto& o : order) angles.push_back(o.first);
  std::vector<std::size_t> index;
  for (const auto& o : order)
    if (!cut.grid_index.empty()) index.push_back(cut.grid_index[o.second]);
  cut.phi_deg = pick(cut.phi_deg);
  t->main_db = pick(t->main_db);
  t->companion_db = pick(t->companion_db);
  cut.angle_deg = angles;
  cut.grid_index = index;
  for (std::size_t k = 0; k < order.size(); ++k)
    if (order[k].second == t->peak_index) {
      t->peak_index = k;
      break;
    }
}

}  // namespace

double CartesianGeometry::XOf(double angle_deg) const {
  return left_px + width_px * (angle_deg - angle_min_deg) / (angle_max_deg - angle_min_deg);
}

double CartesianGeometry::YOf(double db) const {
  const double v = std::clamp(std::isnan(db) ? db_floor : db, db_floor, db_top);
  return top_px + height_px * (db_top - v) / (db_top - db_floor);
}

CartesianGeometry DrawCartesian(const Canvas& c, const StoredResult& r,
                                const PatternAnalysis* analysis, const PlotOptions& o) {
  CutTraces t = MakeCutTraces(r, analysis, o);
  CentreOnPeak(&t);
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
      t.cut.spec.principal() ? "offset from the peak (deg), + toward the plane's tangent"
      : t.cut.spec.plane == CutPlane::kPhiConstant
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

  // The analysis' half-power points and null crossings on a principal plane.
  if (analysis && t.cut.spec.principal() && !t.no_field) {
    const BeamCut& bc = t.cut.spec.plane == CutPlane::kElevation ? analysis->elevation_cut
                                                                 : analysis->orthogonal_cut;
    if (bc.half_power_found && half > g.db_floor) {
      const double y = g.YOf(half);
      const double xl = g.XOf(bc.half_power_lower_deg), xr = g.XOf(bc.half_power_upper_deg);
      c.SetColour(HalfPowerColour());
      SetSolid(c, 1.2);
      for (double x : {xl, xr}) {
        cairo_move_to(cr, x, y - 0.6 * f);
        cairo_line_to(cr, x, y + 0.6 * f);
      }
      cairo_move_to(cr, xl, y + 0.3 * f);
      cairo_line_to(cr, xr, y + 0.3 * f);
      cairo_stroke(cr);
      c.SetColour(TextColour());
      c.BoxedText(0.5 * (xl + xr), y + 0.9 * f, Format("HPBW %.2f°", bc.half_power_width_deg),
                  0.9 * f, HAlign::kCentre, VAlign::kTop);
    }
    for (const CutLabel& l : t.labels) {
      if (l.legend || l.value < g.angle_min_deg || l.value > g.angle_max_deg) continue;
      DrawNullMark(c, g.XOf(l.value), g.top_px + g.height_px - 0.5 * f, 0.33 * f);
    }
  }
  if (!t.main_db.empty() && !t.no_field) {
    const std::size_t p = t.peak_index;
    c.SetColour(MarkerColour());
    SetSolid(c, 1.2);
    cairo_new_sub_path(cr);
    cairo_arc(cr, g.XOf(t.cut.angle_deg[p]), g.YOf(t.main_db[p]), 4.5, 0, 2 * kPi);
    cairo_stroke(cr);
  }
  DrawCutLegend(c, t, c.width() - legend_w + 0.5 * f, top_y + 1.0 * f, legend_w - 1.0 * f);
  return g;
}

}  // namespace lobecast::plot
