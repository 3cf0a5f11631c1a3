#include "io/plot/scan_plot.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <numeric>

#include "io/plot/colormap.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

// Mean |Gamma| of one element over the finite scan angles; NaN when none is finite.
double MeanMagnitude(const ScanImpedanceTable& t, Eigen::Index m) {
  double sum = 0;
  int count = 0;
  for (Eigen::Index i = 0; i < t.reflection.rows(); ++i) {
    const double a = std::abs(t.reflection(i, m));
    if (std::isfinite(a)) {
      sum += a;
      ++count;
    }
  }
  return count > 0 ? sum / count : std::nan("");
}

// A theta tick step giving at most 12 intervals over `span_deg`.
double ThetaTickStep(double span_deg) {
  for (double step : {1.0, 2.0, 5.0, 10.0, 15.0, 30.0})
    if (span_deg / step <= 12.0) return step;
  return 45.0;
}

void SetLineStyle(const Canvas& c, const ScanPlotLine& line, double width_px) {
  if (line.dashed)
    SetDashed(c, width_px, 7.0);
  else
    SetSolid(c, width_px);
}

// The ramp stops short of its palest end, which would vanish on white.
constexpr double kRampTop = 0.8;

}  // namespace

double ScanPlotGeometry::XOf(double theta_deg) const {
  return left_px + width_px * (theta_deg - theta_min_deg) / (theta_max_deg - theta_min_deg);
}

double ScanPlotGeometry::YOf(double gamma) const {
  const double v = std::clamp(std::isnan(gamma) ? 0.0 : gamma, 0.0, gamma_top);
  return top_px + height_px * (gamma_top - v) / gamma_top;
}

std::vector<Eigen::Index> ScanPlotElements(const ScanImpedanceTable& t) {
  const Eigen::Index n = t.reflection.cols();
  std::vector<Eigen::Index> all(static_cast<std::size_t>(n));
  std::iota(all.begin(), all.end(), Eigen::Index{0});
  if (n <= kScanPlotAllUpTo) return all;
  std::vector<std::pair<double, Eigen::Index>> ranked;  // (mean, element), finite only
  for (Eigen::Index m = 0; m < n; ++m) {
    const double mean = MeanMagnitude(t, m);
    if (std::isfinite(mean)) ranked.emplace_back(mean, m);
  }
  if (ranked.empty()) return {};
  // Worst first; ties go to the lower element number.
  std::stable_sort(ranked.begin(), ranked.end(),
                   [](const auto& a, const auto& b) { return a.first > b.first; });
  std::vector<Eigen::Index> picked;
  for (std::size_t k : {std::size_t{0}, (ranked.size() - 1) / 2, ranked.size() - 1})
    if (std::find(picked.begin(), picked.end(), ranked[k].second) == picked.end())
      picked.push_back(ranked[k].second);
  return picked;
}

ScanPlotGeometry WriteScanPlot(const ScanImpedanceTable& t, const ScanPlotLabels& labels,
                               const std::string& path, const ImageSize& size) {
  Canvas c(path, size);
  cairo_t* cr = c.cr();
  const double f = c.font_px();
  const Eigen::Index ns = t.reflection.rows(), n = t.reflection.cols();

  ScanPlotGeometry g;
  const std::vector<Eigen::Index> elements = ScanPlotElements(t);
  const bool some = n > kScanPlotAllUpTo;
  const char* roles[] = {" worst", " median", " best"};
  for (std::size_t k = 0; k < elements.size(); ++k) {
    const double ramp_t =
        elements.size() == 1 ? 0.0 : kRampTop * static_cast<double>(k) / (elements.size() - 1);
    const Rgb rgb = Ramp(ramp_t);
    const char* role =
        !some ? "" : (elements.size() == 3 ? roles[k] : (k == 0 ? roles[0] : roles[2]));
    g.lines.push_back({elements[k], Colour{rgb.r, rgb.g, rgb.b, 1.0},
                       Format("#%ld%s", static_cast<long>(elements[k]), role),
                       elements.size() > kScanPlotSolidUpTo && k % 2 == 1});
  }

  const double phi_deg = t.phi_rad.empty() ? 0.0 : t.phi_rad.front() / kDegree;
  const std::string name = labels.array_name.empty() ? "unnamed array" : labels.array_name;
  const double top_y =
      DrawTitleBlock(c, {name + " - " + FormatFrequency(labels.frequency_hz) + ", " +
                             std::to_string(n) + (n == 1 ? " element" : " elements"),
                         Format("Active reflection |Γ| against scan angle, scan plane phi = %s°",
                                Tick(phi_deg).c_str())});
  const std::string caption = "active reflection |Gamma| per element against " + labels.reference;
  const double legend_w = std::max(0.22 * c.width(), 12.0 * f);
  const std::vector<std::string> caption_lines = WrapText(c, caption, 0.9 * f, c.width() - 1.6 * f);

  g.left_px = std::round(4.2 * f);
  g.top_px = std::round(top_y + 0.6 * f);
  g.width_px = std::round(c.width() - legend_w - g.left_px - 1.0 * f);
  g.height_px = std::round(c.height() - g.top_px - 4.0 * f -
                           1.25 * 0.9 * f * static_cast<double>(caption_lines.size()));
  g.theta_min_deg = t.theta_rad.empty() ? 0.0 : t.theta_rad.front() / kDegree;
  g.theta_max_deg = t.theta_rad.empty() ? 1.0 : t.theta_rad.back() / kDegree;
  if (g.theta_max_deg <= g.theta_min_deg) g.theta_max_deg = g.theta_min_deg + 1;
  double top = 1.0;
  for (const ScanPlotLine& line : g.lines)
    for (Eigen::Index i = 0; i < ns; ++i) {
      const double a = std::abs(t.reflection(i, line.element));
      if (std::isfinite(a)) top = std::max(top, a);
    }
  g.gamma_top = std::ceil(top * 4.0 - 1e-9) / 4.0;

  // Grid and axis labels.
  const FrameBox box{g.left_px, g.top_px, g.width_px, g.height_px};
  SetSolid(c, 1.0);
  const double y_step = g.gamma_top > 1.0 ? 0.25 : 0.1;
  for (int k = 0; k * y_step <= g.gamma_top + 1e-9; ++k)
    DrawGridRow(c, box, g.YOf(k * y_step), Tick(k * y_step));
  const double x_step = ThetaTickStep(g.theta_max_deg - g.theta_min_deg);
  for (double a = x_step * std::ceil(g.theta_min_deg / x_step - 1e-9); a <= g.theta_max_deg + 1e-9;
       a += x_step)
    DrawGridColumn(c, box, g.XOf(a), Tick(a));
  DrawAxisTitlesAndOutline(c, box, "scan angle theta (deg), from +z",
                           "|Γ| (linear; 1 = all reflected)");
  double caption_y = g.top_px + g.height_px + 3.6 * f;
  for (const std::string& line : caption_lines) {
    c.Text(0.8 * f, caption_y, line, 0.9 * f, HAlign::kLeft, VAlign::kTop);
    caption_y += 1.25 * 0.9 * f;
  }

  // The lines, broken where |Gamma| is undefined (a zero amplitude), with a dot
  // on every scan angle so a short scan still shows its samples.
  for (const ScanPlotLine& line : g.lines) {
    Eigen::Index i = 0;
    while (i < ns) {
      while (i < ns && !std::isfinite(std::abs(t.reflection(i, line.element)))) ++i;
      Eigen::Index end = i;
      while (end < ns && std::isfinite(std::abs(t.reflection(end, line.element)))) ++end;
      if (end > i) {
        c.SetColour(line.colour);
        SetLineStyle(c, line, 2.0);
        cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
        for (Eigen::Index row = i; row < end; ++row) {
          const double x = g.XOf(t.theta_rad[static_cast<std::size_t>(row)] / kDegree);
          const double y = g.YOf(std::abs(t.reflection(row, line.element)));
          if (row == i)
            cairo_move_to(cr, x, y);
          else
            cairo_line_to(cr, x, y);
        }
        cairo_stroke(cr);
        for (Eigen::Index row = i; row < end; ++row) {
          cairo_new_sub_path(cr);
          cairo_arc(cr, g.XOf(t.theta_rad[static_cast<std::size_t>(row)] / kDegree),
                    g.YOf(std::abs(t.reflection(row, line.element))), 2.6, 0, 2 * kPi);
        }
        cairo_fill(cr);
      }
      i = end;
    }
  }

  // Legend: a swatch and the element with its mean |Gamma| over the scan.
  const double lx = c.width() - legend_w + 0.5 * f;
  double ly = g.top_px + 0.2 * f;
  c.SetColour(TextColour());
  c.Text(lx, ly, "element (mean |Γ|)", 0.9 * f, HAlign::kLeft, VAlign::kTop, true);
  ly += 1.6 * f;
  if (some) {
    for (const std::string& part :
         WrapText(c, Format("%ld elements: worst, median and best by mean", static_cast<long>(n)),
                  0.85 * f, legend_w - 1.0 * f)) {
      c.Text(lx, ly, part, 0.85 * f, HAlign::kLeft, VAlign::kTop);
      ly += 1.2 * f;
    }
    ly += 0.4 * f;
  }
  for (const ScanPlotLine& line : g.lines) {
    c.SetColour(line.colour);
    SetLineStyle(c, line, 2.4);
    cairo_move_to(cr, lx, ly + 0.55 * f);
    cairo_line_to(cr, lx + 2.0 * f, ly + 0.55 * f);
    cairo_stroke(cr);
    c.SetColour(TextColour());
    c.Text(lx + 2.5 * f, ly, line.label + Format(" (%.3f)", MeanMagnitude(t, line.element)),
           0.9 * f, HAlign::kLeft, VAlign::kTop);
    ly += 1.35 * f;
  }
  if (g.lines.empty())
    c.BoxedText(g.left_px + 0.5 * g.width_px, g.top_px + 0.5 * g.height_px,
                "no element has a defined |Γ| (all amplitudes zero)", f, HAlign::kCentre,
                VAlign::kMiddle, 1.0);
  c.Finish();
  return g;
}

}  // namespace lobecast::plot
