// What an array must do (CONVENTIONS §3, requirements files), in SI units and
// radians-free degrees as written: the input of SizeArray (sizing.h). The reader in
// io/input checks ranges and contradictions with located messages; the engine
// checks them again (InvalidArgument) as a backstop.
#pragma once

#include <optional>
#include <string_view>

#include "engine/synthesis/crossed_pair.h"
#include "engine/types.h"

namespace lobecast {

// Which lattices to consider: rectangular, triangular (odd rows shifted by half a
// pitch, lattice_generator.h) or both.
enum class LatticeChoice { kRectangular, kTriangular, kEither };
std::string_view ToString(LatticeChoice c);  // "rectangular", "triangular", "either"
std::optional<LatticeChoice> LatticeChoiceFromString(std::string_view s);  // case-insensitive

struct SizingRequirements {
  double frequency_hz = 0;
  // At least this peak directivity at broadside (+z), dBi; and/or at most these
  // half-power beamwidths at broadside in the xz and yz planes (deg). At least one of
  // the three is set.
  std::optional<double> directivity_dbi;
  std::optional<double> beamwidth_xz_deg;
  std::optional<double> beamwidth_yz_deg;
  // The highest side lobe re the peak, at broadside and over the scan range (dB < 0).
  double sidelobe_db = -25;
  // The scan range: the beam is steered anywhere in the cone whose half-angles are
  // scan_xz_deg in the xz plane and scan_yz_deg in the yz plane (an ellipse in
  // u = sin(theta) cos(phi), v = sin(theta) sin(phi)); equal for a circular cone.
  double scan_xz_deg = 0;
  double scan_yz_deg = 0;
  Ground ground = Ground::kNone;
  double ground_height_m = 0;  // pec: the elements' height above the plane
  // The element: a short dipole along x or y (linear polarization); with `circular`,
  // a crossed pair per site (crossed_pair.h): this dipole and the one along
  // z x polarization, a quarter period apart for that sense toward +z.
  Vec3 polarization = Vec3::UnitX();
  std::optional<CircularSense> circular;
  // Circular only: the highest axial ratio at the beam peak, at broadside and at the
  // scan edges (dB; 3 dB is common practice), (0, 20].
  double max_axial_ratio_db = 3.0;
  double element_length_m = 0;  // physical length of each dipole
  LatticeChoice lattice = LatticeChoice::kEither;
  std::optional<long> max_elements;
  std::optional<double> max_aperture_x_m;  // largest extent along x (element centres)
  std::optional<double> max_aperture_y_m;

  double wavelength_m() const { return kSpeedOfLight_m_s / frequency_hz; }
};

// Throws InvalidArgument naming the first field out of range (the reader's checks,
// repeated for callers that build requirements in code).
void Validate(const SizingRequirements& r);

}  // namespace lobecast
