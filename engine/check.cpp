// The failure path of LOBECAST_CHECK (check.h).
#include "engine/check.h"

#include <string_view>

namespace lobecast::check_detail {

namespace {

// __FILE__ is whatever path the build gave the compiler (CMake: absolute). This
// file is <root>/engine/check.cpp, so its own __FILE__ tells the root to drop.
std::string_view RelativeToSourceTree(std::string_view file) {
  constexpr std::string_view kSelf = __FILE__;
  constexpr std::string_view kTail = "engine/check.cpp";
  if (kSelf.size() < kTail.size() || kSelf.substr(kSelf.size() - kTail.size()) != kTail) {
    return file;
  }
  const std::string_view root = kSelf.substr(0, kSelf.size() - kTail.size());
  if (!root.empty() && file.substr(0, root.size()) == root) file.remove_prefix(root.size());
  return file;
}

}  // namespace

void Fail(const char* file, int line, const char* condition, const std::string& values) {
  std::string what = "internal error: ";
  what += RelativeToSourceTree(file);
  what += ':';
  what += std::to_string(line);
  what += ": ";
  what += condition;
  if (!values.empty()) {
    what += " (";
    what += values;
    what += ')';
  }
  throw InternalError(what);
}

}  // namespace lobecast::check_detail
