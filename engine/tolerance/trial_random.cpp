// Reproducible random numbers of one trial (trial_random.h).
#include "engine/tolerance/trial_random.h"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "engine/check.h"
#include "engine/constants.h"

namespace lobecast {

std::uint64_t Mix64(std::uint64_t x) {
  // SplitMix64's output function (Steele, Lea and Flood, OOPSLA 2014).
  x += 0x9e3779b97f4a7c15ULL;
  x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ULL;
  x = (x ^ (x >> 27)) * 0x94d049bb133111ebULL;
  return x ^ (x >> 31);
}

TrialRandom::TrialRandom(std::uint64_t seed, std::uint64_t trial, ErrorStream stream)
    : engine_(Mix64(Mix64(Mix64(seed) ^ trial) ^ static_cast<std::uint64_t>(stream))) {}

double TrialRandom::Uniform() { return (static_cast<double>(engine_() >> 11) + 0.5) * 0x1.0p-53; }

double TrialRandom::Normal() {
  if (has_spare_) {
    has_spare_ = false;
    return spare_;
  }
  const double u1 = Uniform();
  const double u2 = Uniform();
  const double r = std::sqrt(-2.0 * std::log(u1));
  spare_ = r * std::sin(2.0 * kPi * u2);
  has_spare_ = true;
  return r * std::cos(2.0 * kPi * u2);
}

std::uint64_t TrialRandom::Below(std::uint64_t n) {
  LOBECAST_CHECK_GE(n, std::uint64_t{1});
  // 2^64 mod n, computed in 64 bits: (2^64 - n) mod n.
  const std::uint64_t reject_from = 0 - ((0 - n) % n);
  for (;;) {
    const std::uint64_t x = engine_();
    if (reject_from == 0 || x < reject_from) return x % n;
  }
}

std::vector<std::size_t> ChooseDistinct(TrialRandom& random, std::size_t n, std::size_t m) {
  LOBECAST_CHECK_LE(m, n);
  std::vector<std::size_t> pool(n);
  std::iota(pool.begin(), pool.end(), std::size_t{0});
  for (std::size_t i = 0; i < m; ++i) {
    const std::size_t j = i + static_cast<std::size_t>(random.Below(n - i));
    std::swap(pool[i], pool[j]);
  }
  pool.resize(m);
  std::sort(pool.begin(), pool.end());
  return pool;
}

}  // namespace lobecast
