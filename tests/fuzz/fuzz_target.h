// What every fuzz target shares: the bad-input errors a reader may throw (exit 2
// in the CLI, cli/exit_code.h). Anything else escaping a target (InternalError,
// std::out_of_range, a crash, a sanitizer report) is a finding.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string_view>

#include "engine/error.h"
#include "io/input_error.h"
#include "io/io_error.h"

namespace lobecast::fuzz {

inline std::string_view Text(const std::uint8_t* data, std::size_t size) {
  return {reinterpret_cast<const char*>(data), size};
}

// Runs `read` and swallows the errors that mean "refused as bad input".
template <typename Read>
void Refusable(Read&& read) {
  try {
    read();
  } catch (const InputError&) {
  } catch (const InvalidArgument&) {
  } catch (const NotAResultError&) {
  }
}

}  // namespace lobecast::fuzz
