// What the pattern analysis sees of a streamed grid (ComputePatternBlocks,
// engine/pattern.h): a reduced view built while the blocks pass, bounded by a
// fixed number of directions, so the analysis of a grid that never is in memory
// costs O(view), not O(grid).
//
// The view is a sub-grid of the computed grid: every m-th theta row and every m-th
// phi column (the first and last of each always kept, so poles and a closed phi
// seam stay what they are), m = ceil(sqrt(grid / max_directions)), plus the row and
// the column of the grid peak (PeakIndex), so the analysis starts from the same
// peak as the summary and the in-memory analysis. The view's values are the
// streamed values themselves (stored field, then DeriveFromField: the same bits),
// except on the peak's column away from the peak row, which no block kept: those
// few directions are summed exactly (direct sum), as the analysis' own refinement
// does. The analysis then refines off the grid by exact evaluations as always
// (engine/analysis/pattern_analysis.h): peak and beamwidths do not depend on the
// grid spacing; side lobes and nulls narrower than m grid steps may go unseen.
//
// Why a sub-grid and not per-block summaries: the analysis takes a PatternResult
// and walks its grid's neighbourhoods; a sub-grid is one, with no change to the
// analysis, and with m = 1 (a grid within max_directions) it is the whole grid, so
// the streamed analysis is then the in-memory one exactly.
//
// Memory: the view (~32 bytes a direction while streaming, a PatternResult at the
// end) plus the rows of the peak candidates (PeakTracker: usually one).
#pragma once

#include <cstddef>
#include <map>
#include <vector>

#include <Eigen/Core>

#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/pattern.h"
#include "engine/types.h"

namespace lobecast {

// The view's size `compute` streams with (before the peak's row and column): as
// large as the analysis of an in-memory 0.5 deg grid, ~17 MB.
inline constexpr std::size_t kStreamViewDirections = std::size_t{1} << 18;

class PatternSampler {
 public:
  // max_directions >= 1: the view's size before the peak's row and column.
  PatternSampler(const AngularGrid& grid, std::size_t max_directions);

  // The stride m (1: the view is the whole grid).
  std::size_t stride() const { return stride_; }

  // Feeds one finished block (a PatternBlockSink's arguments), in theta order.
  void Add(std::size_t first_row, const PatternResult& rows);

  // The view as a result the analysis takes: its grid (sub-grid rows and columns,
  // ascending), field and derived quantities, and from `header` (the result of
  // ComputePatternBlocks) the power, resistances, floor and summary. `field`: the
  // options of the exact sums on the peak's column (their method is forced direct).
  PatternResult Finish(const Array& array, const Eigen::VectorXcd& currents_a,
                       const PatternResult& header, FieldOptions field) const;

 private:
  AngularGrid grid_;
  std::size_t stride_ = 1;
  std::vector<std::size_t> rows_, columns_;  // sampled, ascending
  std::vector<long> row_slot_;               // grid row -> index in rows_, or -1
  Eigen::VectorXcd e_theta_, e_phi_;         // rows_ x columns_, theta-major
  PeakTracker peak_;
  // The full field rows of the peak candidates: row -> (e_theta, e_phi).
  std::map<std::size_t, FarField> candidate_rows_;
};

}  // namespace lobecast
