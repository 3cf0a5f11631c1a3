// The rule for output paths: lobecast writes a temporary beside the target and
// renames it into place, so it must only ever replace a regular file. A device
// (`-o /dev/null`), folder or pipe at the path would be replaced by the rename
// (as root, that destroys the device): it is refused as bad input instead.
#pragma once

#include <filesystem>
#include <string>
#include <system_error>

#include "io/input_error.h"

namespace lobecast {

// Empty when `path` does not exist or is a regular file; otherwise why not.
inline std::string WhyNotReplaceable(const std::string& path) {
  std::error_code ec;
  const auto status = std::filesystem::symlink_status(path, ec);
  if (ec || !std::filesystem::exists(status)) return "";
  if (std::filesystem::is_regular_file(status)) return "";
  if (std::filesystem::is_symlink(status)) {
    const auto target = std::filesystem::status(path, ec);
    if (!ec && std::filesystem::is_regular_file(target)) return "";
  }
  return "exists and is not a regular file (a device, folder or pipe); lobecast writes "
         "output only to new or regular files";
}

// Throws InputError (exit 2) naming the path unless WhyNotReplaceable is empty.
inline void RequireReplaceable(const std::string& path) {
  const std::string why = WhyNotReplaceable(path);
  if (!why.empty()) throw InputError(SourceLocation{path}, why);
}

}  // namespace lobecast
