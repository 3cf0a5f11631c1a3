// Lobes other than the main one: grid local maxima of the directivity (grouped into
// plateaus, so a ring of equal maxima is one lobe), each refined through the engine.
// The main lobe is the plateau holding the grid maximum; a refined lobe that climbs
// back to the peak is dropped. Lobes within major_lobe_tolerance_db of the peak are
// other major lobes; the rest are side lobes. Lobes narrower than the grid spacing
// may be missed: detection is only as fine as the grid.
#pragma once

#include <optional>
#include <vector>

#include <Eigen/Core>

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/pattern_probe.h"

namespace lobecast {

struct LobeSearch {
  std::vector<Lobe> major_lobes;
  std::optional<Lobe> highest_side_lobe;
  std::vector<Lobe> side_lobes;  // at or above the threshold, highest first
  bool truncated = false;
};

// grid_directivity: one value per grid direction (PatternResult::directivity), read in
// place.
LobeSearch FindLobes(const PatternProbe& probe, const GridNeighbours& neighbours,
                     const Eigen::VectorXd& grid_directivity, const Vec3& peak,
                     double peak_directivity, const AnalysisOptions& options);

}  // namespace lobecast
