// Radiated power and R x for large arrays by a quadrature over directions that is
// exact for the pattern's band limit (CONVENTIONS §1, "for very large arrays"),
// evaluated with the field plan (engine/field/far_field.h): its fast path where
// cheaper, and its adjoint for R x. O(N + L^2 log L) plus the transform's own
// cost, L ~ k a, instead of the O(N^2) of the closed form (radiated_power.h,
// power_large.h).
//
// Why it is exact up to a bound. With pref = w mu0 / 4 pi, the sources s (dipoles
// and, over PEC, their images) with currents c_s and moments m_s = Le_s u_s, and
// rho_s = r_s - r0 within radius a of a centre r0,
//
//   |rE(r)|^2 = pref^2 sum_{s,t} conj(c_s) c_t m_s^T (I - r r^T) m_t exp(j k r.(rho_t - rho_s))
//
// (the common phase exp(j k r.r0) cancels). Rayleigh's expansion (DLMF 10.60.7)
// exp(j k r.d) = sum_l (2l+1) j^l j_l(k|d|) P_l(r.d_hat), kept up to degree Lambda,
// makes every term a polynomial of degree Lambda + 2 in the components of r (the
// projector is of degree 2); |P_l| <= 1 and |m_s^T (I - r r^T) m_t| <= |m_s| |m_t|
// bound what is left out on the whole sphere by
//
//   || |rE|^2 - p || <= pref^2 S1^2 tau_Lambda(2 k a),  S1 = sum_s |c_s| |m_s|,
//   tau_Lambda(x) = sum_{l > Lambda} (2l+1) sup_{0 <= x' <= x} |j_l(x')|,
//
// since |rho_t - rho_s| <= 2a. The product rule below (Gauss-Legendre in cos theta
// with n_theta nodes, Abramowitz and Stegun 25.4.29; the trapezoid in phi with
// n_phi points, exact for exp(j m phi), |m| < n_phi) integrates every spherical
// harmonic of degree D <= min(2 n_theta - 1, n_phi - 1) exactly, and its weights are
// positive and sum to 4 pi, so for D = Lambda + 2
//
//   |Q(|rE|^2) - int |rE|^2 dOmega| <= 8 pi pref^2 S1^2 tau_Lambda(2 k a).
//
// The bound on tau. For l >= ceil(x), j_l is positive on (0, x] (its first zero is
// above l + 1/2: DLMF 10.21(i), j_{nu,1} > nu) and the ratio r_l = j_{l+1}/j_l
// satisfies r_l = x / (2l + 3 - x r_{l+1}) (the recurrence DLMF 10.51.1); j_l is
// the minimal solution, so the continued fraction converges to r_l (Pincherle's
// theorem; Gautschi, SIAM Review 9, 1967), and by induction from its truncations
// r_l <= rho_l(x), the smaller root of rho = x / (2l + 3 - x rho):
//
//   rho_l(x) = 2x / (2l + 3 + sqrt((2l + 3)^2 - 4 x^2)),
//
// which grows with x and falls with l. With |j_l| <= 1 (DLMF 10.54.2 and |P_l| <= 1)
// and |j_l(x)| <= x^l / (2l+1)!! (DLMF 10.14.4 with 10.47.3), the bound b_l of
// sup_{x' <= x} j_l(x') is min(x^l / (2l+1)!!, b_{l-1} rho_{l-1}(x)) from b = 1 at
// l = ceil(x); the tail of (2l+1) b_l closes geometrically once the ratio
// q_l = rho_l (2l+3)/(2l+1) (falling in l) is below 1/2. For l = x + delta,
// rho_l ~ 1 - sqrt(2 delta / x), so b_l ~ exp(-(2/3) sqrt(2/x) delta^(3/2)): the
// degree needed is 2 k a + O((k a)^(1/3)), as for the Airy-type decay of j_l past
// its turning point (e.g. 2ka = 4439, a 1000 x 1000 lattice at half a wavelength:
// Lambda = 2ka + 251 for a tail of 1e-20; 2ka = 218, a 20-wavelength cube, + 79 for
// 3e-17). Against the true tail (std::sph_bessel) the bound costs at most
// 2 x^(1/3) + 2 degrees (tests/power_quadrature_test.cpp).
//
// The rule. Lambda is the smallest degree with 3 N_s tau_Lambda(2ka) below 1e-3 of
// the target: relative to the power of incoherent sources, pref^2 (8 pi / 3)
// sum |c_s m_s|^2 / (2 eta0), the truncation is 3 tau S1^2 / sum |c_s m_s|^2 <=
// 3 N_s tau (Cauchy-Schwarz), and 1e-3 leaves room for currents that add to less
// than that. n_theta = ceil((Lambda + 3) / 2), n_phi = Lambda + 3: about (k a + 1)
// by (2 k a + 3) nodes, the "L + 1 by 2L + 1" rule with L = k a.
// The centre r0 is the middle of the sources' bounding box (images included, so
// on the ground plane over PEC); a is the largest distance from it.
//
// Symmetric halves. Over PEC the sources and images are mirror images with
// reversed horizontal moments, so |rE(x, y, -z)|^2 = |rE(x, y, z)|^2 exactly, and
// P, half the free-space power of sources and images (CONVENTIONS §1), is the
// integral over the upper hemisphere: the upper nodes of a rule with an even
// n_theta (its nodes come in pairs +-x with equal weights) integrate it exactly,
// with half the full rule's error. The same symmetry holds in free space for a
// planar array (every source at one z) whose moments are all vertical or all
// horizontal; then the upper nodes count twice. Either way the lower half is
// never evaluated. The integrand of R x (below) has the same symmetry.
//
// P and R x. P = (1 / 2 eta0) sum_q w_q |rE(r_q)|^2, and since P = 1/2 I^H R I
// with rE = A I (A the plan's map), R = (1 / eta0) int A^H A dOmega, so
// R x = (1 / eta0) A^H W A x (W the weights): FieldPlan::Execute, then
// ExecuteAdjoint with the weights. The integrand of (R x)_m is a_m^H (A x), of
// the same band limit (the same differences of positions), with the bound
// 8 pi pref^2 M_m S1 tau, M_m = sum of |m_s| over m's sources.
//
// The field's own error. Each node's field is within delta of the exact sum:
// the fast path's bound (its error model at one fixed transform tolerance, plus a
// lattice's placement error; FieldOptions::fixed_pass_tolerance), or for the
// direct sum a rounding model, sqrt(3) pref S1 u (8 k R + 6 sqrt(N_s) + 10), u =
// 2^-53, R the largest |r_s| (the phase k r.r_s carries a relative rounding of a
// few u, coherent at worst, plus sincos and products; the summation by the
// probabilistic bound of Higham and Mary, SIAM J. Sci. Comput. 41, 2019, with
// lambda = 6). Then | |E|^2 - |E~|^2 | <= delta (2 |E~| + delta) node by node, and
// (R x)_m moves by at most pref M_m sum_q w_q delta_q / eta0, plus the adjoint
// transform's own bound. The transform tolerance is chosen so this part stays
// near half the target for incoherent sources (eps ~ target / (85 sqrt(N_s)),
// 1e-14 at the least). Both parts are reported; P's bound relative to the P found.
//
// Why R x only, and not X' x (the mutual reactances of the active impedance).
// The resistance is the far-field part of the coupling: Re G(R) integrates plane
// waves over the sphere |q| = k of wavevectors (the identity above), a band-limited
// function that a quadrature over directions reproduces. The reactance is
// Im G(R) ~ cos(kR) / R: its spectrum is the principal value of 1 / (|q|^2 - k^2)
// over all of q-space, singular at R = 0 and not confined to any sphere, so no
// rule over directions gives it, and a type-3 transform would have to sample a 3-D
// volume of q (O((k a)^3) points, not O((k a)^2)) with the singularity treated
// separately, a precorrected-FFT or fast-multipole method with near-field
// corrections: a different algorithm, not done here. So the quadrature route
// gives P and R x; the active resistances (which need X' x, CONVENTIONS §1) are
// left to the closed, streamed route, O(N N_s) pair evaluations
// (power_cost.h, StreamedPowerCost), and the pattern job leaves them out (NaN, with
// a note) when it takes the quadrature.
#pragma once

#include <cstddef>
#include <string>

#include <Eigen/Core>

#include "engine/types.h"

namespace lobecast {

// An upper bound of sum_{l > degree} (2l + 1) sup_{0 <= x' <= x} |j_l(x')| (above),
// x >= 0; +inf when degree + 1 < ceil(x) (no bound there), 0 when x = 0.
double SphericalBesselTailBound(int degree, double x);

// The smallest degree >= 0 whose SphericalBesselTailBound(degree, x) <= tail (> 0).
int BandLimitDegree(double x, double tail);

struct PowerQuadratureOptions {
  // The relative error aimed at: sets the degree and the transform tolerance
  // (above). The bound reported is the one met; 1e-14 to 1e-2.
  double target_relative = 1e-10;
  // Threads for the field plans (0: the OpenMP default). The result does not
  // depend on them.
  int num_threads = 0;
  // Nodes are evaluated in blocks of whole theta rows of about this many, each
  // with its own field plan (~240 bytes a direction while it runs).
  std::size_t block_directions = std::size_t{1} << 20;

  // False (with the reason) unless 1e-14 <= target_relative <= 1e-2 and
  // block_directions >= 1.
  bool IsValid(std::string* why) const;
};

// The rule for an array's geometry (not its currents): the cost model and the
// quadrature take it from here.
struct SphereRule {
  Vec3 centre_m = Vec3::Zero();  // r0
  double radius_m = 0;           // a: every source (images too) within it of r0
  int band_degree = 0;           // Lambda
  double tail = 0;               // tau_Lambda(2 k a)
  int num_theta = 1;             // Gauss-Legendre nodes over the whole sphere
  int num_phi = 1;
  // Only the nodes with cos theta > 0 are evaluated (above); their weights count
  // upper_weight times (1 over PEC, 2 for a symmetric planar array).
  bool upper_half = false;
  double upper_weight = 1;
  // The tolerance of the fast path's one pass (a power of ten).
  double transform_tolerance = 1e-14;
  int exact_degree() const { return band_degree + 2; }
  int evaluated_theta() const { return upper_half ? num_theta / 2 : num_theta; }
  std::size_t num_nodes() const {
    return static_cast<std::size_t>(evaluated_theta()) * static_cast<std::size_t>(num_phi);
  }
};

// Throws InvalidArgument for an invalid array or options.
SphereRule PowerQuadratureRule(const Array& array, const PowerQuadratureOptions& options = {});

struct QuadraturePower {
  double radiated_power_w = 0;
  // Bounds of |P - P_exact| relative to the P found: the band-limit truncation,
  // the field's own error (transform or rounding), and their sum.
  double truncation_bound_relative = 0;
  double field_bound_relative = 0;
  double error_bound_relative = 0;
  SphereRule rule;
  std::size_t fast_blocks = 0;  // blocks whose field plan took the fast path
  std::size_t blocks = 0;
};

// P (W) of the currents (ValidateCurrents). Throws InvalidArgument for invalid
// input.
QuadraturePower RadiatedPowerByQuadrature(const Array& array, const Eigen::VectorXcd& currents_a,
                                          const PowerQuadratureOptions& options = {});

struct QuadratureResistanceProduct {
  Eigen::VectorXcd values;  // R x (ohm times the units of x)
  // The largest bound of an entry's error (truncation, field, adjoint transform),
  // relative to max_m |(R x)_m|.
  double error_bound_relative = 0;
  SphereRule rule;
};

// R x without the matrix (for iterative solvers on R, as ResistanceProductStreamed
// of power_large.h, in O(N + L^2 log L)). x is checked as currents.
QuadratureResistanceProduct ResistanceProductByQuadrature(
    const Array& array, const Eigen::VectorXcd& x, const PowerQuadratureOptions& options = {});

}  // namespace lobecast
