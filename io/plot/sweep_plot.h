// `plot --kind sweep`: a frequency sweep's figures against frequency (series_plot.h):
// peak directivity (and with a circuit the gain at the peak), the beam direction
// (theta and phi of the refined peak) and its squint from the design frequency's, the
// half-power beamwidths in the two principal planes, and the side-lobe level. The
// numbers are the stored /sweep datasets, those `report` prints.
#pragma once

#include <string>
#include <vector>

#include "engine/sweep/scan_sweep.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/sweep_reader.h"
#include "io/plot/series_plot.h"

namespace lobecast::plot {

// The default size of a sweep or scan plot (five panels): taller than a cut's.
inline constexpr ImageSize kSweepPlotSize{800, 1100};

// The plot's content (tests compare it with the stored sweep).
SeriesPlotSpec SweepPlotSpec(const StoredResult& result, const StoredSweep& sweep);

std::vector<SeriesPanelGeometry> WriteSweepPlot(const StoredResult& result,
                                                const StoredSweep& sweep, const std::string& path,
                                                const ImageSize& size = kSweepPlotSize);

// `scan --pattern-plot`: a scan sweep's figures against the steering angle theta:
// peak directivity and scan loss, the beam's theta against the steering theta, the
// half-power beamwidths, and the side-lobe level; the grating-lobe onset, when there is
// one, as the dashed vertical line.
SeriesPlotSpec ScanPatternPlotSpec(const ScanSweep& sweep, const std::string& array_line,
                                   const std::string& broadside);

std::vector<SeriesPanelGeometry> WriteScanPatternPlot(const ScanSweep& sweep,
                                                      const std::string& array_line,
                                                      const std::string& broadside,
                                                      const std::string& path,
                                                      const ImageSize& size = kSweepPlotSize);

}  // namespace lobecast::plot
