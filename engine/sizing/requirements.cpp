#include "engine/sizing/requirements.h"

#include <cmath>
#include <string>

#include "engine/error.h"
#include "engine/text_case.h"

namespace lobecast {

std::string_view ToString(LatticeChoice c) {
  switch (c) {
    case LatticeChoice::kRectangular:
      return "rectangular";
    case LatticeChoice::kTriangular:
      return "triangular";
    case LatticeChoice::kEither:
      break;
  }
  return "either";
}

std::optional<LatticeChoice> LatticeChoiceFromString(std::string_view s) {
  for (LatticeChoice c :
       {LatticeChoice::kRectangular, LatticeChoice::kTriangular, LatticeChoice::kEither})
    if (EqualsIgnoreCase(s, ToString(c))) return c;
  return std::nullopt;
}

void Validate(const SizingRequirements& r) {
  const auto fail = [](const char* what) { throw InvalidArgument(std::string("sizing: ") + what); };
  if (!(std::isfinite(r.frequency_hz) && r.frequency_hz > 0)) fail("frequency must be > 0");
  if (!r.directivity_dbi && !r.beamwidth_xz_deg && !r.beamwidth_yz_deg)
    fail("a directivity or a beamwidth is required");
  if (r.directivity_dbi && !(*r.directivity_dbi >= 0 && *r.directivity_dbi <= 45))
    fail("directivity_dbi must be in [0, 45]");
  for (const auto& bw : {r.beamwidth_xz_deg, r.beamwidth_yz_deg})
    if (bw && !(*bw >= 1 && *bw <= 90)) fail("beamwidths must be in [1, 90] deg");
  if (!(r.sidelobe_db >= -60 && r.sidelobe_db <= -10)) fail("sidelobe_db must be in [-60, -10]");
  if (!(r.scan_xz_deg >= 0 && r.scan_xz_deg <= 80 && r.scan_yz_deg >= 0 && r.scan_yz_deg <= 80))
    fail("scan limits must be in [0, 80] deg");
  const double lambda = r.wavelength_m();
  if (r.ground == Ground::kPec && !(r.ground_height_m > 0 && r.ground_height_m <= 2 * lambda))
    fail("the ground height must be in (0, 2] wavelengths");
  if (!(std::abs(r.polarization.norm() - 1) < 1e-12 &&
        (std::abs(r.polarization.x()) == 1 || std::abs(r.polarization.y()) == 1)))
    fail("the polarization must be x or y");
  if (r.circular && !(r.max_axial_ratio_db > 0 && r.max_axial_ratio_db <= 20))
    fail("the axial-ratio limit must be in (0, 20] dB");
  if (!(r.element_length_m > 0 && r.element_length_m <= 0.5 * lambda))
    fail("the element length must be in (0, lambda/2]");
  if (r.max_elements && !(*r.max_elements >= 4 && *r.max_elements <= 100000))
    fail("max_elements must be in [4, 100000]");
  for (const auto& a : {r.max_aperture_x_m, r.max_aperture_y_m})
    if (a && !(std::isfinite(*a) && *a > 0)) fail("max_aperture must be > 0");
}

}  // namespace lobecast
