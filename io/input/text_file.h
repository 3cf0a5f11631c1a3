// Reading a whole input file into memory, with the reason when that fails.
#pragma once

#include <optional>
#include <string>

namespace lobecast {

// The bytes of a regular file; std::nullopt with *why set ("no such file",
// "is a directory", the system's message) when it cannot be read.
std::optional<std::string> ReadTextFile(const std::string& path, std::string* why);

}  // namespace lobecast
