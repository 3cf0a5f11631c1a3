// Amplitude tapers for design files (CONVENTIONS §3, design files): one-dimensional
// tapers for lines and, as separable products (x times y), for panels; a radial
// (circular) Taylor taper for panels and rings; the taper efficiency.
//
// Every taper is real, positive and normalized to a largest amplitude of 1.
//
//   uniform     1
//   binomial    C(N-1, n) (Balanis, Antenna Theory, 4th ed., sec. 6.8.2, from memory):
//               the array factor is (1 + exp(j psi))^(N-1), with no side lobes at
//               half-wave spacing.
//   chebyshev   Dolph-Chebyshev (C. L. Dolph, Proc. IRE 34, 1946, pp. 335-348): the
//               array factor T_{N-1}(beta cos(psi/2)), every side lobe at sidelobe_db,
//               beta = cosh(acosh(R) / (N-1)), R = 10^(-sidelobe_db/20). The weights
//               are the inverse DFT of that array factor sampled at psi_k = 2 pi k / N.
//   taylor      Taylor's n-bar line source (T. T. Taylor, IRE Trans. AP-3, 1955, pp.
//               16-28) sampled at the element centres x_n = (n - (N-1)/2) / N (aperture
//               length 1): g(x) = 1 + 2 sum_{m=1}^{nbar-1} F_m cos(2 pi m x),
//               F_m = (-1)^(m+1) prod_n (1 - m^2 / (s2 (A^2 + (n - 1/2)^2)))
//                     / (2 prod_{n != m} (1 - m^2 / n^2)),
//               s2 = nbar^2 / (A^2 + (nbar - 1/2)^2), A = acosh(R) / pi.
//   cosine      a pedestal p = 10^(pedestal_db/20) under a cosine:
//               p + (1 - p) cos(pi t / 2), t in [-1, 1] from the first to the last
//               element, so the edge elements sit at pedestal_db re the centre.
//   circular-taylor  Taylor's circular aperture distribution (T. T. Taylor, "Design of
//               circular apertures for narrow beamwidth and low sidelobes", IRE Trans.
//               AP-8, 1960, pp. 17-22; the form in R. C. Hansen, Phased Array Antennas,
//               2nd ed., 2009, ch. 3, from memory), sampled at each element's distance
//               rho from the lattice centre in the lattice plane:
//               g(p) = sum_{m=0}^{nbar-1} F_m J0(mu_m p) / J0^2(pi mu_m), p = pi rho / a,
//               mu_m = j_{1,m} / pi (zeros of J1(pi mu), mu_0 = 0), F_0 = 1,
//               F_m = -J0(pi mu_m) prod_{n=1}^{nbar-1} (1 - mu_m^2 / z_n^2)
//                     / prod_{n != m} (1 - mu_m^2 / mu_n^2),
//               z_n = sigma sqrt(A^2 + (n - 1/2)^2), sigma = mu_nbar / sqrt(A^2 + (nbar - 1/2)^2).
//               Its pattern has zeros at u = z_n (n < nbar) and mu_n (n >= nbar).
#pragma once

#include <optional>
#include <string_view>
#include <vector>

#include "engine/synthesis/lattice_generator.h"

namespace lobecast {

enum class TaperKind { kUniform, kBinomial, kChebyshev, kTaylor, kCosine, kCircularTaylor };

std::string_view ToString(TaperKind k);
std::optional<TaperKind> TaperKindFromString(std::string_view s);  // case-insensitive

struct TaperSpec {
  TaperKind kind = TaperKind::kUniform;
  double sidelobe_db = -30;      // chebyshev, taylor, circular-taylor: < 0, re the peak
  int nbar = 4;                  // taylor, circular-taylor: >= 1
  double pedestal_db = -10;      // cosine: edge level re the centre, <= 0
  double aperture_radius_m = 0;  // circular-taylor: a; 0 = the farthest element's distance
};

// The one-dimensional taper of n elements (kind not circular-taylor). Throws
// InvalidArgument for n < 1 or parameters out of range.
std::vector<double> LineTaper(const TaperSpec& spec, int n);

// Taylor's circular aperture distribution at rho / a in [0, 1], normalized to 1 at
// the centre (not clipped: a caller normalizes a sampled set to its largest value).
double CircularTaylorAt(double rho_over_a, double sidelobe_db, int nbar);
// The zeros of J1 (j_{1,m}, m = 1..count), by Newton's method from McMahon's
// asymptotic start (accurate to rounding).
std::vector<double> BesselJ1Zeros(int count);

// The taper of every present site of a lattice: the 1-D taper on a line, the
// product a_x[ix] a_y[iy] on panels (tapers of Nx and Ny elements), the circular
// Taylor taper wherever asked; on rings only uniform and circular-taylor. Computed
// for the whole lattice, so removed elements leave the others' amplitudes as they
// were. Normalized to a largest present amplitude of 1.
std::vector<double> LatticeTaper(const TaperSpec& spec, const LatticeSpec& lattice,
                                 const std::vector<LatticeSite>& sites);

// |sum a|^2 / (N sum |a|^2), in (0, 1]; 1 for a uniform taper.
double TaperEfficiency(const std::vector<double>& a);

}  // namespace lobecast
