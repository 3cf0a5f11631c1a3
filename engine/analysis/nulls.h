// Nulls: grid local minima of the null field (total |rE|^2 or the co-polar part) below
// the threshold, grouped into plateaus, each refined through the engine by a simplex
// search and then Gauss-Newton steps on the field itself (a null is a zero of the
// field vector, so these converge to rounding where the null is a true zero). The
// ground's no-field region takes no part: its zeros are not nulls.
//
// Nulls of arrays are often curves, not points (a line array's array-factor zeros are
// cones about its axis). A curve then shows up as one or more refined points on it,
// each a genuine null direction; the list is not a tracing of the curve.
#pragma once

#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/pattern.h"

namespace lobecast {

struct NullSearch {
  std::vector<Null> nulls;  // deepest first
  bool truncated = false;
};

NullSearch FindNulls(const PatternProbe& probe, const GridNeighbours& neighbours,
                     const PatternResult& grid_result, double peak_directivity,
                     const AnalysisOptions& options);

// Directivity of the null field of one sample (total or co-polar for the reference).
double NullFieldDirectivity(const PatternProbe& probe, const ProbeSample& s,
                            const AnalysisOptions& options);

}  // namespace lobecast
