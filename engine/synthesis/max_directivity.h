// The currents of greatest directivity toward one direction and polarization.
//
// With f the field row of that direction and polarization (p^H E = f I, field_map.h)
// and R the mutual resistance matrix (P = 1/2 I^H R I, radiated_power.h), the
// partial directivity D_p = 4 pi |f I|^2 / (2 eta0 P) = (4 pi / eta0) |f I|^2 / (I^H R I)
// is a Rayleigh quotient (a generalized eigenproblem of rank one), greatest for
//
//   I ~ (R + eps (tr R / N) Id)^-1 f^H,   D_max = (4 pi / eta0) f R^-1 f^H
//
// (the regularization eps keeps the near-singular R of closely spaced elements
// invertible; eps = 0 gives the exact maximum when R is well conditioned). The
// standard treatment: R. F. Harrington, Time-Harmonic Electromagnetic Fields, 1961,
// and M. Uzkov, "An approach to the problem of optimum directive antenna design",
// C. R. Acad. Sci. URSS 53, 1946, who showed that N isotropic points in a line
// reach D -> N^2 endfire as the spacing shrinks (both from memory).
//
// Solvers: N <= dense_limit factors R (Cholesky, O(N^3), 8 N^2 bytes); larger
// arrays run conjugate gradients on R + eps (tr R / N) Id with the products R x
// streamed row by row (engine/power/power_large.h: O(N^2) time, O(N) memory), since
// R of 16384 dipoles would take 2 GiB and its factorization minutes.
//
// Sensitivity (tolerance) factor: Ks = sum |I_n|^2 mean_n |f_n|^2 / |f I|^2, which is
// 1/N for a uniform array in phase toward the beam (R. C. Hansen, Phased Array
// Antennas, 2nd ed., 2009, the superdirectivity chapter; E. N. Gilbert and S. P.
// Morgan, Bell Syst. Tech. J. 34, 1955, for random errors; both from memory): the
// power of the pattern that random current errors of relative variance s^2 add is
// about s^2 Ks times the beam's. The design is flagged superdirective when N Ks
// exceeds kSuperdirectiveRatio (common practice: currents ten times, 10 dB, more
// sensitive than the uniform array's).
//
// Precision: P = 1/2 sum I_m* R_mn I_n is a sum of terms much larger than itself for
// superdirective currents; digits_in_power = -log10(eps_double S / P) with S = 1/2 sum
// |I_m R_mn I_n| (exact on the dense route; on the streamed route a lower bound from
// |R_mn| <= sqrt(R_mm R_nn), R being positive semidefinite).
#pragma once

#include <string_view>

#include <Eigen/Core>

#include "engine/synthesis/field_map.h"
#include "engine/types.h"

namespace lobecast {

inline constexpr double kSuperdirectiveRatio = 10.0;

enum class DirectivitySolver { kAuto, kDense, kConjugateGradient };
std::string_view ToString(DirectivitySolver s);  // "auto", "dense", "conjugate-gradient"

struct MaxDirectivityOptions {
  // eps above, relative to the mean self resistance (tr R / N); >= 0. Small values
  // let the optimum use the near-invisible modes even of half-wave arrays: on 32 x 32
  // x dipoles at half a wavelength, eps = 1e-6 gains 0.025 dB over the uniform
  // excitation at N Ks = 13.8 (flagged superdirective; tests/bench/RESULTS.md).
  double regularization = 1e-10;
  DirectivitySolver solver = DirectivitySolver::kAuto;
  std::size_t dense_limit = 4096;  // kAuto: dense up to this many dipoles
  // Conjugate gradients: stop at ||r|| <= tolerance ||b||, or when the directivity
  // estimate grew by less than cg_directivity_tolerance (relative) in the last
  // iteration, or after max_iterations. With x_0 = 0, CG's b^H x_k = x_k^H (R + s Id)
  // x_k, so (4 pi / eta0) b^H x_k is the (regularized) Rayleigh quotient of x_k: it
  // rises monotonically to the maximum, and converges much sooner than the currents
  // on the near-singular R of a large half-wave array (whose invisible-space modes
  // have eigenvalues near the regularization). It creeps, though: a per-iteration
  // test stops short (1e-9 on 32 x 32 half-wave x dipoles, eps 1e-6: D 1e-4 below
  // the dense optimum, N Ks 1.2 instead of 13.8), so it is off (0) by default.
  double cg_tolerance = 1e-10;
  double cg_directivity_tolerance = 0;
  int cg_max_iterations = 2000;
  int num_threads = 0;  // 0: the OpenMP default
};

struct MaxDirectivityResult {
  // Scaled so that max |I_n| = 1 A, with p^H E at the beam direction real and > 0.
  Eigen::VectorXcd currents_a;
  double directivity = 0;              // total (both polarizations), linear, at the beam
  double partial_directivity = 0;      // in the requested polarization, linear
  double regularization = 0;           // the eps used
  double sensitivity_factor = 0;       // Ks (1/N for a uniform array in phase)
  double sensitivity_re_uniform = 0;   // N Ks
  bool superdirective = false;         // N Ks > kSuperdirectiveRatio
  double digits_in_power = 0;          // significant digits left in P
  bool digits_is_lower_bound = false;  // streamed route: a bound
  DirectivitySolver solver_used = DirectivitySolver::kDense;
  int cg_iterations = 0;
  double cg_residual_relative = 0;
};

// Throws InvalidArgument for an invalid array, options out of range, a polarization
// that is not a unit vector, or a direction where the polarization gets no field
// (f = 0: the ground's lower half space, or a null of every element).
MaxDirectivityResult MaximizeDirectivity(const Array& array, const Direction& beam,
                                         const PolarizationVector& polarization,
                                         const MaxDirectivityOptions& options = {});

}  // namespace lobecast
