// The data behind a cut plot (polar or cartesian): the cut, the main and
// companion traces in plotted units, the scale, the title lines, and the beam
// figures read off the sampled cut (half-power beamwidth, highest side lobe).
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

// Figures from a sampled cut, angles in the cut's own angle (deg), levels in dB
// relative to the peak. Computed simply: the -3 dB crossings interpolate
// linearly in dB between the two samples around them; the main lobe runs from
// the peak to the first sample on each side where the level rises again; the
// highest side lobe is the highest local maximum outside it. A cut whose ends
// are the same direction (-180..180, or phi 0..360) is walked around.
struct BeamFigures {
  std::size_t peak_index = 0;
  bool has_hpbw = false;     // both -3 dB crossings found
  double hpbw_left_deg = 0;  // may lie beyond the cut's first angle on a wrapped cut
  double hpbw_right_deg = 0;
  double hpbw_deg = 0;
  bool has_side_lobe = false;
  std::size_t side_lobe_index = 0;
  double side_lobe_rel_db = 0;  // <= 0
};
BeamFigures AnalyzeCut(const std::vector<double>& angle_deg, const std::vector<double>& db);

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
  BeamFigures beam;
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

// Throws InputError when the cut is not on the grid.
CutTraces MakeCutTraces(const StoredResult& r, const PlotOptions& o);

// The legend and figures column of a cut plot, drawn from (x, y) within width.
void DrawCutLegend(const Canvas& c, const CutTraces& t, double x, double y, double width,
                   bool with_beam_figures);

// "theta = 90°" / "phi = 45°" for a cut angle (signed theta on a phi cut).
std::string CutAngleText(const CutSpec& spec, double angle_deg);

}  // namespace lobecast::plot
