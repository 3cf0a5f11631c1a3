// exp of one double, inlined and branch-free so that a loop calling it under
// `#pragma omp simd` vectorizes (glibc's exp is an opaque call that GCC leaves
// scalar). Used for the NUFFT kernel weights (nufft.cpp), a few dozen per target.
//
// Method (the same two steps as sincos.h): Cody-Waite reduction x = n ln2 + r,
// n = round(x / ln2), with ln2 split in two so that n * kLn2Hi is exact; then the Taylor polynomial
// of exp(r) on |r| <= ln2 / 2 through r^13 (truncation below 0.35^14 / 14! = 5e-18), times 2^n
// built in the exponent bits. Relative error below 4e-16 for |x| <= 708 (tests/exp_test.cpp,
// against long double); outside that range the result is meaningless (no
// overflow or underflow handling): callers keep to it.
#pragma once

#include <bit>
#include <cstdint>

namespace lobecast {

namespace exp_detail {
inline constexpr double kLog2e = 0x1.71547652b82fep+0;
// ln 2 = kLn2Hi + kLn2Lo + O(1e-28); kLn2Hi has 36 significant bits, so n * kLn2Hi
// is exact for |n| < 2^17.
inline constexpr double kLn2Hi = 0x1.62e42fefa0000p-1;
inline constexpr double kLn2Lo = 0x1.cf79abc9e3b3ap-40;  // mpmath at 200 bits
inline constexpr double kRoundMagic = 0x1.8p52;
}  // namespace exp_detail

[[gnu::always_inline]] inline double Exp(double x) {
  using namespace exp_detail;
  const double t = x * kLog2e + kRoundMagic;
  const double n = t - kRoundMagic;
  double r = x - n * kLn2Hi;  // exact
  r = r - n * kLn2Lo;
  double p = 1.0 / 6227020800.0;  // r^13 / 13!
  p = p * r + 1.0 / 479001600.0;
  p = p * r + 1.0 / 39916800.0;
  p = p * r + 1.0 / 3628800.0;
  p = p * r + 1.0 / 362880.0;
  p = p * r + 1.0 / 40320.0;
  p = p * r + 1.0 / 5040.0;
  p = p * r + 1.0 / 720.0;
  p = p * r + 1.0 / 120.0;
  p = p * r + 1.0 / 24.0;
  p = p * r + 1.0 / 6.0;
  p = p * r + 0.5;
  p = p * r + 1.0;
  p = p * r + 1.0;
  // 2^n: n + 1023 in the exponent field; n sits in the low bits of t (integer
  // arithmetic only, so it vectorizes without a double-to-int64 conversion).
  const std::uint64_t nb =
      std::bit_cast<std::uint64_t>(t) - std::bit_cast<std::uint64_t>(kRoundMagic);
  return p * std::bit_cast<double>((nb + 1023) << 52);
}

}  // namespace lobecast
