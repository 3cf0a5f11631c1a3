// Reads back the pattern analysis that `compute` stores under /summary/analysis
// (layout in io/hdf5/analysis_writer.h).
#pragma once

#include <optional>
#include <string>

#include "engine/analysis/analysis_types.h"
#include "io/io_error.h"

namespace lobecast {

struct StoredAnalysis {
  PatternAnalysis analysis;
  // The options the analysis ran with, as far as the file records them: reference,
  // null_field, null_threshold_db, max_nulls, side_lobe_threshold_db, major_lobe_tolerance_db,
  // axial_ratio_limit_db and the protected directions. Everything else is default.
  AnalysisOptions options;
};

// std::nullopt when the file has no /summary/analysis group, or one of another
// analysis_version than this lobecast writes (version 1's point nulls, or a newer
// one): the caller recomputes. Throws
// IoError naming the path for a file that cannot be read or a malformed group.
std::optional<StoredAnalysis> ReadAnalysis(const std::string& path);

}  // namespace lobecast
