// Plots of a tolerance study (engine/tolerance/tolerance.h), drawn with the frame
// and colours of every lobecast plot:
//  - a histogram of one per-trial figure (beam directivity, peak side lobe, pointing
//    error, ...) with the error-free value marked;
//  - the envelope: along a grid cut through the beam (a phi = P plane, signed theta),
//    the mean directivity over the trials (dBi of the linear mean), the band between
//    the lowest and highest percentile (dBi of the linear percentiles) and the
//    error-free pattern, dashed.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "engine/tolerance/tolerance.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/cuts.h"

namespace lobecast::plot {

struct HistogramGeometry {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;  // the plot frame
  double x_min = 0, x_max = 1;  // left and right edges, in the values' unit
  double count_top = 1;         // top edge, trials per bin
  std::vector<std::size_t> counts;
  std::size_t not_shown = 0;  // trials whose value is not finite (-inf, NaN)
  double XOf(double v) const;
  double YOf(double count) const;
};

// The bins: about sqrt(K) (5 .. 40) equal bins over the finite values and the
// baseline; each value counts in one bin (the last bin holds its right edge).
HistogramGeometry WriteHistogram(const StoredResult& baseline, const std::vector<double>& values,
                                 double baseline_value, const std::string& what,
                                 const std::string& x_title, const std::string& study_line,
                                 const std::string& path, const ImageSize& size = {});

struct EnvelopeGeometry {
  double left_px = 0, top_px = 0, width_px = 0, height_px = 0;
  double angle_min_deg = -180, angle_max_deg = 180;
  double db_top = 0, db_bottom = -40;  // dBi at the top and bottom edges
  double XOf(double angle_deg) const;
  double YOf(double dbi) const;  // clamped to the frame
};

// The cut through the beam for the envelope: the phi = P plane with P the grid phi
// nearest to the beam's (0 when the beam is on the z axis); the theta cone of a grid
// with one theta row.
CutSpec EnvelopeCut(const StoredResult& baseline, const Vec3& beam_r_hat);

EnvelopeGeometry WriteEnvelopePlot(const StoredResult& baseline, const ToleranceResult& study,
                                   const CutSpec& cut, const std::string& study_line,
                                   const std::string& path, const ImageSize& size = {});

}  // namespace lobecast::plot
