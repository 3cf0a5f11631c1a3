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

BeamFigures AnalyzeCut(const std::vector<double>& angle_deg, const std::vector<double>& db_in) {
  BeamFigures b;
  const std::size_t n = db_in.size();
  if (n < 2) return b;
  const bool wraps = std::fabs(angle_deg.back() - angle_deg.front() - 360.0) < 1e-6;
  // On a wrapped cut the last sample repeats the first; walk the m unique ones.
  const std::size_t m = wraps ? n - 1 : n;
  std::size_t p = 0;
  for (std::size_t k = 1; k < m; ++k)
    if (db_in[k] > db_in[p]) p = k;
  b.peak_index = p;
  const double peak = db_in[p];
  if (!std::isfinite(peak)) return b;
  // Finite copy relative to the peak: zeros sit far below any level we look for.
  std::vector<double> db(m);
  for (std::size_t k = 0; k < m; ++k) db[k] = std::max(db_in[k] - peak, -400.0);

  // Step s samples from the peak (s may be negative): index and unwrapped angle,
  // or false past a non-wrapping end.
  auto at = [&](long s, std::size_t* k, double* angle) {
    long i = static_cast<long>(p) + s;
    double shift = 0;
    if (wraps) {
      const long mm = static_cast<long>(m);
      const long turns = (i >= 0) ? i / mm : -((-i + mm - 1) / mm);
      i -= turns * mm;
      shift = 360.0 * static_cast<double>(turns);
    } else if (i < 0 || i >= static_cast<long>(m)) {
      return false;
    }
    *k = static_cast<std::size_t>(i);
    *angle = angle_deg[*k] + shift;
    return true;
  };
  const long max_steps = static_cast<long>(m) - 1;

  // -3 dB crossings.
  auto crossing = [&](int dir, double* out) {
    std::size_t k0 = p, k1;
    double a0 = angle_deg[p], a1;
    for (long s = 1; s <= max_steps; ++s) {
      if (!at(dir * s, &k1, &a1)) return false;
      if (db[k1] < -3.0) {
        const double f = (-3.0 - db[k0]) / (db[k1] - db[k0]);
        *out = a0 + f * (a1 - a0);
        return true;
      }
      k0 = k1;
      a0 = a1;
    }
    return false;
  };
  double left = 0, right = 0;
  if (crossing(-1, &left) && crossing(+1, &right) && right - left < 360.0) {
    b.has_hpbw = true;
    b.hpbw_left_deg = left;
    b.hpbw_right_deg = right;
    b.hpbw_deg = right - left;
  }

  // Main lobe: down from the peak while the level does not rise.
  std::vector<bool> in_main(m, false);
  in_main[p] = true;
  for (int dir : {-1, +1}) {
    std::size_t prev = p, k;
    double a;
    for (long s = 1; s <= max_steps; ++s) {
      if (!at(dir * s, &k, &a) || db[k] > db[prev] + 1e-12) break;
      in_main[k] = true;
      prev = k;
    }
  }
  // Highest local maximum outside it.
  for (std::size_t k = 0; k < m; ++k) {
    if (in_main[k]) continue;
    std::size_t kl, kr;
    double a;
    const bool hl = at(static_cast<long>(k) - static_cast<long>(p) - 1, &kl, &a);
    const bool hr = at(static_cast<long>(k) - static_cast<long>(p) + 1, &kr, &a);
    if (!hl || !hr) continue;  // the open end of a cut is no lobe
    if (db[k] < db[kl] || db[k] < db[kr] || db[k] <= -399.0) continue;
    if (!b.has_side_lobe || db[k] > b.side_lobe_rel_db) {
      b.has_side_lobe = true;
      b.side_lobe_index = k;
      b.side_lobe_rel_db = db[k];
    }
  }
  return b;
}

std::string CutAngleText(const CutSpec& spec, double angle_deg) {
  return Format(spec.plane == CutPlane::kPhiConstant ? "theta = %.4g°" : "phi = %.4g°", angle_deg);
}

CutTraces MakeCutTraces(const StoredResult& r, const PlotOptions& o) {
  CutTraces t;
  t.cut = ExtractCut(r, o.cut);
  t.reference = ResolveReference(r, o.reference);
  t.main = CutQuantity(r, o, t.reference);
  t.companion = CompanionOf(t.main);
  t.main_label = QuantityLabel(t.main, t.reference);
  auto to_db = [](std::vector<double> v) {
    for (double& x : v) x = ToDb(x);
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
      r.result.directivity.size() > 0 ? r.result.directivity.maxCoeff() : 0.0;
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
  t.beam = AnalyzeCut(t.cut.angle_deg, t.main_db);
  t.peak_index = t.beam.peak_index;
  t.peak_db = t.main_db.empty() ? 0 : t.main_db[t.peak_index];

  std::string what = t.main == Quantity::kDirectivity ? "Directivity" : "Partial directivity";
  what += ", " + t.units;
  if (o.normalized)
    what += Format(t.no_field ? " relative to the pattern's peak (%.2f dBi)"
                              : " relative to the cut's peak (%.2f dBi)",
                   top);
  what += ": " + t.main_label;
  if (t.companion) what += " and " + QuantityLabel(*t.companion, t.reference);
  t.title_lines = {ArrayLine(r), what, "Cut: " + t.cut.spec.Describe()};
  return t;
}

void DrawCutLegend(const Canvas& c, const CutTraces& t, double x, double y, double width,
                   bool with_beam_figures) {
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
    entry(Format("peak %.2f %s at ", t.main_db[p], t.units.c_str()) +
          CutAngleText(t.cut.spec, t.cut.angle_deg[p]));
  else
    entry("no radiation in this cut");
  y += 0.4 * f;
  if (with_beam_figures && !t.no_field) {
    const BeamFigures& b = t.beam;
    if (b.has_hpbw)
      entry(Format("half-power beamwidth %.1f° (%.1f° .. %.1f°)", b.hpbw_deg, b.hpbw_left_deg,
                   b.hpbw_right_deg));
    else
      entry("half-power beamwidth: no -3 dB crossing on both sides within the cut");
    if (b.has_side_lobe)
      entry(Format("highest side lobe %.1f dB below the peak, at ", std::fabs(b.side_lobe_rel_db)) +
            CutAngleText(t.cut.spec, t.cut.angle_deg[b.side_lobe_index]));
    else
      entry("no side lobe in this cut");
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
