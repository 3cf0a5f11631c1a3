// Stores a pattern analysis (engine/analysis/pattern_analysis.h) in a result file under
// /summary/analysis, so the file says what its beam, lobes, nulls and polarization
// purity are without recomputing them. The layout is the schema's walk
// (io/hdf5/schema.h, VisitRecordedOptions and VisitAnalysis):
//   /summary/analysis   analysis_version, the recorded options, field_evaluations and
//                       seconds; then per list num_<list> (and <list>_truncated), then
//                       <layout>_columns per column layout (lobe, null_locus,
//                       null_crossing, protected)
//     peak, elevation_cut, orthogonal_cut, front_to_back, highest_side_lobe (only
//     when there is a side lobe), polarization: groups of attributes; a direction is
//     two attributes <prefix>theta_deg and <prefix>phi_deg; a cut has a `definition`
//     major_lobes, side_lobes, null_loci, null_crossings, protected_directions:
//     (n, columns) tables with a `units` attribute listing each column's unit,
//     written only when n > 0 (version 2; version 1 had a `nulls` table of points)
// Angles in degrees, levels in dB relative to the refined peak unless the name says
// dBi; booleans are int64 0/1 (1.0/0.0 in tables). Infinite levels (an exact null, an
// infinite front-to-back ratio) are stored as IEEE infinities, undefined angles as NaN.
#pragma once

#include <string_view>

#include "engine/analysis/analysis_types.h"
#include "io/hdf5/result_writer.h"
#include "io/hdf5/schema.h"

namespace lobecast {

inline constexpr int kAnalysisVersion = schema::kAnalysisVersion;
inline constexpr std::string_view kAnalysisGroup = schema::kAnalysisGroup;

// `options` are the ones the analysis ran with; the thresholds and the null field
// are recorded so that a reader knows what the lists mean. Throws what the
// writer's methods throw (IoError), after which the writer is dead.
void WriteAnalysis(PatternFileWriter& writer, const PatternAnalysis& analysis,
                   const AnalysisOptions& options);

}  // namespace lobecast
