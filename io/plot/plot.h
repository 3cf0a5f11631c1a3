// The plotting entry points: one plot of a stored result to a PNG, SVG or PDF
// file (the format from the extension), and the standard set that
// `lobecast compute --plots DIR` writes. Drawing code lives in the plot_*
// files, one kind each; this file only dispatches.
#pragma once

#include <string>
#include <vector>

#include "io/hdf5/result_reader.h"
#include "io/plot/cartesian.h"
#include "io/plot/cut_traces.h"
#include "io/plot/map.h"
#include "io/plot/options.h"
#include "io/plot/polar.h"

namespace lobecast::plot {

// Where the plot put things (the member for `kind` is filled).
struct PlotGeometry {
  PlotKind kind = PlotKind::kPolar;
  PolarGeometry polar;
  CartesianGeometry cartesian;
  MapGeometry map;
  // The analysis' figures a cut plot wrote (CutLabels), in the order drawn.
  std::vector<CutLabel> labels;
};

// Throws InputError for bad options (naming the option) or a cut off the grid,
// IoError when the file cannot be written. Nothing is left at `path` on failure.
// Beamwidths, lobes and nulls drawn are `analysis`'s (the plots never work them out
// themselves, so they say what the report says); null: none are drawn, and the
// principal-plane cuts are refused.
PlotGeometry WritePlot(const StoredResult& r, const PatternAnalysis* analysis, const PlotOptions& o,
                       const std::string& path);

// The two principal planes of the analysis (polar cuts through the beam, exact off the
// grid) and a theta-phi map of directivity, as PNG files "<stem>-polar-elevation.png",
// "<stem>-polar-orthogonal.png" and "<stem>-map.png" in `dir` (created when missing).
// Without an analysis the planes are the grid's phi = 0 and 90 deg cuts
// ("<stem>-polar-phi0.png", ...), skipped and named in `skipped` when not on the grid.
// Returns the files written.
std::vector<std::string> WriteStandardPlots(const StoredResult& r, const PatternAnalysis* analysis,
                                            const std::string& dir, const std::string& stem,
                                            std::vector<std::string>* skipped = nullptr);

}  // namespace lobecast::plot
