#include "cli/text_output.h"

#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <system_error>

#include "cli/option_checks.h"
#include "io/io_error.h"

namespace lobecast::cli {

bool IsStdout(const std::string& path) { return path.empty() || path == kStdout; }

void WriteText(const std::string& path, const std::string& what,
               const std::function<void(std::ostream&)>& write) {
  if (IsStdout(path)) {
    write(std::cout);
    std::cout.flush();
    if (!std::cout) throw IoError("standard output", "could not write " + what);
    return;
  }
  MoveIntoPlace(WriteTemporaryText(path, what, write), path, what);
}

std::string WriteTemporaryText(const std::string& path, const std::string& what,
                               const std::function<void(std::ostream&)>& write) {
  const std::string tmp = path + ".tmp-" + std::to_string(::getpid());
  std::error_code ec;
  std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
  if (!out) throw IoError(path, "could not create " + what + ": " + std::strerror(errno));
  try {
    write(out);
  } catch (...) {
    out.close();
    std::filesystem::remove(tmp, ec);
    throw;
  }
  out.close();
  if (!out) {
    std::filesystem::remove(tmp, ec);
    throw IoError(path, "could not write " + what + " (disk full?)");
  }
  return tmp;
}

void MoveIntoPlace(const std::string& tmp, const std::string& path, const std::string& what) {
  std::error_code ec;
  std::filesystem::rename(tmp, path, ec);
  if (ec) {
    const std::string why = ec.message();
    std::filesystem::remove(tmp, ec);
    throw IoError(path, "could not write " + what + ": " + why);
  }
}

}  // namespace lobecast::cli
