// The one error type io/ throws for a rejected input file, and where in a file
// something was written. Only cli/ turns it into an exit code (2, CONVENTIONS §4).
#pragma once

#include <stdexcept>
#include <string>

#include "io/echo_text.h"

namespace lobecast {

// A place in an input file. Lines and columns are 1-based, as toml++ and text
// editors count them; line 0 means "the file as a whole" (e.g. it cannot be read).
struct SourceLocation {
  std::string file;
  int line = 0;
  int column = 0;

  // "FILE:LINE:COL", or just "FILE" when the line is unknown (0).
  std::string ToString() const;
};

// A rejected input. what() is one line, ready for stderr:
//   FILE:LINE:COL: key 'K': found X, expected Y
// The key is echoed through EchoText (a 1 MB unknown key prints its first 60
// bytes), the rest escaped (EchoText without a cut).
// Keys are dotted paths from the document root with 0-based array indices, the
// same indices the engine and the HDF5 datasets use: 'dipole[2].position'.
// TOML syntax errors keep toml++'s own position and description:
//   FILE:LINE:COL: TOML syntax error: <toml++ description>
class InputError : public std::runtime_error {
 public:
  InputError(SourceLocation where, std::string key_path, const std::string& found,
             const std::string& expected);
  // For errors that are not about one key (syntax, unreadable file); `key` stays empty.
  InputError(SourceLocation where, const std::string& message);

  SourceLocation location;
  std::string key;
};

}  // namespace lobecast
