// Mutual impedance of elemental dipoles and the active (driving-point) resistance
// (CONVENTIONS §1). For dipoles m != n at R = r_m - r_n, x = k |R|, R_hat = R / |R|
// (induced EMF of point dipoles, exact near and far field):
//
//   Z_mn = j w mu0 Le_m Le_n u_m . G(R) . u_n,
//   G(R) = exp(-j x) / (4 pi |R|) [ (1 - j/x - 1/x^2) I + (-1 + 3j/x + 3/x^2) R_hat R_hat ]
//
// which is, with the spherical Bessel and Neumann functions j_n, y_n,
//
//   Z_mn = (k^2 eta0 Le_m Le_n / 4 pi) [ (u_m.u_n)(h(x) ) + (u_m.R_hat)(u_n.R_hat) h2(x) ],
//   h(x) = (j0 - j1/x) - j (y0 - y1/x),   h2(x) = j2 - j y2,
//
// so Re Z_mn is exactly the mutual radiation resistance R_mn of radiated_power.h
// (the same series is used below x = 2) and Im Z_mn = X_mn follows from y_n.
//
// The active impedance of element m is Z_act,m = sum_n Z_mn I_n / I_m. Its real
// part, the active resistance, needs R_mm and the mutual reactances X_mn (n != m)
// but not the self reactance X_mm (Z_mm I_m / I_m = R_mm + j X_mm), so it is known
// for every array. Re(sum_n R_mn I_n / I_m) is not the active resistance when the
// currents differ in phase: it is element m's share of the radiated power,
// 2 P_m / |I_m|^2.
//
// With a PEC ground the image terms are added as for R: Z_mn includes the coupling
// of m to the image of n (the image of m itself included, a mutual term at 2 h).
//
// Dipoles at one point: the point-dipole model gives no finite X_mn unless they
// are orthogonal (crossed dipoles sharing a centre, where Z_mn = 0 by symmetry).
// Such pairs get X_mn = NaN, and so do the active resistances they enter (with a
// non-zero current).
#pragma once

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// The two radial functions of Z_mn without the factor k^2 eta0 / (4 pi):
// h = (j0 - j1/x) - j (y0 - y1/x) and h2 = j2 - j y2 (spherical Hankel functions of
// the second kind, as exp(+jwt) needs). Real parts as RadiationKernelAt (series
// below x = 2); imaginary parts from the closed forms of y_n (DLMF 10.49.4), which
// grow like 1/x^3 at small x and do not cancel. x > 0.
struct ImpedanceKernel {
  Complex h;
  Complex h2;
};
ImpedanceKernel ImpedanceKernelAt(double x);

// Z_mn (ohm) between two elemental dipoles in free space at wavenumber k. For two
// dipoles at one point: Re is R_mn (the x -> 0 limit), Im is 0 if they are
// orthogonal, NaN otherwise (see above). Used for m != n: the self term needs a
// wire radius and a current model.
Complex MutualImpedance(const Dipole& m, const Dipole& n, double k_rad_m);

// The N x N impedance matrix Z (ohm), complex symmetric, with the image terms of a
// PEC ground, and Z_mm = R_mm + j (self_reactance_ohm[m] + X of m's own image).
// Re Z equals ResistanceMatrix(array). O(N^2) time and 16 N^2 bytes.
Eigen::MatrixXcd ImpedanceMatrix(const Array& array, const Eigen::VectorXd& self_reactance_ohm,
                                 int num_threads = 0);

// (Z I)_m / I_m for an impedance matrix and currents: the active impedance (ohm).
// NaN where I_m = 0; terms with I_n = 0 are skipped (an open element couples nothing).
Eigen::VectorXcd ActiveImpedance(const Eigen::MatrixXcd& impedance_ohm,
                                 const Eigen::VectorXcd& currents_a);

}  // namespace lobecast
