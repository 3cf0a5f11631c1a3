#include "io/echo_text.h"

#include <string>

namespace lobecast {
namespace {

// The length of the UTF-8 character starting at text[at] (RFC 3629 sec. 4: no
// overlong forms, no surrogates, at most U+10FFFF), or 0 when it is not one.
std::size_t Utf8Length(std::string_view text, std::size_t at) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[at + k]); };
  const unsigned char b0 = byte(0);
  std::size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // the range of the second byte
  if (b0 >= 0xC2 && b0 <= 0xDF) {
    n = 2;
  } else if (b0 >= 0xE0 && b0 <= 0xEF) {
    n = 3;
    if (b0 == 0xE0) lo = 0xA0;
    if (b0 == 0xED) hi = 0x9F;
  } else if (b0 >= 0xF0 && b0 <= 0xF4) {
    n = 4;
    if (b0 == 0xF0) lo = 0x90;
    if (b0 == 0xF4) hi = 0x8F;
  } else {
    return 0;
  }
  if (at + n > text.size() || byte(1) < lo || byte(1) > hi) return 0;
  for (std::size_t k = 2; k < n; ++k) {
    if (byte(k) < 0x80 || byte(k) > 0xBF) return 0;
  }
  return n;
}

}  // namespace

bool IsUtf8(std::string_view text) {
  for (std::size_t at = 0; at < text.size();) {
    const auto b = static_cast<unsigned char>(text[at]);
    if (b < 0x80) {
      ++at;
      continue;
    }
    const std::size_t n = Utf8Length(text, at);
    if (n == 0) return false;
    at += n;
  }
  return true;
}

std::string EchoText(std::string_view text, std::size_t max_bytes) {
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out;
  std::size_t at = 0;
  while (at < text.size()) {
    const auto b = static_cast<unsigned char>(text[at]);
    std::size_t n = 1;
    std::string piece;
    if (b >= 0x20 && b < 0x7F) {
      piece = static_cast<char>(b);
    } else if (b >= 0x80 && (n = Utf8Length(text, at)) > 0) {
      piece = text.substr(at, n);
    } else {
      n = 1;
      piece = {'\\', 'x', kHex[b >> 4], kHex[b & 0xF]};
    }
    if (out.size() + piece.size() > max_bytes) return out + "...";
    out += piece;
    at += n;
  }
  return out;
}

}  // namespace lobecast
