// The data behind a cut plot (polar or cartesian): the cut, the main and
// companion traces in plotted units, the scale, the title lines, and the figures
// of the pattern analysis it shows (CutLabels).
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/cuts.h"
#include "io/plot/options.h"

namespace lobecast::plot {

// One figure a cut plot shows, taken from the pattern analysis as it is (a plot never
// works out beamwidths, lobes or nulls from its samples), so plot and report agree:
// `key` names the report's JSON field ("elevation_plane.half_power_width_deg"), `value`
// is that field's value, `text` what the plot writes. Labels with `legend` false are
// drawn as marks only (the null crossings).
struct CutLabel {
  std::string key;
  double value = 0;
  std::string text;
  bool legend = true;
};
// The labels of a cut: the refined peak, the highest side lobe and the other major
// lobes of the whole pattern; on a principal plane also its beamwidths and its null
// crossings (offsets).
std::vector<CutLabel> CutLabels(const PatternAnalysis& a, const CutSpec& spec);

struct CutTraces {
  Cut cut;
  PolarizationReference reference = PolarizationReference::kLinearX;
  Quantity main = Quantity::kCo;
  std::optional<Quantity> companion;
  std::string main_label, companion_label;
  // Plotted units: dBi, or dB relative to `reference_dbi` when normalized; -inf
  // where the quantity is zero.
  std::vector<double> main_db, companion_db;
  std::string units;         // "dBi" or "dB"
  double reference_dbi = 0;  // the largest value of either trace in the cut, dBi
  double peak_db = 0;        // the main trace's peak, plotted units
  std::size_t peak_index = 0;
  double scale_top_db = 0;  // plotted units
  double scale_floor_db = 0;
  double floor_db = 40;  // dB below the cut's peak
  std::vector<std::string> title_lines;
  std::vector<CutLabel> labels;  // empty without an analysis
  // The cut's largest value (either trace) is below kNoFieldInCutRatio of the whole
  // pattern's peak directivity: the field here is zero up to rounding (the horizon over
  // PEC for horizontal dipoles, ~-310 dBi of noise). The plots then draw no trace and
  // say "no field in this cut (zero up to rounding)".
  bool no_field = false;
};
// 1e-24 in power: a field below 1e-12 of the pattern's peak field (-240 dB). Rounding
// noise of the element sum is ~1e-16 relative; a designed null is rarely below -100 dB.
inline constexpr double kNoFieldInCutRatio = 1e-24;
inline constexpr const char* kNoFieldInCutText = "no field in this cut (zero up to rounding)";

// The main trace of a cut: the asked quantity; unset, co (against cross) when
// --reference is given or the directivity peak lies within 45 deg of the z axis
// (where Ludwig-3 is meant to be used), else the larger of E_theta / E_phi at
// the peak (against the other).
Quantity CutQuantity(const StoredResult& r, const PlotOptions& o, PolarizationReference ref);

// Throws InputError when the cut is not on the grid. `analysis` may be null (a result
// computed with --no-analysis): then no figures are drawn.
CutTraces MakeCutTraces(const StoredResult& r, const PatternAnalysis* analysis,
                        const PlotOptions& o);

// The legend and figures column of a cut plot, drawn from (x, y) within width.
void DrawCutLegend(const Canvas& c, const CutTraces& t, double x, double y, double width);

// "theta = 90°" / "phi = 45°" for a cut angle (signed theta on a phi cut).
std::string CutAngleText(const CutSpec& spec, double angle_deg);

}  // namespace lobecast::plot
