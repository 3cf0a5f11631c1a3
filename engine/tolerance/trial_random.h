// The random numbers of one Monte Carlo trial, reproducible from (seed, trial)
// alone: trial k's errors never depend on how many trials run before it, on which
// thread or process runs it, or on which other kinds of error are drawn.
//
// Algorithm (fixed; changing any step changes every study's numbers):
//  - key(seed, k, kind) = Mix(Mix(Mix(seed) ^ k) ^ kind) with Mix the SplitMix64
//    finalizer (G. Steele, D. Lea, C. Flood, "Fast splittable pseudorandom number
//    generators", OOPSLA 2014; the constants of Java's SplittableRandom), one
//    stream per kind of error (kAmplitude, kPhase, kPosition, kFailure), so adding a
//    phase error to a study leaves its amplitude draws as they were;
//  - std::mt19937_64 seeded with that key: its output sequence is fixed by the C++
//    standard ([rand.predef]: the 10000th output of a default-seeded engine is
//    9981545732273789042), so it is the same with every standard library;
//  - uniform doubles in (0, 1): ((x >> 11) + 0.5) 2^-53, never 0 or 1;
//  - standard normals by the Box-Muller transform (G. E. P. Box and M. E. Muller,
//    Ann. Math. Stat. 29, 1958): r = sqrt(-2 ln u1), z = r cos(2 pi u2), then
//    r sin(2 pi u2), in that order. std::normal_distribution is not used: its
//    algorithm is left to each library (libstdc++ and libc++ differ), so a seed
//    would not mean the same study everywhere. std::log, cos and sin come from the
//    C library, identical on one machine; across C libraries they may differ in
//    the last bit;
//  - whole numbers below n by rejection (x mod n, redrawing x >= 2^64 - 2^64 mod n),
//    unbiased, instead of the library-defined std::uniform_int_distribution.
#pragma once

#include <cstdint>
#include <random>
#include <vector>

namespace lobecast {

enum class ErrorStream : std::uint64_t { kAmplitude = 1, kPhase = 2, kPosition = 3, kFailure = 4 };

// The SplitMix64 finalizer: a bijection of 64-bit words that mixes every input bit
// into every output bit.
std::uint64_t Mix64(std::uint64_t x);

// One trial's stream of one kind of error.
class TrialRandom {
 public:
  TrialRandom(std::uint64_t seed, std::uint64_t trial, ErrorStream stream);
  // Uniform in the open interval (0, 1).
  double Uniform();
  // Standard normal (mean 0, standard deviation 1), Box-Muller in pairs.
  double Normal();
  // Uniform whole number in [0, n), n >= 1.
  std::uint64_t Below(std::uint64_t n);

 private:
  std::mt19937_64 engine_;
  bool has_spare_ = false;
  double spare_ = 0.0;
};

// m distinct indices of [0, n), uniformly among all such sets (the first m steps of
// a Fisher-Yates shuffle), in ascending order. m <= n.
std::vector<std::size_t> ChooseDistinct(TrialRandom& random, std::size_t n, std::size_t m);

}  // namespace lobecast
