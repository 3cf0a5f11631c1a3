#include "io/input/text_file.h"

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <system_error>

namespace lobecast {

std::optional<std::string> ReadTextFile(const std::string& path, std::string* why) {
  std::error_code ec;
  const auto status = std::filesystem::status(path, ec);
  // Only a missing file is "no such file"; a permission or other error says itself.
  if (ec && ec != std::errc::no_such_file_or_directory) {
    if (why) *why = ec.message();
    return std::nullopt;
  }
  if (!std::filesystem::exists(status)) {
    if (why) *why = "no such file";
    return std::nullopt;
  }
  if (std::filesystem::is_directory(status)) {
    if (why) *why = "a directory";
    return std::nullopt;
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    if (why) *why = std::string("cannot open (") + std::strerror(errno) + ")";
    return std::nullopt;
  }
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  if (in.bad()) {
    if (why) *why = "read error";
    return std::nullopt;
  }
  return text;
}

bool IsHdf5(std::string_view bytes) {
  return bytes.substr(0, 8) == std::string_view("\x89HDF\r\n\x1a\n", 8);
}

}  // namespace lobecast
