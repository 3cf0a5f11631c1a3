// Radiated power in closed form through the mutual radiation resistance matrix
// (CONVENTIONS §1). No quadrature: P = 1/2 I^H R I with
//
//   R_mn = (k^2 eta0 Le_m Le_n / 4 pi) [ (u_m.u_n)(j0(x) - j1(x)/x) + (u_m.d)(u_n.d) j2(x) ]
//
// x = k|r_m - r_n|, d the unit separation, limit (2/3)(u_m.u_n) at x = 0. It follows
// from integrating U over the sphere with
// int (I - r r) exp(j x r.d) dOmega = 4 pi [I (j0 - j1/x) + d d j2].
// With a PEC ground R = R_direct + R_to_images (half the power of dipoles plus
// images in free space).
#pragma once

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// Below this x = k |r_m - r_n| the closed forms of j0 - j1/x and j2 lose digits to
// cancellation (j2 ~ x^2/15 comes out of terms of size 3/x^2); the series converges
// fast there. RadiationKernelAt and the streamed power split at the same x.
inline constexpr double kKernelSeriesBelow = 2.0;

// f(x) = j0(x) - j1(x)/x and j2(x), the two radial functions of R_mn. For
// x < kKernelSeriesBelow both come from their Maclaurin series (the closed forms
// cancel catastrophically there), so they stay accurate to ~1e-15 relative down to x = 0.
// g = 2/3 - f is O(x^2) and comes from the series as well (not from 2/3 - f, which
// cancels): the kernel of a dipole with its own image over PEC, or of close dipoles
// whose currents nearly cancel.
struct RadiationKernel {
  double f;
  double j2;
  double g;
};
RadiationKernel RadiationKernelAt(double x);

// R_mn (ohm) between two elemental dipoles at wavenumber k, free space.
double MutualResistance(const Dipole& m, const Dipole& n, double k_rad_m);

// R_mm over a PEC ground (ohm): the self term plus the coupling to its own image at
// x = 2 k z, combined without cancellation. With the image's u' = (-ux, -uy, uz) and
// d_hat = z_hat, R_mm + R_mm' = (k^2 eta0 Le^2 / 4 pi) [ (4/3) uz^2 - (uz^2 - uh^2) g(x)
// + uz^2 j2(x) ], uh^2 = ux^2 + uy^2: a horizontal dipole low over the ground keeps its
// O(x^2) resistance to full precision instead of 2/3 - (2/3 - O(x^2)).
double SelfResistanceOverGround(const Dipole& m, double k_rad_m);

// The N x N mutual radiation resistance matrix (ohm), real symmetric positive
// semidefinite, including the ground plane. O(N^2) time and memory. num_threads as
// ResolveThreads (0: the OpenMP default); each entry is computed by one thread in
// a fixed order, so the matrix does not depend on the thread count.
Eigen::MatrixXd ResistanceMatrix(const Array& array, int num_threads = 0);

// P = 1/2 Re(I^H R I), W. R and I belong to one array (same size: checked).
double RadiatedPower(const Eigen::MatrixXd& resistance_ohm, const Eigen::VectorXcd& currents_a);

// S = 1/2 sum_mn |I_m| |R_mn| |I_n|, W: the sum of the magnitudes of P's terms. Where
// currents nearly cancel (an anti-phase pair much closer than a wavelength) P is much
// smaller than S and the rounding of the sum, ~eps S, eats P's digits.
double PowerTermMagnitudes(const Eigen::MatrixXd& resistance_ohm,
                           const Eigen::VectorXcd& currents_a);

// The decimal digits of P that the sum keeps: -log10(eps S / P), eps = 2.2e-16 (15.7
// without cancellation); fewer than kPowerDigitsWanted are said in every output.
double PowerSignificantDigits(double radiated_power_w, double term_magnitudes_w);
inline constexpr double kPowerDigitsWanted = 9.0;

// Throws InvalidArgument unless P is finite and > 0: currents so large the power
// overflows, or none (or exactly cancelling ones), leave directivity undefined.
void CheckRadiatedPower(double radiated_power_w);

// The active (driving-point) resistance needs the mutual reactances as well:
// engine/power/impedance.h (ActiveImpedance) and power_large.h.

}  // namespace lobecast
