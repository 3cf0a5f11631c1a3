// Field method names and the options check (far_field.h).
#include <sstream>

#include "engine/field/far_field.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(FieldMethod m) {
  switch (m) {
    case FieldMethod::kDirect:
      return "direct";
    case FieldMethod::kFast:
      return "fast";
    case FieldMethod::kAuto:
      return "auto";
  }
  return "unknown";
}

std::string_view ToString(FastTransform t) {
  switch (t) {
    case FastTransform::kNone:
      return "none";
    case FastTransform::kType3:
      return "type-3";
    case FastTransform::kLattice:
      return "lattice";
  }
  return "unknown";
}

std::optional<FieldMethod> FieldMethodFromString(std::string_view s) {
  const std::string lower = Lower(s);
  for (FieldMethod m : {FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto}) {
    if (lower == ToString(m)) return m;
  }
  return std::nullopt;
}

bool FieldOptions::IsValid(std::string* why) const {
  std::ostringstream m;
  if (num_threads < 0) {
    m << "num_threads: found " << num_threads << ", expected 0 (OpenMP default) or more";
  } else if (!(tolerance_relative >= 1e-14 && tolerance_relative <= 1e-2)) {
    m << "tolerance_relative: found " << tolerance_relative << ", expected 1e-14 to 1e-2";
  } else if (!(fixed_pass_tolerance == 0 ||
               (fixed_pass_tolerance >= 1e-14 && fixed_pass_tolerance <= 1e-1))) {
    m << "fixed_pass_tolerance: found " << fixed_pass_tolerance
      << ", expected 0 (search) or 1e-14 to 1e-1";
  } else {
    return true;
  }
  if (why) *why = m.str();
  return false;
}

}  // namespace lobecast
