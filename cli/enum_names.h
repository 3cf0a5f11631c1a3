// The names an enum option accepts, taken from the engine's ToString so that the
// CLI11 checks, the error messages and the parsers cannot drift apart.
#pragma once

#include <cstddef>
#include <initializer_list>
#include <string>
#include <vector>

namespace lobecast::cli {

// ToString(v) for each value, in the order given.
template <typename E>
std::vector<std::string> NamesOf(std::initializer_list<E> values) {
  std::vector<std::string> out;
  for (E v : values) out.emplace_back(ToString(v));
  return out;
}

// "a, b or c" (one name alone as it is).
inline std::string JoinAlternatives(const std::vector<std::string>& names) {
  std::string out;
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (i > 0) out += i + 1 == names.size() ? " or " : ", ";
    out += names[i];
  }
  return out;
}

}  // namespace lobecast::cli
