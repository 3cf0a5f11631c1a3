// The error io/ throws when a file cannot be read or written. Bad input (a
// malformed array description) is reported by the array reader with its own
// located message; this one is for the file system and the file formats.
#pragma once

#include <stdexcept>
#include <string>
#include <utility>

namespace lobecast {

class IoError : public std::runtime_error {
 public:
  // what() is "<path>: <detail>".
  IoError(std::string path, std::string detail)
      : std::runtime_error(path + ": " + detail),
        path_(std::move(path)),
        detail_(std::move(detail)) {}

  const std::string& path() const { return path_; }
  const std::string& detail() const { return detail_; }

 private:
  std::string path_;
  std::string detail_;
};

// A file given where a lobecast result was expected is not one: not HDF5, another
// program's HDF5, or a newer schema version. That is bad input (exit 2), unlike
// an I/O failure while reading a genuine result (exit 1).
class NotAResultError : public IoError {
 public:
  using IoError::IoError;
};

// How a NotAResultError's detail starts when the file is HDF5 but not all of a
// lobecast result (truncated, damaged, another program's).
inline constexpr const char* kIncompleteResult = "not a complete lobecast result: ";
// How it starts when the file claims something a result cannot hold: a damaged
// structure (a global heap that does not add up, a dataset of the wrong type,
// more values than the file can store) or values no computation writes (a NaN
// grid, a zero orientation). Such a file is refused before it is read further.
inline constexpr const char* kInvalidResult = "not a valid lobecast result: ";

}  // namespace lobecast
