// Reading a whole input file into memory, with the reason when that fails.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace lobecast {

// The bytes of a regular file; std::nullopt with *why set ("no such file",
// "is a directory", the system's message) when it cannot be read.
std::optional<std::string> ReadTextFile(const std::string& path, std::string* why);

// True when `bytes` start with the 8-byte signature of an HDF5 file (HDF5 File
// Format Specification, "Format Signature"): a result given where text belongs.
bool IsHdf5(std::string_view bytes);

}  // namespace lobecast
