// Histograms and the envelope of a tolerance study (tolerance_plot.h).
#include "io/plot/tolerance_plot.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "io/plot/colormap.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

// A "nice" tick step (1, 2 or 5 times a power of ten) giving about `wanted` intervals.
double NiceStep(double span, double wanted) {
  if (!(span > 0)) return 1.0;
  const double raw = span / wanted;
  const double p = std::pow(10.0, std::floor(std::log10(raw)));
  for (double m : {1.0, 2.0, 5.0})
    if (raw <= m * p) return m * p;
  return 10.0 * p;
}

FrameBox FrameOf(const Canvas& c, double top_y, double caption_lines) {
  const double f = c.font_px();
  FrameBox b;
  b.left_px = std::round(4.6 * f);
  b.top_px = std::round(top_y + 0.6 * f);
  b.width_px = std::round(c.width() - b.left_px - 1.6 * f);
  b.height_px = std::round(c.height() - b.top_px - 4.0 * f - 1.25 * 0.9 * f * caption_lines);
  return b;
}

void Caption(const Canvas& c, const FrameBox& b, const std::vector<std::string>& lines) {
  const double f = c.font_px();
  double y = b.top_px + b.height_px + 3.6 * f;
  c.SetColour(TextColour());
  for (const std::string& line : lines) {
    c.Text(0.8 * f, y, line, 0.9 * f, HAlign::kLeft, VAlign::kTop);
    y += 1.25 * 0.9 * f;
  }
}

Colour RampColour(double t, double alpha = 1.0) {
  const Rgb rgb = Ramp(t);
  return {rgb.r, rgb.g, rgb.b, alpha};
}

}  // namespace

double HistogramGeometry::XOf(double v) const {
  return left_px + width_px * (v - x_min) / (x_max - x_min);
}
double HistogramGeometry::YOf(double count) const {
  return top_px + height_px * (count_top - count) / count_top;
}

HistogramGeometry WriteHistogram(const StoredResult& baseline, const std::vector<double>& values,
                                 double baseline_value, const std::string& what,
                                 const std::string& x_title, const std::string& study_line,
                                 const std::string& path, const ImageSize& size) {
  Canvas c(path, size);
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  HistogramGeometry g;
  std::vector<double> finite;
  for (double v : values)
    if (std::isfinite(v)) finite.push_back(v);
  g.not_shown = values.size() - finite.size();
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double v : finite) lo = std::min(lo, v), hi = std::max(hi, v);
  if (std::isfinite(baseline_value))
    lo = std::min(lo, baseline_value), hi = std::max(hi, baseline_value);
  if (!std::isfinite(lo)) lo = 0.0, hi = 1.0;
  if (hi - lo <= 1e-12 * std::max(1.0, std::abs(lo))) {  // all equal: a bin around the value
    const double pad = std::max(1e-6, 0.05 * std::abs(lo));
    lo -= pad;
    hi += pad;
  }
  const double margin = 0.04 * (hi - lo);  // the extremes and the error-free mark off the edges
  lo -= margin;
  hi += margin;
  const auto bins = static_cast<std::size_t>(
      std::clamp(std::round(std::sqrt(static_cast<double>(finite.size()))), 5.0, 40.0));
  g.x_min = lo;
  g.x_max = hi;
  g.counts.assign(bins, 0);
  for (double v : finite) {
    const auto b = static_cast<std::size_t>(
        std::min<double>(static_cast<double>(bins) - 1.0,
                         std::floor((v - lo) / (hi - lo) * static_cast<double>(bins))));
    ++g.counts[b];
  }
  const std::size_t most = *std::max_element(g.counts.begin(), g.counts.end());
  const double count_step = NiceStep(std::max<double>(1.0, static_cast<double>(most)), 5.0);
  g.count_top = std::max(1.0, count_step * std::ceil(static_cast<double>(most) / count_step));
  if (g.count_top < static_cast<double>(most) * 1.05) g.count_top += count_step;

  const double top_y = DrawTitleBlock(
      c, {ArrayLine(baseline), study_line, "Histogram of " + what + " over the trials"});
  std::vector<std::string> caption = {
      Format("%zu trials in %zu bins of %.3g; dashed: the error-free value", values.size(), bins,
             (hi - lo) / static_cast<double>(bins))};
  if (g.not_shown > 0)
    caption.push_back(Format("%zu trials not shown (value -inf or undefined)", g.not_shown));
  const FrameBox box = FrameOf(c, top_y, static_cast<double>(caption.size()));
  g.left_px = box.left_px;
  g.top_px = box.top_px;
  g.width_px = box.width_px;
  g.height_px = box.height_px;

  SetSolid(c, 1.0);
  for (double y = 0; y <= g.count_top + 1e-9; y += count_step)
    DrawGridRow(c, box, g.YOf(y), Tick(y));
  const double x_step = NiceStep(hi - lo, 6.0);
  for (double x = x_step * std::ceil(lo / x_step - 1e-9); x <= hi + 1e-9 * x_step; x += x_step)
    DrawGridColumn(c, box, g.XOf(x), Tick(std::abs(x) < 1e-12 * x_step ? 0.0 : x));
  DrawAxisTitlesAndOutline(c, box, x_title, "trials per bin");

  const double w = (hi - lo) / static_cast<double>(bins);
  for (std::size_t b = 0; b < bins; ++b) {
    if (g.counts[b] == 0) continue;
    const double x0 = g.XOf(lo + w * static_cast<double>(b)), x1 = g.XOf(lo + w * (b + 1.0));
    const double y = g.YOf(static_cast<double>(g.counts[b]));
    c.SetColour(RampColour(0.35, 0.85));
    cairo_rectangle(cr, x0, y, x1 - x0, g.top_px + g.height_px - y);
    cairo_fill_preserve(cr);
    c.SetColour(RampColour(0.1));
    SetSolid(c, 1.0);
    cairo_stroke(cr);
  }
  if (std::isfinite(baseline_value)) {
    c.SetColour(TextColour());
    SetDashed(c, 2.0, 6.0);
    cairo_move_to(cr, g.XOf(baseline_value), g.top_px);
    cairo_line_to(cr, g.XOf(baseline_value), g.top_px + g.height_px);
    cairo_stroke(cr);
    c.BoxedText(g.XOf(baseline_value) + 0.3 * f, g.top_px + 0.4 * f,
                "error-free " + Tick(baseline_value), 0.9 * f, HAlign::kLeft, VAlign::kTop);
  }
  Caption(c, box, caption);
  c.Finish();
  return g;
}

double EnvelopeGeometry::XOf(double a) const {
  return left_px + width_px * (a - angle_min_deg) / (angle_max_deg - angle_min_deg);
}
double EnvelopeGeometry::YOf(double dbi) const {
  const double v = std::isnan(dbi) ? db_bottom : std::clamp(dbi, db_bottom, db_top);
  return top_px + height_px * (db_top - v) / (db_top - db_bottom);
}

CutSpec EnvelopeCut(const StoredResult& baseline, const Vec3& beam) {
  // A grid of one theta row (a cone, e.g. the horizon) is cut along it.
  if (baseline.result.grid.theta_deg.size() == 1)
    return {CutPlane::kThetaConstant, baseline.result.grid.theta_deg.front()};
  const double rho = std::hypot(beam.x(), beam.y());
  double phi = rho == 0.0 ? 0.0 : std::atan2(beam.y(), beam.x()) / kDegree;
  if (phi < 0) phi += 360.0;
  const std::vector<double>& grid_phi = baseline.result.grid.phi_deg;
  double best = grid_phi.front(), best_d = std::numeric_limits<double>::infinity();
  for (double p : grid_phi) {
    // Distance round the circle; a cut at p also covers p + 180.
    const double d = std::abs(std::remainder(p - phi, 360.0));
    if (d < best_d) best = p, best_d = d;
  }
  return {CutPlane::kPhiConstant, best};
}

EnvelopeGeometry WriteEnvelopePlot(const StoredResult& baseline, const ToleranceResult& t,
                                   const CutSpec& spec, const std::string& study_line,
                                   const std::string& path, const ImageSize& size) {
  Canvas c(path, size);
  cairo_t* cr = c.cr();
  const Cut cut = ExtractCut(baseline, spec, nullptr);
  const std::size_t n = cut.grid_index.size();
  const Eigen::Index lo_p = 0, hi_p = t.directivity_percentiles.rows() - 1;
  auto at = [&](std::size_t s) { return static_cast<Eigen::Index>(cut.grid_index[s]); };

  EnvelopeGeometry g;
  double top = -std::numeric_limits<double>::infinity();
  for (std::size_t s = 0; s < n; ++s) {
    top = std::max(top, ToDb(baseline.result.directivity[at(s)]));
    if (hi_p >= 0) top = std::max(top, ToDb(t.directivity_percentiles(hi_p, at(s))));
    top = std::max(top, ToDb(t.directivity_mean[at(s)]));
  }
  if (!std::isfinite(top)) top = 0.0;
  g.db_top = 5.0 * std::ceil(top / 5.0);
  g.db_bottom = g.db_top - 60.0;
  if (n > 0) {
    g.angle_min_deg = cut.angle_deg.front();
    g.angle_max_deg = cut.angle_deg.back();
  }
  if (g.angle_max_deg <= g.angle_min_deg) g.angle_max_deg = g.angle_min_deg + 1.0;

  const std::string band =
      hi_p >= 1 ? Format("p%s .. p%s", Tick(t.percentiles[static_cast<std::size_t>(lo_p)]).c_str(),
                         Tick(t.percentiles[static_cast<std::size_t>(hi_p)]).c_str())
                : std::string("no band");
  const double top_y = DrawTitleBlock(c, {ArrayLine(baseline), study_line,
                                          "Directivity (dBi) over the trials, " + spec.Describe()});
  const std::vector<std::string> caption = {
      "band: the " + band +
      " percentiles of the directivity per direction; line: the mean "
      "(dBi of the linear values); dashed: the error-free pattern"};
  const FrameBox box = FrameOf(c, top_y, 1.0);
  g.left_px = box.left_px;
  g.top_px = box.top_px;
  g.width_px = box.width_px;
  g.height_px = box.height_px;

  SetSolid(c, 1.0);
  for (double y = g.db_bottom; y <= g.db_top + 1e-9; y += 10.0)
    DrawGridRow(c, box, g.YOf(y), Tick(y));
  const double x_step = NiceStep(g.angle_max_deg - g.angle_min_deg, 8.0) >= 30
                            ? 30.0
                            : NiceStep(g.angle_max_deg - g.angle_min_deg, 8.0);
  for (double a = x_step * std::ceil(g.angle_min_deg / x_step - 1e-9); a <= g.angle_max_deg + 1e-9;
       a += x_step)
    DrawGridColumn(c, box, g.XOf(a), Tick(a));
  DrawAxisTitlesAndOutline(c, box,
                           spec.plane == CutPlane::kThetaConstant
                               ? "phi (deg), from +x toward +y"
                               : "signed theta (deg); negative on the phi + 180 side",
                           "directivity (dBi)");

  cairo_save(cr);
  cairo_rectangle(cr, g.left_px, g.top_px, g.width_px, g.height_px);
  cairo_clip(cr);
  if (n > 0 && hi_p >= 1) {  // the band: upper edge forward, lower edge back
    for (std::size_t s = 0; s < n; ++s)
      cairo_line_to(cr, g.XOf(cut.angle_deg[s]),
                    g.YOf(ToDb(t.directivity_percentiles(hi_p, at(s)))));
    for (std::size_t s = n; s-- > 0;)
      cairo_line_to(cr, g.XOf(cut.angle_deg[s]),
                    g.YOf(ToDb(t.directivity_percentiles(lo_p, at(s)))));
    cairo_close_path(cr);
    c.SetColour(RampColour(0.55, 0.45));
    cairo_fill(cr);
  }
  auto point = [&](const auto& value) {
    return [&, value](std::size_t s) {
      return std::pair<double, double>{g.XOf(cut.angle_deg[s]), g.YOf(value(s))};
    };
  };
  SetDashed(c, 1.6, 6.0);
  c.SetColour(TextColour());
  for (std::size_t s = 0; s < n; ++s) {
    const auto [x, y] =
        point([&](std::size_t i) { return ToDb(baseline.result.directivity[at(i)]); })(s);
    if (s == 0)
      cairo_move_to(cr, x, y);
    else
      cairo_line_to(cr, x, y);
  }
  cairo_stroke(cr);
  DrawTrace(c, MainTraceColour(), 2.2, n,
            point([&](std::size_t i) { return ToDb(t.directivity_mean[at(i)]); }));
  cairo_restore(cr);
  Caption(c, box, caption);
  c.Finish();
  return g;
}

}  // namespace lobecast::plot
