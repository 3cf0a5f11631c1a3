// Stores a pattern analysis (engine/analysis/pattern_analysis.h) in a result file under
// /summary/analysis, so the file says what its beam, lobes, nulls and polarization
// purity are without recomputing them. Angles in degrees, levels in dB relative to
// the refined peak unless the name says dBi; booleans are int64 0/1.
//
//   /summary/analysis        analysis_version=1, reference ("x", "y", "rhcp", "lhcp"),
//                            null_field ("total", "co"), null_threshold_db,
//                            side_lobe_threshold_db, major_lobe_tolerance_db,
//                            axial_ratio_limit_db, field_evaluations, seconds,
//                            num_major_lobes, num_side_lobes, side_lobes_truncated,
//                            num_nulls, nulls_truncated, num_protected_directions,
//                            lobe_columns, null_columns, protected_columns
//     peak                   theta_deg, phi_deg, directivity, directivity_dbi,
//                            grid_theta_deg, grid_phi_deg, grid_directivity, refined
//     elevation_cut          half_power_found, half_power_width_deg,
//     orthogonal_cut           half_power_lower_deg, half_power_upper_deg,
//                              first_nulls_found, first_null_width_deg,
//                              first_null_lower_deg, first_null_upper_deg,
//                              clipped_by_ground, definition
//     front_to_back          ratio_db, back_theta_deg, back_phi_deg,
//                            same_elevation_ratio_db, same_elevation_back_theta_deg,
//                            same_elevation_back_phi_deg
//     highest_side_lobe      theta_deg, phi_deg, directivity, directivity_dbi, level_db
//                            (group present only when there is a side lobe)
//     polarization           reference, co_polar_dbi_at_peak, cross_polar_dbi_at_peak,
//                            xpd_at_peak_db, worst_xpd_in_beam_db, worst_xpd_theta_deg,
//                            worst_xpd_phi_deg, axial_ratio_at_peak_db, tilt_at_peak_deg,
//                            sense_at_peak, axial_ratio_limit_db, axial_ratio_solid_angle_sr
//     major_lobes  (n, 5)    columns lobe_columns:   theta_deg, phi_deg, directivity,
//     side_lobes   (n, 5)                            directivity_dbi, level_db
//     nulls        (n, 5)    columns null_columns:   theta_deg, phi_deg, directivity,
//                                                    level_db, exact
//     protected_directions (n, 8)  columns protected_columns: theta_deg, phi_deg,
//                            directivity, directivity_dbi, level_db, co_polar_dbi,
//                            cross_polar_dbi, no_field
// A table is written only when it has rows; its num_* attribute is always there.
// Infinite levels (an exact null, an infinite front-to-back ratio) are stored as
// IEEE infinities, undefined angles as NaN.
#pragma once

#include <string_view>

#include "engine/analysis/analysis_types.h"
#include "io/hdf5/result_writer.h"

namespace lobecast {

inline constexpr int kAnalysisVersion = 1;
inline constexpr std::string_view kAnalysisGroup = "/summary/analysis";

// `options` are the ones the analysis ran with; the thresholds and the null field
// are recorded so that a reader knows what the lists mean. Throws what the
// writer's methods throw (IoError), after which the writer is dead.
void WriteAnalysis(PatternFileWriter& writer, const PatternAnalysis& analysis,
                   const AnalysisOptions& options);

}  // namespace lobecast
