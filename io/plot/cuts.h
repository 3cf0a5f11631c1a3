// Pattern cuts taken from a stored result's grid (no interpolation: a cut must
// lie on grid samples).
//
//   phi = p    the plane through the z axis containing phi = p: theta on the
//              phi = p half runs 0..180 as the signed angle +theta, and the
//              phi = p + 180 half as -theta, so the cut spans -180..180 deg.
//   theta = t  the cone theta = t (a conical cut), against phi.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "io/hdf5/result_reader.h"
#include "io/plot/quantity.h"

namespace lobecast::plot {

enum class CutPlane { kPhiConstant, kThetaConstant };

struct CutSpec {
  CutPlane plane = CutPlane::kPhiConstant;
  double value_deg = 0.0;
  // "phi = 0 deg plane (signed theta, negative on the phi = 180 deg side)" or
  // "theta = 90 deg cone (phi from +x toward +y)".
  std::string Describe() const;
  std::string ShortName() const;  // "phi0", "theta90" (for file names)
};
// "phi=0", "phi = 45.5", "theta=90" (case-insensitive); std::nullopt otherwise.
std::optional<CutSpec> CutSpecFromString(std::string_view s);

struct Cut {
  CutSpec spec;
  // Signed theta (phi cut, ascending -180..180) or phi (theta cut, as on the grid), deg.
  std::vector<double> angle_deg;
  // Flattened grid index of each sample (theta-major).
  std::vector<std::size_t> grid_index;
  // The sample's own phi, deg (p or p + 180 on a phi cut): Ludwig-3 needs it.
  std::vector<double> phi_deg;
};

// Throws InputError (location "--cut") when the cut's angle is not a grid
// sample, naming the nearest ones.
Cut ExtractCut(const StoredResult& r, const CutSpec& spec);

// The quantity along a cut, linear.
std::vector<double> CutValues(const StoredResult& r, const Cut& cut, Quantity q,
                              PolarizationReference ref);

}  // namespace lobecast::plot
