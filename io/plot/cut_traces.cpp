#include "io/plot/cut_traces.h"

#include <cairo.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine/decibels.h"
#include "io/plot/frame.h"

namespace lobecast::plot {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

}  // namespace

Quantity CutQuantity(const StoredResult& r, const PlotOptions& o, PolarizationReference ref) {
  if (o.quantity) return *o.quantity;
  if (!o.reference.automatic) return Quantity::kCo;
  const Eigen::Index peak = PeakIndex(r.result.directivity);  // the beam the summary names
  const std::size_t np = r.result.grid.phi_deg.size();
  const double theta = r.result.grid.theta_deg[static_cast<std::size_t>(peak) / np];
  if (std::fabs(std::cos(theta * kPi / 180.0)) >= std::cos(kPi / 4)) return Quantity::kCo;
  // Ludwig-3 is made for beams along z; off it E_theta / E_phi read better.
  const std::size_t k = static_cast<std::size_t>(peak);
  return QuantityAt(r, k, Quantity::kTheta, ref) >= QuantityAt(r, k, Quantity::kPhi, ref)
             ? Quantity::kTheta
             : Quantity::kPhi;
}

std::vector<CutLabel> CutLabels(const PatternAnalysis& a, const CutSpec& spec) {
  std::vector<CutLabel> out;
  out.push_back({"peak.directivity_dbi", a.peak.directivity_dbi,
                 Format("peak %.2f dBi at theta %.2f°, phi %.2f°", a.peak.directivity_dbi,
                        a.peak.direction.theta_deg, a.peak.direction.phi_deg)});
  if (spec.principal()) {
    const bool elevation = spec.plane == CutPlane::kElevation;
    const BeamCut& c = elevation ? a.elevation_cut : a.orthogonal_cut;
    const std::string plane = elevation ? "elevation_plane." : "orthogonal_plane.";
    out.push_back({plane + "half_power_width_deg", c.half_power_width_deg,
                   c.half_power_found
                       ? Format("HPBW %.2f° (%.2f° .. %.2f°)", c.half_power_width_deg,
                                c.half_power_lower_deg, c.half_power_upper_deg)
                       : std::string("HPBW: this plane never falls to half power")});
    if (c.first_nulls_found)
      out.push_back({plane + "first_null_width_deg", c.first_null_width_deg,
                     Format("FNBW %.2f°", c.first_null_width_deg)});
    for (const NullCrossing& n : a.null_crossings) {
      if (n.orthogonal_plane == elevation) continue;
      out.push_back({"null_crossings.offset_deg", n.offset_deg,
                     Format("null at %.2f°", n.offset_deg), /*legend=*/false});
    }
  }
  if (a.highest_side_lobe) {
    const Lobe& l = *a.highest_side_lobe;
    out.push_back({"highest_side_lobe.level_db", l.level_db,
                   Format("highest side lobe %.2f dB at theta %.2f°, phi %.2f°", l.level_db,
                          l.direction.theta_deg, l.direction.phi_deg)});
  } else {
    out.push_back(
        {"highest_side_lobe.level_db", std::numeric_limits<double>::quiet_NaN(), "no side lobe"});
  }
  if (!a.major_lobes.empty())
    out.push_back(
        {"major_lobes.size", static_cast<double>(a.major_lobes.size()),
         Format("%zu other major lobe%s (as high as the peak), e.g. theta %.2f°, phi "
                "%.2f°",
                a.major_lobes.size(), a.major_lobes.size() == 1 ? "" : "s",
                a.major_lobes[0].direction.theta_deg, a.major_lobes[0].direction.phi_deg)});
  return out;
}

std::string CutAngleText(const CutSpec& spec, double angle_deg) {
  if (spec.principal()) return Format("offset %.4g°", angle_deg);
  return Format(spec.plane == CutPlane::kPhiConstant ? "theta = %.4g°" : "phi = %.4g°", angle_deg);
}

CutTraces MakeCutTraces(const StoredResult& r, const PatternAnalysis* analysis,
                        const PlotOptions& o) {
  CutTraces t;
  t.cut = ExtractCut(r, o.cut, analysis);
  if (analysis) t.labels = CutLabels(*analysis, o.cut);
  if (analysis && o.quantity == Quantity::kRealizedGain) {
    // The peak label keeps the report's number (the directivity) and adds the gain.
    const PatternAnalysis& a = *analysis;
    t.labels.front().text =
        Format("peak realized gain %.2f dBi (directivity %.2f dBi) at theta %.2f°, phi %.2f°",
               ToDb(a.peak.directivity * o.realized_gain_factor), a.peak.directivity_dbi,
               a.peak.direction.theta_deg, a.peak.direction.phi_deg);
  }
  t.reference = ResolveReference(r, o.reference);
  t.main = CutQuantity(r, o, t.reference);
  t.companion = CompanionOf(t.main);
  t.main_label = QuantityLabel(t.main, t.reference);
  // The realized gain is the directivity times P_rad / P_available (quantity.h),
  // scaled before the dB conversion as the stored /pattern/realized_gain is.
  const bool realized = t.main == Quantity::kRealizedGain;
  const double scale = realized ? o.realized_gain_factor : 1.0;
  auto to_db = [scale](std::vector<double> v) {
    for (double& x : v) x = ToDb(x * scale);
    return v;
  };
  t.main_db = to_db(CutValues(r, t.cut, t.main, t.reference));
  if (t.companion) {
    t.companion_label = QuantityLabel(*t.companion, t.reference);
    t.companion_db = to_db(CutValues(r, t.cut, *t.companion, t.reference));
  }
  double top = -kInf;
  for (double v : t.main_db) top = std::max(top, v);
  for (double v : t.companion_db) top = std::max(top, v);
  const double pattern_peak =
      r.result.directivity.size() > 0 ? r.result.directivity.maxCoeff() * scale : 0.0;
  t.no_field = !(top > ToDb(kNoFieldInCutRatio * pattern_peak));
  if (t.no_field) {
    // Nothing to draw: no trace, and a scale just below the pattern's peak.
    for (double& v : t.main_db) v = -kInf;
    for (double& v : t.companion_db) v = -kInf;
    top = std::isfinite(ToDb(pattern_peak)) ? ToDb(pattern_peak) : 0.0;
  }
  if (!std::isfinite(top)) top = 0;  // nothing radiates in this cut: any scale will do
  t.reference_dbi = top;
  t.units = o.normalized ? "dB" : "dBi";
  if (o.normalized) {
    for (double& v : t.main_db) v -= top;
    for (double& v : t.companion_db) v -= top;
  }
  const double max_plotted = o.normalized ? 0.0 : top;
  const double step = DbLabelStep(o.floor_db);
  t.scale_top_db = o.normalized ? 0.0 : step * std::ceil(max_plotted / step - 1e-9);
  if (t.scale_top_db <= max_plotted - 1e-9) t.scale_top_db += step;
  t.floor_db = o.floor_db;
  t.scale_floor_db = max_plotted - o.floor_db;
  // The largest sample of the main trace: where the trace's marker goes (the refined
  // peak is the analysis' and is in the labels).
  // On a principal plane the analysed peak is offset 0.
  for (std::size_t k = 1; k < t.main_db.size(); ++k) {
    const bool better =
        o.cut.principal() ? std::fabs(t.cut.angle_deg[k]) < std::fabs(t.cut.angle_deg[t.peak_index])
                          : t.main_db[k] > t.main_db[t.peak_index];
    if (better) t.peak_index = k;
  }
  t.peak_db = t.main_db.empty() ? 0 : t.main_db[t.peak_index];

  std::string what = t.main == Quantity::kDirectivity ? "Directivity"
                     : realized ? "Realized gain 4 pi U / P_available (mismatch and losses "
                                  "included)"
                                : "Partial directivity";
  what += ", " + t.units;
  if (o.normalized)
    what += Format(t.no_field ? " relative to the pattern's peak (%.2f dBi)"
                              : " relative to the cut's peak (%.2f dBi)",
                   top);
  if (!realized) what += ": " + t.main_label;
  if (t.companion) what += " and " + QuantityLabel(*t.companion, t.reference);
  t.title_lines = {ArrayLine(r), what, "Cut: " + t.cut.spec.Describe()};
  return t;
}

void DrawCutLegend(const Canvas& c, const CutTraces& t, double x, double y, double width) {
  cairo_t* cr = c.cr();
  const double f = 0.92 * c.font_px();
  const double swatch = 2.4 * f;
  const double text_x = x + swatch + 0.5 * f;
  const double text_w = width - swatch - 0.5 * f;
  auto entry = [&](const std::string& text) {
    const auto lines = WrapText(c, text, f, text_w);
    c.SetColour(TextColour());
    for (std::size_t i = 0; i < lines.size(); ++i)
      c.Text(text_x, y + 1.3 * f * static_cast<double>(i), lines[i], f, HAlign::kLeft,
             VAlign::kMiddle);
    y += 1.3 * f * static_cast<double>(std::max<std::size_t>(1, lines.size())) + 0.5 * f;
  };
  auto line_swatch = [&](const Colour& colour, double w, bool dashed) {
    c.SetColour(colour);
    if (dashed)
      SetDashed(c, w, 6);
    else
      SetSolid(c, w);
    cairo_move_to(cr, x, y);
    cairo_line_to(cr, x + swatch, y);
    cairo_stroke(cr);
    SetSolid(c, 1);
  };
  line_swatch(MainTraceColour(), 2.4, false);
  entry(t.main_label);
  if (t.companion) {
    line_swatch(CompanionTraceColour(), 1.8, false);
    entry(t.companion_label);
  }
  line_swatch(HalfPowerColour(), 1.4, true);
  entry("-3 dB below the main trace's peak");
  c.SetColour(MarkerColour());
  SetSolid(c, 1.2);
  cairo_new_sub_path(cr);
  cairo_arc(cr, x + 0.5 * swatch, y, 4.5, 0, 2 * kPi);
  cairo_stroke(cr);
  const std::size_t p = t.peak_index;
  if (t.no_field)
    entry(kNoFieldInCutText);
  else if (!t.main_db.empty() && std::isfinite(t.main_db[p]))
    entry(Format(t.cut.spec.principal() ? "%.2f %s at the analysed peak, " : "peak %.2f %s at ",
                 t.main_db[p], t.units.c_str()) +
          CutAngleText(t.cut.spec, t.cut.angle_deg[p]));
  else
    entry("no radiation in this cut");
  y += 0.4 * f;
  if (!t.no_field) {
    bool nulls = false;
    for (const CutLabel& l : t.labels) {
      if (l.legend)
        entry(l.text);
      else
        nulls = true;
    }
    if (nulls) {
      c.SetColour(MarkerColour());
      DrawNullMark(c, x + 0.5 * swatch, y, 0.33 * f);
      entry("null crossings of the analysis");
    }
    if (t.labels.empty()) entry("no pattern analysis in the result: no figures");
  }
  if (t.companion && !t.no_field && !t.main_db.empty() && std::isfinite(t.peak_db)) {
    double worst = -kInf;
    for (std::size_t k = 0; k < t.main_db.size(); ++k)
      if (t.main_db[k] >= t.peak_db - 3.0)
        worst = std::max(worst, t.companion_db[k] - t.main_db[k]);
    // Below -300 dB the companion is zero up to rounding (~1e-16 of the field).
    if (std::isfinite(worst) && worst < -300.0) worst = -kInf;
    if (std::isinf(worst))
      entry(Format("%s within the -3 dB beam: none (zero up to rounding)",
                   t.companion == Quantity::kCross   ? "cross"
                   : t.companion == Quantity::kCo    ? "co"
                   : t.companion == Quantity::kTheta ? "E_theta"
                                                     : "E_phi"));
    else
      entry(Format("%s within the -3 dB beam: at most %.1f dB relative to %s",
                   t.companion == Quantity::kCross   ? "cross"
                   : t.companion == Quantity::kCo    ? "co"
                   : t.companion == Quantity::kTheta ? "E_theta"
                                                     : "E_phi",
                   worst,
                   t.main == Quantity::kCo      ? "co"
                   : t.main == Quantity::kCross ? "cross"
                   : t.main == Quantity::kTheta ? "E_theta"
                                                : "E_phi"));
  }
  entry(Format(t.no_field
                   ? "floor: %g dB below the pattern's peak"
                   : "floor: %g dB below the cut's peak; lower values are drawn at the floor",
               t.floor_db));
}

}  // namespace lobecast::plot
