// sin and cos of one double, inlined and branch-free so that a loop calling it
// under `#pragma omp simd` vectorizes (glibc's sin/cos/sincos are opaque calls
// that GCC leaves scalar). Used by the direct far-field kernels (direct_sum.cpp)
// and the NUFFT (nufft.cpp).
//
// Method, two textbook steps:
//  1. Cody-Waite argument reduction (W. J. Cody and W. Waite, Software Manual
//     for the Elementary Functions, Prentice-Hall, 1980): q = round(x * 2/pi),
//     r = x - q * pi/2 with pi/2 split into three parts P1 + P2 + P3. P1 and P2
//     carry 32 significant bits each, so q * P1 and q * P2 are exact for
//     |q| < 2^21, x - q * P1 is exact (Sterbenz), and r is within a few ulp of
//     1 of the exact reduction. This holds with or without fused multiply-add.
//  2. Taylor polynomials on |r| <= pi/4: sin through r^15 (truncation below
//     (pi/4)^17 / 17! = 5e-17) and cos through r^16 (below 2e-18), evaluated by
//     Horner in r^2. The quadrant q mod 4 then selects and signs the results.
//
// Accuracy: absolute error below 1e-15 for |x| <= 2^21 * pi/2 (~3.3e6 rad),
// checked against long double in tests/sincos_test.cpp. Beyond that the products
// q * P1 stop being exact and the error grows linearly with |x|; lobecast phases
// are k r_hat . r, 2 pi times the array extent in wavelengths, far below that.
// NaN and inf give NaN (no exceptions, no errno).
#pragma once

#include <bit>
#include <cstdint>

namespace lobecast {

namespace sincos_detail {

// pi/2 = kP1 + kP2 + kP3 + O(1e-37); kP1 and kP2 have 32 significant bits
// (split computed with mpmath at 300 bits).
inline constexpr double kTwoOverPi = 0x1.45f306dc9c883p-1;
inline constexpr double kP1 = 0x1.921fb54400000p+0;
inline constexpr double kP2 = 0x1.0b4611a600000p-34;
inline constexpr double kP3 = 0x1.3198a2e037073p-69;
// Adding 1.5 * 2^52 rounds a double of magnitude < 2^51 to the nearest integer
// (ties to even) and leaves that integer in the low mantissa bits.
inline constexpr double kRoundMagic = 0x1.8p52;

}  // namespace sincos_detail

// s = sin(x), c = cos(x). Inline so that it vectorizes inside `omp simd` loops.
[[gnu::always_inline]] inline void SinCos(double x, double& s, double& c) {
  using namespace sincos_detail;
  const double t = x * kTwoOverPi + kRoundMagic;
  const double q = t - kRoundMagic;
  const std::uint64_t quadrant = std::bit_cast<std::uint64_t>(t);
  double r = x - q * kP1;  // exact
  r = r - q * kP2;
  r = r - q * kP3;
  const double r2 = r * r;
  // Taylor coefficients (-1)^k / (2k+1)! and (-1)^k / (2k)!.
  double ps = -1.0 / 1307674368000.0;  // r^15
  ps = ps * r2 + 1.0 / 6227020800.0;   // r^13
  ps = ps * r2 - 1.0 / 39916800.0;     // r^11
  ps = ps * r2 + 1.0 / 362880.0;       // r^9
  ps = ps * r2 - 1.0 / 5040.0;         // r^7
  ps = ps * r2 + 1.0 / 120.0;          // r^5
  ps = ps * r2 - 1.0 / 6.0;            // r^3
  const double sr = r + r * r2 * ps;
  double pc = 1.0 / 20922789888000.0;  // r^16
  pc = pc * r2 - 1.0 / 87178291200.0;  // r^14
  pc = pc * r2 + 1.0 / 479001600.0;    // r^12
  pc = pc * r2 - 1.0 / 3628800.0;      // r^10
  pc = pc * r2 + 1.0 / 40320.0;        // r^8
  pc = pc * r2 - 1.0 / 720.0;          // r^6
  pc = pc * r2 + 1.0 / 24.0;           // r^4
  const double cr = 1.0 - 0.5 * r2 + r2 * r2 * pc;
  // Quadrant q mod 4: (sin, cos) = (s, c), (c, -s), (-s, -c), (-c, s).
  const std::uint64_t swap = std::uint64_t{0} - (quadrant & 1);  // all ones if odd
  const std::uint64_t sb = std::bit_cast<std::uint64_t>(sr);
  const std::uint64_t cb = std::bit_cast<std::uint64_t>(cr);
  const std::uint64_t sin_sign = (quadrant & 2) << 62;
  const std::uint64_t cos_sign = ((quadrant + 1) & 2) << 62;
  s = std::bit_cast<double>(((sb & ~swap) | (cb & swap)) ^ sin_sign);
  c = std::bit_cast<double>(((cb & ~swap) | (sb & swap)) ^ cos_sign);
}

}  // namespace lobecast
