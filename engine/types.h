// The description of an array of elemental (short) dipoles, as the engine sees it.
// Units are in the names; angles inside the engine are radians.
#pragma once

#include <complex>
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "engine/constants.h"

namespace lobecast {

using Complex = std::complex<double>;
using Vec3 = Eigen::Vector3d;

// Current distribution along a dipole. It sets the effective length Le used in the
// far field and in the resistance matrix (CONVENTIONS §1):
//   kUniform    Hertzian (infinitesimal) dipole, Le = l    (Balanis 4th ed. sec. 4.2)
//   kTriangular electrically short centre-fed dipole, Le = l/2 (Balanis sec. 4.3)
enum class Distribution { kUniform, kTriangular };

// kNone: free space. kPec: perfect electric conductor filling z < 0, handled by
// image theory (engine/ground.h).
enum class Ground { kNone, kPec };

std::string_view ToString(Distribution d);
std::string_view ToString(Ground g);
// Case-insensitive; std::nullopt for an unknown name.
std::optional<Distribution> DistributionFromString(std::string_view s);
std::optional<Ground> GroundFromString(std::string_view s);

struct Dipole {
  Vec3 position_m = Vec3::Zero();
  Vec3 orientation = Vec3::UnitZ();  // unit vector along positive current
  double length_m = 0.0;             // physical length l
  Distribution distribution = Distribution::kUniform;

  double effective_length_m() const {
    return distribution == Distribution::kTriangular ? 0.5 * length_m : length_m;
  }
};

struct Array {
  double frequency_hz = 0.0;
  Ground ground = Ground::kNone;
  std::vector<Dipole> dipoles;

  double wavelength_m() const { return kSpeedOfLight_m_s / frequency_hz; }
  double wavenumber_rad_m() const { return 2.0 * kPi * frequency_hz / kSpeedOfLight_m_s; }
  double angular_frequency_rad_s() const { return 2.0 * kPi * frequency_hz; }
  std::size_t size() const { return dipoles.size(); }
};

// Throws InvalidArgument unless: frequency finite and > 0, at least one dipole,
// every position finite, every orientation a finite unit vector (|u| = 1 within
// 1e-9), every length finite and > 0, and with a PEC ground every dipole strictly
// above z = 0. The message names the dipole (0-based index). Geometry only: the
// excitation is checked by ValidateCurrents.
void Validate(const Array& array);

// The excitation of an array is kept apart from its geometry: one terminal current
// per dipole (A, complex peak), in dipole order, so that one geometry (and one
// FieldPlan) serves many current vectors. Throws InvalidArgument unless there is
// exactly one current per dipole and every current is finite; the message names
// the dipole (0-based index) as Validate does.
void ValidateCurrents(const Array& array, const Eigen::VectorXcd& currents_a);

}  // namespace lobecast
