// The one error type the engine throws. Only cli/ turns errors into exit codes.
#pragma once

#include <stdexcept>
#include <string>

namespace lobecast {

// The caller handed the engine something physically or logically invalid (a
// dipole below a ground plane, a zero orientation, a current vector of the wrong
// length). The message names the item, the value found and the rule broken.
class InvalidArgument : public std::invalid_argument {
 public:
  explicit InvalidArgument(const std::string& what) : std::invalid_argument(what) {}
};

}  // namespace lobecast
