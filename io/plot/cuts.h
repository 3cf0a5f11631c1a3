// Pattern cuts taken from a stored result's grid (no interpolation: a cut must
// lie on grid samples).
//
//   phi = p    the plane through the z axis containing phi = p: theta on the
//              phi = p half runs 0..180 as the signed angle +theta, and the
//              phi = p + 180 half as -theta, so the cut spans -180..180 deg.
//   theta = t  the cone theta = t (a conical cut), against phi.
//   elevation, orthogonal   the principal planes of the pattern analysis (whatever
//              BeamCut says they are): the great circle through the analysed peak
//              along the cut's tangent, against the offset from the peak (-180..180
//              deg), evaluated exactly off the grid (direct sum).
// Over a PEC ground the no-field samples (below the ground plane) are left out.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/quantity.h"

namespace lobecast::plot {

enum class CutPlane { kPhiConstant, kThetaConstant, kElevation, kOrthogonal };

struct CutSpec {
  CutPlane plane = CutPlane::kPhiConstant;
  double value_deg = 0.0;
  // "phi = 0 deg plane (signed theta, negative on the phi = 180 deg side)" or
  // "theta = 90 deg cone (phi from +x toward +y)".
  std::string Describe() const;
  std::string ShortName() const;  // "phi0", "theta90", "elevation" (for file names)
  bool principal() const { return plane == CutPlane::kElevation || plane == CutPlane::kOrthogonal; }
};
// "phi=0", "phi = 45.5", "theta=90", "elevation", "orthogonal" (case-insensitive);
// std::nullopt otherwise.
std::optional<CutSpec> CutSpecFromString(std::string_view s);

struct Cut {
  CutSpec spec;
  // Signed theta (phi cut, ascending -180..180) or phi (theta cut, as on the grid), deg.
  std::vector<double> angle_deg;
  // Flattened grid index of each sample (theta-major).
  std::vector<std::size_t> grid_index;
  // The sample's own phi, deg (p or p + 180 on a phi cut): Ludwig-3 needs it.
  std::vector<double> phi_deg;
  // A principal plane's exact samples (grid_index is then empty), and its geometry:
  // the peak, the tangent of positive offsets, and the plane's screen axes for a polar
  // plot (up: +z projected into the plane, or the peak when the plane is horizontal).
  struct Sample {
    Complex e_theta = 0.0, e_phi = 0.0;
    double directivity = 0.0;
  };
  std::vector<Sample> samples;
  Vec3 peak = Vec3::UnitZ(), tangent = Vec3::UnitX(), up = Vec3::UnitZ(), right = Vec3::UnitX();
  // Screen angle (deg, clockwise from up) of each sample on a polar plot.
  std::vector<double> screen_deg;
  // Screen angle of a point at this offset (deg) from the peak along a principal plane.
  double ScreenAngleOfOffset(double offset_deg) const;
};

// Throws InputError (location "--cut") when the cut's angle is not a grid
// sample, naming the nearest ones, or a principal plane is asked without an analysis.
Cut ExtractCut(const StoredResult& r, const CutSpec& spec, const PatternAnalysis* analysis);

// The quantity along a cut, linear.
std::vector<double> CutValues(const StoredResult& r, const Cut& cut, Quantity q,
                              PolarizationReference ref);

}  // namespace lobecast::plot
