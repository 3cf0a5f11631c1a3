// Reading a whole input file into memory, with the reason when that fails.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace lobecast {

// The most bytes read from one input file: a TOML description (arrays past 256
// dipoles go to CSV: a few MiB at most) and a CSV element table (about 100 bytes a
// dipole: ten million dipoles). A bound, so that a huge file is refused at once
// instead of filling the memory.
inline constexpr std::uint64_t kMaxTomlBytes = std::uint64_t{64} << 20;
inline constexpr std::uint64_t kMaxCsvBytes = std::uint64_t{1} << 30;

// "64 MiB", "1 GiB", or "N bytes".
std::string SizeText(std::uint64_t bytes);

// The bytes of a regular file of at most `max_bytes`; std::nullopt with *why set
// ("no such file", "a directory", "not a regular file (a device, pipe or socket)",
// "larger than ...", the system's message) when it cannot be read. Never waits on
// a pipe and never reads a device.
std::optional<std::string> ReadTextFile(const std::string& path, std::string* why,
                                        std::uint64_t max_bytes = kMaxTomlBytes);

// True when `bytes` start with the 8-byte signature of an HDF5 file (HDF5 File
// Format Specification, "Format Signature"): a result given where text belongs.
bool IsHdf5(std::string_view bytes);

}  // namespace lobecast
