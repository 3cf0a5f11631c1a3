// Enum names and the validation of arrays and their currents (types.h).
#include <cmath>
#include <sstream>

#include "engine/error.h"
#include "engine/ground.h"
#include "engine/text_case.h"
#include "engine/types.h"

namespace lobecast {
namespace {

bool AllFinite(const Vec3& v) { return v.allFinite(); }

[[noreturn]] void FailDipole(std::size_t n, const std::string& what) {
  std::ostringstream s;
  s << "dipole " << n << ": " << what;
  throw InvalidArgument(s.str());
}

}  // namespace

std::string_view ToString(Distribution d) {
  return d == Distribution::kTriangular ? "triangular" : "uniform";
}

std::string_view ToString(Ground g) { return g == Ground::kPec ? "pec" : "none"; }

std::optional<Distribution> DistributionFromString(std::string_view s) {
  if (EqualsIgnoreCase(s, "uniform")) return Distribution::kUniform;
  if (EqualsIgnoreCase(s, "triangular")) return Distribution::kTriangular;
  return std::nullopt;
}

std::optional<Ground> GroundFromString(std::string_view s) {
  if (EqualsIgnoreCase(s, "none")) return Ground::kNone;
  if (EqualsIgnoreCase(s, "pec")) return Ground::kPec;
  return std::nullopt;
}

void Validate(const Array& array) {
  if (!std::isfinite(array.frequency_hz) || array.frequency_hz <= 0) {
    std::ostringstream s;
    s << "frequency_hz: found " << array.frequency_hz << ", expected a finite number > 0";
    throw InvalidArgument(s.str());
  }
  if (array.dipoles.empty())
    throw InvalidArgument("array: found no dipoles, expected at least one");
  for (std::size_t n = 0; n < array.size(); ++n) {
    const Dipole& d = array.dipoles[n];
    if (!AllFinite(d.position_m)) FailDipole(n, "position is not finite");
    if (!AllFinite(d.orientation) || std::abs(d.orientation.norm() - 1.0) > 1e-9) {
      std::ostringstream s;
      s << "orientation has length " << d.orientation.norm() << ", expected a unit vector";
      FailDipole(n, s.str());
    }
    if (!std::isfinite(d.length_m) || d.length_m <= 0) {
      std::ostringstream s;
      s << "length_m: found " << d.length_m << ", expected a finite number > 0";
      FailDipole(n, s.str());
    }
    if (array.ground == Ground::kPec && !(d.position_m.z() > 0)) {
      std::ostringstream s;
      s << "z = " << d.position_m.z() << " m with a PEC ground plane at z = 0, expected z > 0";
      FailDipole(n, s.str());
    }
  }
}

void ValidateCurrents(const Array& array, const Eigen::VectorXcd& currents_a) {
  if (static_cast<std::size_t>(currents_a.size()) != array.size()) {
    std::ostringstream s;
    s << "currents: found " << currents_a.size() << " values, expected one per dipole ("
      << array.size() << ")";
    throw InvalidArgument(s.str());
  }
  for (Eigen::Index n = 0; n < currents_a.size(); ++n) {
    if (!std::isfinite(currents_a[n].real()) || !std::isfinite(currents_a[n].imag()))
      FailDipole(static_cast<std::size_t>(n), "current is not finite");
  }
}

}  // namespace lobecast
