// Far-field power density and the distance at which it falls to a given level
// (C. A. Balanis, Antenna Theory, 4th ed., 2016, sec. 2.4 and 2.6: W = U / r^2 and
// U = G P / (4 pi), so S = EIRP / (4 pi r^2); from memory):
//
//   S(r) = EIRP / (4 pi r^2)        r(S) = sqrt(EIRP / (4 pi S))
//
// These are far-field estimates only: near the array, where the field has reactive
// terms, and where reflections (a ground, walls, vehicles) add to the direct wave,
// the real density can be higher. No exposure limit is built in.
#pragma once

namespace lobecast {

// W/m^2. Throws InvalidArgument for EIRP < 0 or not finite, or a distance that is
// not finite and > 0.
double PowerDensity(double eirp_w, double distance_m);
// m; 0 for an EIRP of 0. Throws InvalidArgument for EIRP < 0 or not finite, or a
// limit that is not finite and > 0.
double DistanceToDensity(double eirp_w, double density_w_m2);

}  // namespace lobecast
