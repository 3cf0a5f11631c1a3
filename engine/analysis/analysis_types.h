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

// Which principal plane a BeamCut runs in (PatternAnalysis explains the choice).
enum class CutPlane {
  kElevation,   // through the peak and the z axis (constant phi); peak off the axis
  kOrthogonal,  // through the peak, perpendicular to the elevation plane
  kE,           // peak on the axis: the plane of the peak and the major axis of E there
  kH,           // peak on the axis: perpendicular to the E-plane
  kXZ,          // peak on the axis, no dominant linear polarization: phi = 0 deg
  kYZ,          // ... and phi = 90 deg
};
// "elevation", "orthogonal", "E", "H", "xz", "yz".
std::string_view ToString(CutPlane p);
// Case-insensitive; std::nullopt for an unknown name.
std::optional<CutPlane> CutPlaneFromString(std::string_view s);

// A peak closer than this to the z axis (deg) is "on the axis": its phi is set by
// rounding and the search, not by the pattern, so the planes through it are chosen
// from the field instead (PatternAnalysis). 0.1 deg keeps the elevation plane of a
// beam steered just off the axis to within ~1e-6 / sin(0.1 deg) ~ 6e-4 deg of phi.
inline constexpr double kOnAxisDeg = 0.1;

// The polarization at an on-axis peak counts as dominantly linear (E- and H-planes)
// when its axial ratio is at least this (dB); nearer circular, the major axis is
// not a property an engineer would cut along, and the planes are xz and yz.
inline constexpr double kEPlaneMinAxialRatioDb = 3.0;

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
  // [0, 360); NaN (undefined) on the z axis, where every phi names the same direction.
  double phi_deg = std::numeric_limits<double>::quiet_NaN();
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
  CutPlane plane = CutPlane::kElevation;
  // For a plane that contains the z axis (every plane but kOrthogonal): the phi of
  // the half-plane the positive offsets run into, deg in [0, 360) (the peak's own phi
  // for the elevation plane). NaN for the orthogonal plane, which is tilted.
  double plane_phi_deg = std::numeric_limits<double>::quiet_NaN();
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
  // Peak directivity over the directivity in the back direction; +inf when that is
  // zero (an exact back null, or a field below the numerical floor,
  // engine/rounding_floor.h).
  // In free space the back direction is the exactly opposite one, -r_peak.
  // Over a PEC ground -r_peak lies below the ground plane, where there is no field by
  // construction (an infinite ratio that says nothing about the antenna); the back
  // direction is then the one behind the peak at the same elevation, (-x, -y, z) of
  // r_peak (phi + 180 deg, same theta), the only "behind" above the ground. A peak on
  // the z axis (within kOnAxisDeg) over ground has no back direction above the ground:
  // ratio and direction are NaN (undefined).
  double ratio_db = 0.0;
  DirectionDeg back_direction;
  // Toward the same theta at phi + 180 deg (the "behind, at the same elevation" figure
  // used for antennas over ground). NaN (undefined) for a peak on the z axis, where
  // that direction is the peak itself.
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
  // Depth: the refined minimum of the null field (curve, point). When exact (the null
  // field is below the numerical floor, engine/rounding_floor.h; a verified cone always
  // is) the depth is rounding, not physics: directivity 0 and level_db -inf.
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
  // XPD = |co|^2 / |cross|^2 in dB; +inf for a pure co-polar field, i.e. a cross part
  // below the numerical floor (engine/rounding_floor.h), -inf for a pure cross one.
  double xpd_at_peak_db = 0.0;
  // Lowest XPD inside the -3 dB main beam: the connected region around the peak where
  // D stays at or above half the peak, checked between grid directions along the
  // great circle (sampled at four times the cut step), so other lobes above -3 dB,
  // even where the grid alone would join them, are not part of it
  // (polarization_purity.h).
  double worst_xpd_in_beam_db = 0.0;
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
  // The two principal planes through the peak r_p, each cut saying which it is
  // (BeamCut::plane, plane_phi_deg). The member names are those of the common case:
  //  - peak off the z axis (more than kOnAxisDeg from it): elevation_cut is the great
  //    circle through r_p and the z axis (constant phi; tangent theta_hat),
  //    orthogonal_cut the great circle through r_p perpendicular to it (tangent
  //    phi_hat). Both are fixed by the peak alone.
  //  - peak on the z axis: the peak's phi is arbitrary (set by rounding and by the grid
  //    the search started from), so the planes come from the field at the peak: when
  //    its axial ratio is at least kEPlaneMinAxialRatioDb, elevation_cut is the E-plane
  //    (the plane of r_p and the major axis of the polarization ellipse) and
  //    orthogonal_cut the H-plane; nearer circular, the xz plane (phi = 0) and the yz
  //    plane (phi = 90 deg). Either way the planes do not depend on the grid.
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
