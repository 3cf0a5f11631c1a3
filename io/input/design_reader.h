// Reading the design tables of a design file ([element], [lattice], [taper],
// [steer], [[null]], [objective]; CONVENTIONS §3, design files) for the array
// reader, which reads everything a design shares with an array description
// (frequency, ground, length_unit, grid, [[dipole]], dipoles_csv) and puts the
// generated dipoles first. Internal to io/input.
//
// Keys (lengths in the file's length_unit; angles in degrees; unknown keys are
// errors; a key that the chosen kind does not use is an error too, never ignored):
//
//   [element]        REQUIRED. The template of every generated dipole.
//   orientation      REQUIRED [ux, uy, uz], normalized; turns with `rotation`
//   length           REQUIRED, > 0
//   distribution     "uniform" (default) or "triangular"
//   radius, self_reactance, conductivity   the wire keys of a [[dipole]] table
//   crossed_pair     "rhcp" or "lhcp": a crossed pair at every site instead of one
//                    dipole (engine/synthesis/crossed_pair.h): the template along
//                    `orientation` (which must lie in the lattice plane) and a second
//                    one along n x orientation (n the plane's normal), its current a
//                    quarter period behind or ahead of the first's so that the field
//                    toward the beam ([steer], or the broadside on +n) has that sense
//                    (IEEE Std 145-2013, exp(+jwt)). Both get the site's taper and
//                    steering; [[null]] and [objective] act on every dipole, the
//                    objective in that circular polarization. Panels and rings only.
//                    The site's dipoles are consecutive (first, second).
//
//   [lattice]        its presence makes the file a design
//   kind             REQUIRED "line", "rectangular", "triangular" or "ring"
//   count            line: N; rectangular, triangular: [Nx, Ny]; ring: N, or
//                    [N1, N2, ...] for concentric rings (innermost first)
//   spacing          line: d; rectangular, triangular: [dx, dy] or one number for
//                    both (triangular: odd rows shifted by dx/2); ring: not used
//   radius           ring only: R, or [R1, R2, ...] with one per ring, increasing
//   axis             line only: "x" (default), "y" or "z"
//   center           [x, y, z], default [0, 0, 0]; over ground = "pec" every
//                    element must end up at z > 0
//   rotation         { axis = [x, y, z], angle = <deg> }: the whole lattice (and its
//                    elements' orientation) turned about `center`, right-handed
//   remove           [i, j, ...]: generation indices (0-based, order in
//                    engine/synthesis/lattice_generator.h) left out (sites: a
//                    crossed pair goes as a whole)
//
//   [taper]          optional (default uniform); amplitudes, largest = peak_current
//                    (per dipole: each dipole of a crossed pair carries it)
//   kind             "uniform", "binomial", "chebyshev", "taylor", "cosine",
//                    "circular-taylor" (panels and rings; the others are separable
//                    x times y on panels)
//   sidelobe_db      chebyshev, taylor, circular-taylor: < 0 (default -30)
//   nbar             taylor, circular-taylor: integer >= 1 (default 4)
//   pedestal_db      cosine: edge level re the centre, <= 0 (default -10)
//   aperture_radius  circular-taylor: default the farthest element's distance
//   peak_current     A peak, > 0 (default 1)
//
//   [steer]          optional; main beam toward (theta, phi)
//   theta            REQUIRED, [0, 180]
//   phi              [0, 360], default 0
//   mode             "phase" (default) or "delay" (true time delay)
//
//   [[null]]         theta ([0, 180]; <= 90 over ground) and phi ([0, 360]), both
//                    REQUIRED: the total far field vanishes there
//   [objective]      optional, replaces the taper (a [taper] with it is an error)
//   kind             REQUIRED "max-directivity" (toward [steer], or +z) or
//                    "sidelobe-envelope" (lowest highest side lobe, or a mask)
//   regularization   max-directivity: >= 0, relative to R's largest diagonal entry
//   sidelobe_db      sidelobe-envelope: the level to meet, < 0 (default: the lowest)
//   mask             sidelobe-envelope: [{ theta = [lo, hi], phi = [lo, hi],
//                    level_db = <dB < 0> }, ...] (phi optional: every azimuth)
//
// Generated and explicit dipoles mix: explicit [[dipole]] tables and CSV rows keep
// their own currents, drives and loads (neither tapered nor steered).
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include <toml++/toml.h>

#include "engine/coupling/coupling.h"
#include "io/input/design.h"

namespace lobecast {

// The root keys a design adds to an array description's.
inline constexpr std::string_view kDesignTables[] = {"element", "lattice", "taper",
                                                     "steer",   "null",    "objective"};

// A file is a design when it has a [lattice] table.
inline bool IsDesign(const toml::table& root) { return root.contains("lattice"); }

struct GeneratedDipoles {
  DesignInfo info;
  std::vector<Dipole> dipoles;  // metres, orientation normalized
  std::vector<Complex> currents;
  Wire wire;
  // For the reader's located checks of every generated dipole.
  SourceLocation where, position, length;
  std::string position_key, length_key;
};

// Reads the design tables of `root`. `array` holds the frequency and the ground;
// metres_per_unit and unit_name are the file's length unit. Throws InputError.
GeneratedDipoles ReadDesignTables(const toml::table& root, const std::string& path,
                                  double metres_per_unit, std::string_view unit_name,
                                  const Array& array);

}  // namespace lobecast
