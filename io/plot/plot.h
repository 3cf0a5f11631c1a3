// The plotting entry points: one plot of a stored result to a PNG, SVG or PDF
// file (the format from the extension), and the standard set that
// `lobecast compute --plots DIR` writes. Drawing code lives in the plot_*
// files, one kind each; this file only dispatches.
#pragma once

#include <string>
#include <vector>

#include "io/hdf5/result_reader.h"
#include "io/plot/cartesian.h"
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
};

// Throws InputError for bad options (naming the option) or a cut off the grid,
// IoError when the file cannot be written. Nothing is left at `path` on failure.
PlotGeometry WritePlot(const StoredResult& r, const PlotOptions& o, const std::string& path);

// The two principal cuts (polar, phi = 0 and phi = 90) and a theta-phi map of
// directivity, as PNG files "<stem>-polar-phi0.png", "<stem>-polar-phi90.png"
// and "<stem>-map.png" in `dir` (created when missing). A principal cut that is
// not on the grid is skipped and named in `skipped`. Returns the files written.
std::vector<std::string> WriteStandardPlots(const StoredResult& r, const std::string& dir,
                                            const std::string& stem,
                                            std::vector<std::string>* skipped = nullptr);

}  // namespace lobecast::plot
