// ASCII case folding for enum names, options and file extensions: every
// `...FromString` is case-insensitive (CONVENTIONS.md), and all of them fold
// the same way, byte by byte in the "C" sense (no locale).
#pragma once

#include <algorithm>
#include <cctype>
#include <string>
#include <string_view>

namespace lobecast {

// `s` with every ASCII letter lower-cased; other bytes unchanged.
inline std::string Lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

inline bool EqualsIgnoreCase(std::string_view a, std::string_view b) {
  return a.size() == b.size() && std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
           return std::tolower(static_cast<unsigned char>(x)) ==
                  std::tolower(static_cast<unsigned char>(y));
         });
}

}  // namespace lobecast
