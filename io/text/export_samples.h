// The directions an export lists and their values: the stored grid (or one of its
// rows or columns) read back as stored, or any other directions computed exactly
// through the engine (a direct-sum FieldPlan on those directions, with the array and
// radiated power stored in the file) -- never interpolated between grid points.
//
// Cuts (`CutSpec`):
//   phi=P          the plane through the z axis containing phi = P deg, over the
//                  stored theta values: the phi = P + 180 half at the signed angle
//                  -theta (cut_angle_deg, ascending), then the phi = P half at +theta
//                  (each pole listed once, on the phi = P half)
//   theta=T        the cone theta = T deg, over the stored phi values
//   great-circle:THETA,PHI,AZIMUTH
//                  the great circle through the direction (THETA, PHI) that leaves
//                  it along the heading AZIMUTH deg, measured from theta_hat toward
//                  phi_hat at that direction (0: the constant-phi plane through it,
//                  toward larger theta; 90: the orthogonal plane, toward larger phi).
//                  Sampled at the signed angle s along the circle from the direction,
//                  s = -180, -180 + step, ... < 180 deg (the cut_angle_deg column).
//                  On a pole, PHI still fixes theta_hat and phi_hat there.
#pragma once

#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "engine/types.h"
#include "io/hdf5/result_reader.h"

namespace lobecast {

// One row of an export.
struct ExportSample {
  double theta_deg = 0.0;
  double phi_deg = 0.0;
  // Signed angle along a phi or great-circle cut (see above), deg; NaN otherwise.
  double cut_angle_deg = std::numeric_limits<double>::quiet_NaN();
  Complex e_theta = 0.0;     // rE_theta, V
  Complex e_phi = 0.0;       // rE_phi, V
  double directivity = 0.0;  // linear
  double axial_ratio_db = 0.0;
  double tilt_deg = 0.0;
  std::int8_t sense = 0;
  bool exact = false;  // computed for this export (true) or read from the stored grid
};

struct CutSpec {
  enum class Kind { kPhi, kTheta, kGreatCircle };
  Kind kind = Kind::kPhi;
  double value_deg = 0.0;                                                    // P or T
  double through_theta_deg = 0.0, through_phi_deg = 0.0, heading_deg = 0.0;  // great circle
};

// Parses "phi=0", "theta=90", "great-circle:30,0,90" (spaces allowed around the
// numbers). std::nullopt with a message in *why for anything else or an angle out
// of range (theta in [0, 180]).
std::optional<CutSpec> ParseCutSpec(std::string_view text, std::string* why);
// "phi = 0 deg", "great circle through theta 30 deg, phi 0 deg, heading 90 deg".
std::string DescribeCut(const CutSpec& cut);

// Every grid direction, theta-major, as stored.
std::vector<ExportSample> GridSamples(const StoredResult& stored);

// The cut: grid values when it runs along a stored grid row or column (a phi or theta
// equal to a stored one within 1e-9 deg), otherwise exact values. step_deg is the
// great-circle spacing (ignored for the others). Throws InvalidArgument for a step
// outside (0, 90] deg.
std::vector<ExportSample> CutSamples(const StoredResult& stored, const CutSpec& cut,
                                     double step_deg);

// Exact values at (theta, phi) deg pairs, computed through the engine. Throws
// InvalidArgument for theta outside [0, 180] or a non-finite angle.
std::vector<ExportSample> ExactSamples(const StoredResult& stored,
                                       const std::vector<std::pair<double, double>>& theta_phi_deg);

}  // namespace lobecast
