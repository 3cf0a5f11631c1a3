// Null loci (analysis_types.h, NullLocus): the grid directions where the null field
// (total |rE|^2 or the co-polar part) has a minimum along a grid row or column below
// the screening level are grouped into connected sets; seeds from each set are refined
// through the engine onto the null (Gauss-Newton on the field vector: the minimum-norm
// step lands on a null curve). Cones are fitted to the refined zeros about candidate
// axes (x, y, z and the principal axes of the sources' positions) and kept only when
// exact field evaluations around the whole circle stay at zero; what no cone explains
// is grouped again and refined to its deepest point (simplex, then Gauss-Newton), as a
// point or a curve with its extent. The ground's no-field region takes no part: its
// zeros are not nulls. Cost: a candidate cone is checked at 3 of its points before the
// rest; the sets no cone explains stop being refined once the list (--max-nulls) is
// full of exact zeros, which nothing found later can displace. The seeds' Gauss-Newton
// searches run in lockstep, every round of all of them one batch of exact sums
// (PatternProbe::AtExact: the same values as one by one, threaded, without the
// per-call overheads), and so do the crossings' golden-section and Gauss-Newton searches.
//
// FindNullCrossings then walks a principal plane's whole great circle and refines each
// minimum of the null field on it: where the loci cross the plane (what a cut plot marks).
#pragma once

#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/pattern.h"

namespace lobecast {

// The shape of one locus, for telling which locus a direction lies on.
struct LocusShape {
  bool cone = false;
  Vec3 axis = Vec3::UnitZ();
  double half_angle_rad = 0.0;
  std::vector<Vec3> points;  // not a cone: grid directions of the locus and its refined null
};

struct NullSearch {
  std::vector<NullLocus> loci;     // cones first, then the deepest
  std::vector<LocusShape> shapes;  // one per locus
  bool truncated = false;
  double spacing_rad = 0.0;  // the grid's
};

NullSearch FindNulls(const PatternProbe& probe, const GridNeighbours& neighbours,
                     const PatternResult& grid_result, double peak_directivity,
                     const AnalysisOptions& options);

// Null crossings of the great circle through `peak` with unit tangent `tangent`, by
// offset; each names the locus of `search` it lies on (or -1).
std::vector<NullCrossing> FindNullCrossings(const PatternProbe& probe, const NullSearch& search,
                                            const Vec3& peak, const Vec3& tangent,
                                            bool orthogonal_plane, double peak_directivity,
                                            const AnalysisOptions& options);

// Directivity of the null field of one sample (total or co-polar for the reference).
double NullFieldDirectivity(const PatternProbe& probe, const ProbeSample& s,
                            const AnalysisOptions& options);

}  // namespace lobecast
