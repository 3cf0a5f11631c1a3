// The main beam, refined off the grid through the engine: the peak (simplex search,
// then Newton steps on finite differences), half-power and first-null beamwidths
// along the two principal planes (sampling, then Brent root finding and golden-
// section minimization), and the front-to-back ratio. Definitions of the planes and
// of F/B are in analysis_types.h.
#pragma once

#include "engine/analysis/analysis_types.h"
#include "engine/analysis/pattern_probe.h"

namespace lobecast {

struct RefinedMaximum {
  Vec3 r_hat = Vec3::UnitZ();
  double directivity = 0.0;
  bool converged = false;
};

// A local maximum of the directivity near `start`: Nelder-Mead in normal coordinates
// about `start` with a first simplex of initial_step_rad, to tolerance_rad, then up to
// a few Newton steps on a 3x3 finite-difference stencil (skipped next to the ground's
// no-field region, where the pattern is not smooth). The result is never below the
// starting value.
RefinedMaximum RefineMaximum(const PatternProbe& probe, const Vec3& start, double initial_step_rad,
                             double tolerance_rad, int max_evaluations);
// RefineMaximum from each start, the simplex searches in lockstep (MinimizeOnPlanes: each
// round of all of them one batch of exact sums), the polish one by one: the same result
// for each start as RefineMaximum alone.
std::vector<RefinedMaximum> RefineMaxima(const PatternProbe& probe, const std::vector<Vec3>& starts,
                                         double initial_step_rad, double tolerance_rad,
                                         int max_evaluations);

// The peak, refined from the grid maximum of grid_directivity.
MainBeamPeak RefinePeak(const PatternProbe& probe, const AngularGrid& grid,
                        const Eigen::VectorXd& grid_directivity, const AnalysisOptions& options,
                        Vec3* peak_r_hat);

// Walking out from the peak along one great circle (unit tangent at the peak).
struct BeamRay {
  bool half_power_found = false;  // D fell to half the peak (or the ray hit the ground)
  double half_power_rad = 0.0;    // distance from the peak to that point, else pi
  bool clipped_by_ground = false;
  bool null_found = false;  // first minimum beyond the half-power point
  double null_rad = 0.0;
};
// step_rad: sampling before the root search; find_null: also look for the first null.
// Over a PEC ground, a great circle within tolerance_rad of the ground plane (the
// orthogonal cut through a peak on the horizon) is walked on the horizon itself, so a
// rounding-level dip below the ground is not taken for a beam edge: an omnidirectional
// horizon reports no half-power point (+inf width), as in free space.
BeamRay WalkBeamRay(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                    double peak_directivity, double step_rad, double tolerance_rad, bool find_null);

// Sampling step for cuts through this peak: cut_step_deg, or less for a beam narrower
// than ~20 samples (estimated from the curvature of D at the peak along tangent).
double CutStepRad(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                  double peak_directivity, const AnalysisOptions& options);

// Both sides of the great circle through the peak with this tangent.
BeamCut AnalyzeCut(const PatternProbe& probe, const Vec3& peak, const Vec3& tangent,
                   double peak_directivity, const AnalysisOptions& options);

// True when the peak is within kOnAxisDeg of the z axis (either pole).
bool OnAxis(const Vec3& peak);

// The two principal planes through the peak (definitions in analysis_types.h,
// PatternAnalysis): what each is, its plane_phi_deg, and its unit tangent at the peak
// (the direction of positive offsets).
struct PrincipalPlane {
  CutPlane plane = CutPlane::kElevation;
  double phi_deg = 0.0;  // NaN for kOrthogonal
  Vec3 tangent = Vec3::UnitX();
};
// peak_deg: the peak as reported; the elevation plane's phi is its phi.
std::pair<PrincipalPlane, PrincipalPlane> PrincipalPlanesAt(const PatternProbe& probe,
                                                            const Vec3& peak,
                                                            const DirectionDeg& peak_deg);

// The cut along a principal plane, labelled with it.
BeamCut AnalyzePlane(const PatternProbe& probe, const Vec3& peak, const PrincipalPlane& plane,
                     double peak_directivity, const AnalysisOptions& options);

// F/B as defined in analysis_types.h (FrontToBack). Over a PEC ground, a back direction
// within tolerance_rad below the ground plane (behind a peak on the horizon, tilted a
// hair down by rounding) is taken on the horizon: the field there is not the zero below
// the ground. peak_deg: the peak as reported; the back directions are reported from its
// angles by exact arithmetic (180 - theta, phi + 180), not from the antipode vector's
// rounding.
FrontToBack FrontToBackOf(const PatternProbe& probe, const Vec3& peak, const DirectionDeg& peak_deg,
                          double peak_directivity, double tolerance_rad);

// The angles of any unit vector in degrees, phi in [0, 360) (atan2's on the z axis): for
// vectors a plot rebuilds (cut tangents, cone axes), not for reported directions.
DirectionDeg AnglesDeg(const Vec3& v);

// Direction in degrees, phi in [0, 360); within axis_tolerance_rad of the z axis (a
// search's own tolerance) theta is exactly 0 or 180 and phi NaN (undefined).
DirectionDeg ToDirectionDeg(const Vec3& r_hat, double axis_tolerance_rad);

// What a search that started at a grid direction (start_deg: its exact grid angles)
// reports: ToDirectionDeg, with theta and phi each replaced by the grid's where the
// search ended within tolerance_rad of it in that coordinate (the search cannot tell
// them apart, and the grid's angle is exact: 90, not 89.99999999999903).
DirectionDeg ReportedDirection(const Vec3& r_hat, const DirectionDeg& start_deg,
                               double tolerance_rad);

}  // namespace lobecast
