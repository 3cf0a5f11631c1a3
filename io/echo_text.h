// Text from a file, as a message may echo it (input errors, a result's strings).
#pragma once

#include <cstddef>
#include <string>
#include <string_view>

namespace lobecast {

// Control bytes, DEL and bytes that are not UTF-8 as \xNN (a binary file never
// reaches the terminal raw), cut after `max_bytes` bytes (never inside a UTF-8
// character) with "..." added.
inline constexpr std::size_t kEchoBytes = 60;
std::string EchoText(std::string_view text, std::size_t max_bytes = kEchoBytes);

// Whether `text` is well-formed UTF-8 (RFC 3629).
bool IsUtf8(std::string_view text);

}  // namespace lobecast
