// Polar cut: the quantity in dBi (or dB below the cut's peak) against angle, on
// labelled rings from the outer ring (top of the scale) down to the floor at
// the centre, with angle spokes every 30 deg, the companion trace (co/cross or
// E_theta/E_phi) beside the main one, the -3 dB level and the peak marked.
//
// Angles: a principal plane (elevation, orthogonal) is drawn as seen in its plane,
// +z (or, for a horizontal plane, the peak) up and the peak's side on the right;
// a phi = p cut is drawn with theta = 0 (+z) at the top, signed theta
// clockwise (the phi = p half on the right); a theta = t cone with phi = 0 at
// the right and phi increasing counter-clockwise (seen from +z).
#pragma once

#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/options.h"

namespace lobecast::plot {

// Where the plot put things, for tests and for callers that annotate further.
struct PolarGeometry {
  double centre_x_px = 0;
  double centre_y_px = 0;
  double radius_px = 0;  // the outer ring (db_top)
  double db_top = 0;     // plotted units (dBi, or dB relative to the peak)
  double db_floor = 0;   // at the centre
  double peak_db = 0;    // the main trace's peak, plotted units
  bool theta_cut = false;
  // Over a PEC ground a vertical cut is drawn as its upper half disc only (the centre
  // low in the frame): below the ground there is no field to show.
  bool upper_half = false;

  // Radius of a level (clamped to the floor and the top), px.
  double RadiusOf(double db) const;
  // Device position of (angle, level), px.
  void PointOf(double angle_deg, double db, double* x_px, double* y_px) const;
};

// Draws the whole plot on `c`. Throws InputError when the cut is not on the grid.
// The figures come from `analysis` (may be null: none drawn).
PolarGeometry DrawPolar(const Canvas& c, const StoredResult& r, const PatternAnalysis* analysis,
                        const PlotOptions& o);

}  // namespace lobecast::plot
