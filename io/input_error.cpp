#include "io/input_error.h"

#include "io/echo_text.h"

#include <string_view>
#include <utility>

namespace lobecast {

std::string SourceLocation::ToString() const {
  if (line <= 0) return file;
  return file + ":" + std::to_string(line) + ":" + std::to_string(column > 0 ? column : 1);
}

InputError::InputError(SourceLocation where, std::string key_path, const std::string& found,
                       const std::string& expected)
    : std::runtime_error(where.ToString() + ": key '" + EchoText(key_path) + "': found " +
                         EchoText(found, std::string_view::npos) + ", expected " +
                         EchoText(expected, std::string_view::npos)),
      location(std::move(where)),
      key(std::move(key_path)) {}

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(where.ToString() + ": " + EchoText(message, std::string_view::npos)),
      location(std::move(where)) {}

}  // namespace lobecast
