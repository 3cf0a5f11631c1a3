// A tolerance study in a result file (`lobecast tolerance -o FILE.h5`): the file is
// an ordinary result of the error-free array (every dataset of result_writer.h, so
// `report`, `plot` and `export` read it as they read compute's), with the study
// added under /tolerance (names and units in schema.h, "/tolerance"):
//
//   /tolerance           attributes: trials, seed, the error model (amplitude_sigma_db,
//                        phase_sigma_deg, position_sigma_m, failure_probability,
//                        failure_count, -1 when not a count), distributions (each in
//                        words, ErrorModel::Describe), random_numbers (the generator,
//                        engine/tolerance/trial_random.h), percentile_method,
//                        beam_theta_deg, beam_phi_deg, beam_source ("design" or
//                        "error-free refined peak"), side_lobe_region, and
//                        baseline_<name> for every per-trial scalar, baseline_peak_theta_deg
//                        and baseline_peak_phi_deg
//     beam_directivity, directivity_loss_db, peak_sidelobe_db, pointing_error_deg,
//     peak_directivity, radiated_w, failed_elements (K): per trial (VisitTrialScalars)
//     peak_theta_deg, peak_phi_deg (K): the refined peak of each trial
//     protected_theta_deg, protected_phi_deg (J), protected_intensity_w_sr and
//     null_depth_db (K, J) (re the trial's beam): only with protected directions
//     percentile (P) %, directivity_mean (Nt, Np), directivity_percentile (P, Nt, Np)
//     (linear directivity), intensity_mean (Nt, Np) W/sr, main_beam (Nt, Np) 0/1
//     summary (S, 5 + P): per scalar mean, std, min, max, baseline, then the
//     percentiles; summary_rows and summary_units (S) name the rows; the group
//     attribute summary_columns names the columns
#pragma once

#include <string>

#include "engine/tolerance/tolerance.h"
#include "io/hdf5/result_writer.h"

namespace lobecast {

// Writes /tolerance through an open result writer (ResultWriteOptions::before_finish).
void WriteTolerance(PatternFileWriter& w, const ToleranceResult& r, const ToleranceOptions& o,
                    double wavelength_m);

// (theta, phi) in degrees of a unit vector (phi NaN on the z axis), as stored.
void AnglesDegOf(const Vec3& r_hat, double& theta_deg, double& phi_deg);

}  // namespace lobecast
