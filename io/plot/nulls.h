// Nulls to mark on a map: sampled local minima of a pattern lying at least
// `depth_db` below its peak. The samples of a pole row (theta = 0 or 180) are
// one direction and count once; a run of equal neighbouring minima (a plateau,
// e.g. the exact zero below a ground plane) gives one null, its first sample.
#pragma once

#include <vector>

#include "engine/grid.h"

namespace lobecast::plot {

struct NullSample {
  double theta_deg = 0;
  double phi_deg = 0;
  double level_db = 0;  // as given (may be -inf)
};

// `db`: theta-major values in dB (-inf for zero). Deepest first.
std::vector<NullSample> FindNulls(const AngularGrid& grid, const std::vector<double>& db,
                                  double depth_db);

}  // namespace lobecast::plot
