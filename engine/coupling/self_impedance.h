// Self reactance and ohmic loss of a thin, electrically short dipole.
//
// Self reactance (triangular current, the centre-fed short dipole of
// CONVENTIONS §1): the induced EMF of the current I(z) = I0 (1 - |z| / h) on a
// wire of length l = 2 h and radius a, with the thin-wire ("reduced") kernel
// K(u) = exp(-j k R) / (4 pi R), R = sqrt(u^2 + a^2) (current on the axis, field
// on the surface), in the mixed-potential form
//
//   Z = j w mu0 / I0^2 int int I(z) I(z') K(z - z') dz dz'
//     + 1 / (j w eps0 I0^2) int int I'(z) I'(z') K(z - z') dz dz'
//
// (the induced-EMF method; Balanis, Antenna Theory, 4th ed., 2016, ch. 8, from
// memory). Both double integrals are one integral over u = z - z' of K(u) times the
// autocorrelation of I or I' (piecewise polynomial, integrated exactly), and the
// near-singular 1/R at u = 0 is removed by u = a sinh(t). The result is accurate to
// rounding for the model; the model itself holds for a << l << lambda. Its short
// limit is the textbook X = -(eta0 / pi) (ln(l / 2a) - 1) / tan(k l / 2) (Balanis 4th
// ed. ch. 4 and 8, "120 (ln(l/2a) - 1) / tan(pi l / lambda)", from memory), which
// this integral reproduces within a few per cent for l / a > 50 and l < lambda / 10.
// Only Im Z is used: the self resistance of the pattern and power is the closed form
// of radiated_power.h, so that P and Re Z agree exactly.
//
// A uniform (Hertzian) current needs end charges whose field depends on how the
// ends are built (top hats, loading coils): no formula covers it, and such
// elements must be given a reactance.
//
// Ohmic loss: a round wire of conductivity sigma with the current in a skin of depth
// delta = sqrt(2 / (w mu0 sigma)) << a has the surface resistance
// R_s = sqrt(w mu0 / (2 sigma)) over the circumference 2 pi a (Balanis 4th ed. sec.
// 2.14, eq. 2-90b, from memory), so per unit length R_s / (2 pi a); the loss
// resistance referred to the terminal current is that times int |I(z)/I0|^2 dz:
// l for a uniform current, l / 3 for a triangular one. Where delta is not small
// against a the current fills more of the wire: the formula then underestimates
// the loss, and LossResistance says so through its validity flag.
#pragma once

#include "engine/types.h"

namespace lobecast {

// X_self (ohm) of a dipole with a triangular current, wire radius radius_m, at
// wavenumber k. Throws InvalidArgument for a uniform current, a radius <= 0 or not
// below half the length.
double SelfReactance(const Dipole& dipole, double radius_m, double k_rad_m);

// The textbook short-dipole form above, for comparison and tests.
double SelfReactanceShortForm(double length_m, double radius_m, double k_rad_m);

struct OhmicLoss {
  double resistance_ohm = 0;      // referred to the terminal current
  double skin_depth_m = 0;        // delta
  bool skin_effect_valid = true;  // false where delta > radius / 2 (common practice)
};

// Loss resistance of the dipole's wire of conductivity sigma (S/m) at angular
// frequency w. Throws InvalidArgument unless radius and conductivity are finite > 0.
OhmicLoss LossResistance(const Dipole& dipole, double radius_m, double conductivity_s_m,
                         double angular_frequency_rad_s);

}  // namespace lobecast
