// The pattern-analysis options `compute` and `report` share: the polarization
// reference (with an automatic choice) and the option text for --reference.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/pattern.h"
#include "io/hdf5/result_writer.h"
#include "io/input/array_description.h"

namespace lobecast::cli {

// Help text for --reference.
inline constexpr const char* kReferenceHelp =
    "Polarization reference for co/cross-polar levels and XPD: x or y (Ludwig-3 linear), "
    "rhcp or lhcp (circular), theta or phi (co = E_theta or E_phi), or auto: whichever "
    "carries the most co-polar field at the grid peak (ties: theta/phi for a peak within "
    "45 deg of the horizon, Ludwig-3 nearer the z axis)";

// The name of every PolarizationReference: x, y, rhcp, lhcp, theta, phi.
std::vector<std::string> PolarizationReferenceNames();
// What --reference accepts: those, then "auto".
std::vector<std::string> ReferenceNames();

// "auto" -> std::nullopt (resolve with AutoReference); throws BadOption's InputError
// for an unknown name.
std::optional<PolarizationReference> ParseReference(std::string_view text);

// "A,B" (two decimal numbers, spaces allowed) for the option named `option`;
// throws BadOption's InputError naming the option, what was found and what was expected.
std::pair<double, double> ParseAnglePair(std::string_view text, std::string_view option,
                                         std::string_view expected);

// The pattern analysis a result file stores (compute, tolerance): AnalyzePattern, or
// std::nullopt with a warning on stderr when it cannot be made (a failed analysis
// costs the analysis, not the result).
std::optional<PatternAnalysis> AnalyzeOrWarn(const ArrayDescription& desc,
                                             const PatternResult& result,
                                             const AnalysisOptions& options);

// What a result file records about its input: the description's name, text and path.
ResultMetadata MetadataOf(const ArrayDescription& desc);

// The automatic choice described in kReferenceHelp: lobecast::AutoReference
// (engine/analysis/pattern_analysis.h).

}  // namespace lobecast::cli
