#include "io/input_error.h"

#include <utility>

namespace lobecast {

std::string SourceLocation::ToString() const {
  if (line <= 0) return file;
  return file + ":" + std::to_string(line) + ":" + std::to_string(column > 0 ? column : 1);
}

InputError::InputError(SourceLocation where, std::string key_path, const std::string& found,
                       const std::string& expected)
    : std::runtime_error(where.ToString() + ": key '" + key_path + "': found " + found +
                         ", expected " + expected),
      location(std::move(where)),
      key(std::move(key_path)) {}

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(where.ToString() + ": " + message), location(std::move(where)) {}

}  // namespace lobecast
