// Polarization purity of the main beam for a chosen reference (polarization.h):
// co- and cross-polar directivity and XPD at the peak, the worst XPD inside the
// -3 dB main beam, the axial ratio at the peak, and the solid angle where the axial
// ratio is within a limit.
#pragma once

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/pattern.h"

namespace lobecast {

// The -3 dB main beam is the connected region around the peak where D >= D_peak / 2
// (analysis_types.h, worst_xpd_in_beam_db). Its worst XPD is the lowest over (a) the
// grid directions reached from the grid maximum by steps between neighbouring grid
// directions at or above half power, each step taken only when the great-circle
// segment between the two stays at or above half power too, sampled at four times
// the cut step (CutStepRad) (so a neighbouring lobe above -3 dB that the grid would
// join across a dip between its nodes is left out), and (b) beam_rays great-circle
// rays from the peak, each sampled beam_ray_samples times out to its first half-power
// point (found by root finding); the rays start from `first_tangent` (the first
// principal plane's tangent at the peak, so they do not depend on the grid). Every
// sample lies in the main beam (to the sampling), so the reported value is an upper
// bound of the true minimum, tight to the sampling. peak_deg: the peak as reported (the
// worst direction when no sample is worse than the peak).
PolarizationPurity AnalyzePolarization(const PatternProbe& probe, const GridNeighbours& neighbours,
                                       const PatternResult& grid_result, const Vec3& peak,
                                       const DirectionDeg& peak_deg, const Vec3& first_tangent,
                                       double peak_directivity, const AnalysisOptions& options);

// Solid angle (sr) where AR <= options.axial_ratio_limit_db, counting for a circular
// reference only the reference hand: the trapezoid rule over axial_ratio_phi_planes
// phi planes (spectrally accurate for the periodic integrand) of the exact integral
// of sin(theta) over the in-limit theta intervals of each plane, whose edges are
// found from a axial_ratio_theta_step_deg sampling (false position and bisection,
// all edges in one engine call per round). Zero-field directions and the ground's
// no-field region count as outside. Sources all along one axis (images included)
// radiate a linear field everywhere: 0 without sampling.
double AxialRatioSolidAngle(const PatternProbe& probe, const AnalysisOptions& options);

}  // namespace lobecast
