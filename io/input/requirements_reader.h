// Reading a requirements file (CONVENTIONS §3, requirements files) for `lobecast
// size`. Every key (unknown keys are errors; lengths in length_unit; angles deg):
//
//   name, description   optional free text, carried into the candidate files
//   frequency           REQUIRED: Hz, or a string with Hz/kHz/MHz/GHz/THz
//   directivity_dbi     at least this peak directivity at broadside (+z), [0, 45]
//   beamwidth_deg       at most these half-power beamwidths at broadside: one number
//                       for both principal planes or [xz, yz], each in [1, 90]
//                       (directivity_dbi, beamwidth_deg or both are REQUIRED)
//   sidelobe_db         REQUIRED: the highest side lobe re the peak, at broadside and
//                       over the scan range, [-60, -10]
//   scan_deg            the scan range from broadside (default 0: broadside only): one
//                       number for every azimuth, or [xz, yz] per principal plane (the
//                       range between them an ellipse in sine space), each in [0, 80]
//   ground              "none" (default) or "pec" (the plane z = 0)
//   ground_height       pec only: the elements' height (default a quarter wavelength,
//                       common practice), (0, 2] wavelengths
//   polarization        "x" (default) or "y": the short dipoles' direction; "rhcp" or
//                       "lhcp": a crossed pair of x and y dipoles at every site, y a
//                       quarter period behind (rhcp) or ahead (lhcp) of x, circular
//                       toward +z (engine/synthesis/crossed_pair.h)
//   axial_ratio_db      rhcp, lhcp only: the highest axial ratio at the beam peak, at
//                       broadside and at the scan edges, (0, 20] dB (default 3, common
//                       practice); a crossed pair's is 1 / cos(scan) in the principal
//                       planes (3.01 dB at 45 deg)
//   lattice             "rectangular", "triangular" or "either" (default)
//   max_elements        optional integer, [4, 100000]: lattice sites (a crossed pair
//                       is one element of two dipoles)
//   max_aperture        optional: one length for both sides, or [x, y]: the largest
//                       extent of the element centres along x and y (room for two
//                       elements at half a wavelength at least)
//   element_length      the dipoles' length (default 0.05 wavelength), (0, 0.1] wavelength
//   length_unit         "m" (default), "cm", "mm" or "wavelength"
#pragma once

#include <string>
#include <string_view>

#include "engine/sizing/requirements.h"
#include "io/input_error.h"

namespace lobecast {

struct RequirementsFile {
  SizingRequirements requirements;
  std::string name, description;
  std::string source_path;
  std::string length_unit = "m";
};

// Reads `path`; throws InputError (located) for any rejected input.
RequirementsFile ReadRequirements(const std::string& path);
// The same from text; path_for_messages names it in messages.
RequirementsFile ParseRequirements(std::string_view text, const std::string& path_for_messages);

}  // namespace lobecast
