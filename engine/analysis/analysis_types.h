// Options and results of the pattern analysis (pattern_analysis.h): main beam,
// side lobes, nulls, protected directions and polarization purity. Angles are
// degrees here (these structs go to reports and files); levels are dB relative to
// the refined peak directivity unless the name says dBi.
#pragma once

#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "engine/polarization.h"

namespace lobecast {

// Which field a null is a null of.
enum class NullField {
  kTotal,    // |rE|^2, both polarizations
  kCoPolar,  // the co-polar component for AnalysisOptions::reference
};
std::string_view ToString(NullField f);  // "total", "co"
// Case-insensitive; std::nullopt for an unknown name.
std::optional<NullField> NullFieldFromString(std::string_view s);

struct AnalysisOptions {
  // Grid local minima of the null field below this level (dB relative to the peak
  // directivity) are refined and reported as nulls. -40 dB keeps the list to nulls
  // that matter for interference rejection; lower it to see shallow ones too.
  double null_threshold_db = -40.0;
  NullField null_field = NullField::kTotal;
  // Side lobes at or above this level (dB relative to the peak) are listed. The
  // highest side lobe is reported whatever its level.
  double side_lobe_threshold_db = -30.0;
  // A lobe away from the peak but within this many dB of it is another major lobe
  // (the mirror beam of a broadside line, a full-height grating lobe), listed apart
  // from the side lobes so that the side-lobe level means what it usually does.
  double major_lobe_tolerance_db = 0.01;
  // Reference polarization for co/cross-polarization, XPD and co-polar nulls.
  PolarizationReference reference = PolarizationReference::kLinearX;
  // (theta, phi) in degrees: directions whose field is reported as is (interference
  // toward a neighbouring site, a protected receiver).
  std::vector<std::pair<double, double>> protected_directions_deg;
  // Refined angles (peak, lobes, nulls, beam edges) stop improving once the search
  // bracket or simplex is this small. Peaks and lobes are then polished by a Newton
  // step on finite differences, so their final accuracy is usually better.
  double refine_tolerance_deg = 1e-6;
  // Cap on field evaluations per local search.
  int max_evaluations_per_search = 2000;
  // Spacing of the samples along the principal-plane cuts before root finding;
  // reduced automatically for beams narrower than about 20 samples.
  double cut_step_deg = 0.1;
  // At most this many side lobes are refined and listed (highest first) and this many
  // null loci (cones first, then the deepest); the result says when more were found.
  std::size_t max_side_lobes = 64;
  std::size_t max_nulls = 64;
  // A refined field below this fraction of the peak intensity (|rE|^2 relative) is an
  // exact null: at that level the value is rounding noise of the sum.
  double exact_null_relative = 1e-30;
  // Axial-ratio limit for the "AR below limit" solid angle, dB (3 dB is common practice).
  double axial_ratio_limit_db = 3.0;
  // The AR solid angle is integrated over the sphere with this many phi planes
  // (trapezoid rule) and this theta sampling; the region's edges in theta are then
  // found by bisection, so the theta step only limits the smallest feature found.
  int axial_ratio_phi_planes = 360;
  double axial_ratio_theta_step_deg = 0.5;
  // Worst XPD in the -3 dB beam: rays from the peak in this many directions, each
  // sampled at this many points out to its half-power edge, plus the grid directions
  // of the beam.
  int beam_rays = 72;
  int beam_ray_samples = 32;

  // False (with a message naming the field, the value and the rule) for an invalid value.
  bool IsValid(std::string* why) const;
};

struct DirectionDeg {
  double theta_deg = std::numeric_limits<double>::quiet_NaN();
  double phi_deg = std::numeric_limits<double>::quiet_NaN();  // [0, 360); 0 on a pole
};

struct MainBeamPeak {
  DirectionDeg direction;    // refined
  double directivity = 0.0;  // linear, refined
  double directivity_dbi = 0.0;
  DirectionDeg grid_direction;  // the grid maximum the search started from
  double grid_directivity = 0.0;
  bool refined = false;  // the local search converged
};

// One principal-plane cut through the peak. Angles along the cut are signed offsets
// from the peak (deg): positive toward the cut's tangent (theta_hat of the peak for the
// elevation cut, phi_hat for the orthogonal one).
struct BeamCut {
  // Both half-power points found; otherwise the width is +inf: the pattern does not
  // fall to half the peak directivity anywhere on this great circle (a dipole's
  // azimuth plane, also over a PEC ground where that plane is the horizon itself: the
  // ground plane is not a beam edge for a cut that runs along it).
  bool half_power_found = false;
  double half_power_width_deg = std::numeric_limits<double>::infinity();
  double half_power_lower_deg = std::numeric_limits<double>::quiet_NaN();
  double half_power_upper_deg = std::numeric_limits<double>::quiet_NaN();
  // First nulls: the first minimum of the directivity beyond each half-power point.
  bool first_nulls_found = false;
  double first_null_width_deg = std::numeric_limits<double>::quiet_NaN();
  double first_null_lower_deg = std::numeric_limits<double>::quiet_NaN();
  double first_null_upper_deg = std::numeric_limits<double>::quiet_NaN();
  // The cut ran into the ground's no-field region on some side; the beam edge there is
  // the ground plane itself and there is no first null on that side.
  bool clipped_by_ground = false;
  // The cut's unit tangent at the peak (the way positive offsets run), written as a
  // direction: with the peak it fixes the great circle, so plots draw this very cut.
  DirectionDeg tangent;
};

struct FrontToBack {
  // Peak directivity over the directivity in the exactly opposite direction; +inf
  // when that is zero (an exact back null, or the no-field region below a ground), or
  // zero up to rounding: below 1e-30 of the peak (300 dB; PowerRatioDb in engine/decibels.h).
  double ratio_db = 0.0;
  DirectionDeg back_direction;
  // Same, toward the same theta at phi + 180 deg (the "behind, at the same elevation"
  // figure used for antennas over ground).
  double same_elevation_ratio_db = 0.0;
  DirectionDeg same_elevation_back_direction;
};

struct Lobe {
  DirectionDeg direction;
  double directivity = 0.0;
  double directivity_dbi = 0.0;
  double level_db = 0.0;  // relative to the peak
};

// A null locus: one connected set of null directions of the null field (nulls of arrays
// are curves: cones about a line's axis, the crossing cone families of a planar array's
// separable factors; a single dipole's null is a point). Described by what fits it:
//   cone   the field vanishes on the whole circle a . r = cos(half_angle) (within the
//          visible space), fitted to refined null points and verified by exact field
//          evaluations around it; then exact (the depth of a zero is not physics).
//   point  a null direction no wider than the grid spacing (a dipole's axis).
//   curve  anything else: its extent in theta and phi.
// Where a locus crosses the principal planes is in PatternAnalysis::null_crossings.
struct NullLocus {
  bool cone = false;
  bool point = false;
  DirectionDeg axis;  // cone only: its axis (a unit vector, written as a direction)
  double half_angle_deg = std::numeric_limits<double>::quiet_NaN();  // cone only, [0, 180]
  // Extent of the visible part (deg). phi_min_deg > phi_max_deg when the smallest phi
  // arc that holds it runs through phi = 0; 0 and 360 when it goes round.
  double theta_min_deg = std::numeric_limits<double>::quiet_NaN();
  double theta_max_deg = std::numeric_limits<double>::quiet_NaN();
  double phi_min_deg = std::numeric_limits<double>::quiet_NaN();
  double phi_max_deg = std::numeric_limits<double>::quiet_NaN();
  // A direction on the locus: the deepest refined one (point, curve) or one of the
  // fitted points (cone).
  DirectionDeg direction;
  // Depth: the refined minimum of the null field (curve, point). When exact (below
  // exact_null_relative; a verified cone always is) the depth is rounding, not
  // physics: directivity 0 and level_db -inf.
  double directivity = 0.0;
  double level_db = 0.0;  // relative to the peak
  bool exact = false;
};

// Where the null field vanishes (or dips below the null threshold) on a principal
// plane: the offset along the cut as in BeamCut, found by sampling the whole great
// circle and refining each minimum through the engine.
struct NullCrossing {
  double locus = -1.0;            // index into null_loci (a whole number), -1 if on none listed
  bool orthogonal_plane = false;  // false: the elevation plane
  double offset_deg = 0.0;        // signed, from the peak along the cut's tangent, (-180, 180]
  DirectionDeg direction;
  double directivity = 0.0;  // of the null field; 0 when exact
  double level_db = 0.0;     // relative to the peak; -inf when exact
  bool exact = false;
};

struct ProtectedDirectionField {
  DirectionDeg direction;
  double directivity = 0.0;
  double directivity_dbi = 0.0;
  double level_db = 0.0;  // relative to the peak
  double co_polar_dbi = 0.0;
  double cross_polar_dbi = 0.0;
  bool no_field = false;  // below the ground plane
};

struct PolarizationPurity {
  PolarizationReference reference = PolarizationReference::kLinearX;
  double co_polar_dbi_at_peak = 0.0;
  double cross_polar_dbi_at_peak = 0.0;
  // XPD = |co|^2 / |cross|^2 in dB; +inf for a pure co-polar field, i.e. a cross field
  // below ~1e-15 of the co-polar one (zero up to rounding; PowerRatioDb in engine/decibels.h).
  double xpd_at_peak_db = 0.0;
  double worst_xpd_in_beam_db = 0.0;  // lowest XPD inside the -3 dB main beam
  DirectionDeg worst_xpd_direction;
  double axial_ratio_at_peak_db = 0.0;  // IEEE Std 145-2013, 0 dB circular, +inf linear
  double tilt_at_peak_deg = 0.0;
  int sense_at_peak = 0;  // +1 right, -1 left, 0 linear
  // Solid angle where AR <= axial_ratio_limit_db (and, for a circular reference, the
  // sense is the reference hand), sr.
  double axial_ratio_limit_db = 3.0;
  double axial_ratio_solid_angle_sr = 0.0;
};

struct PatternAnalysis {
  MainBeamPeak peak;
  // Principal planes through the peak r_p: the elevation cut is the great circle
  // through r_p and the z axis (constant phi; tangent theta_hat), the orthogonal cut
  // the great circle through r_p perpendicular to it (tangent phi_hat). On a pole the
  // peak's phi is 0, so the elevation cut is the xz plane and the orthogonal one yz.
  BeamCut elevation_cut;
  BeamCut orthogonal_cut;
  FrontToBack front_to_back;
  std::vector<Lobe> major_lobes;  // other lobes within major_lobe_tolerance_db of the peak
  std::optional<Lobe> highest_side_lobe;
  std::vector<Lobe> side_lobes;              // >= side_lobe_threshold_db, highest first
  bool side_lobes_truncated = false;         // more than max_side_lobes candidates
  std::vector<NullLocus> null_loci;          // cones first, then the deepest
  bool null_loci_truncated = false;          // more than max_nulls loci
  std::vector<NullCrossing> null_crossings;  // elevation plane, then orthogonal; by offset
  std::vector<ProtectedDirectionField> protected_directions;
  PolarizationPurity polarization;
  std::size_t field_evaluations = 0;  // directions evaluated through the engine
  double seconds = 0.0;
};

}  // namespace lobecast
