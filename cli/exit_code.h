// What lobecast says and returns when a command throws: the one place exit codes
// are decided (CONVENTIONS §4). Header-only so tests can check the mapping
// without running the executable.
//
//   bad input (InputError, InvalidArgument, NotAResultError)  exit 2
//   a failure while running (IoError, out of memory, others) exit 1
//   a broken invariant, i.e. a bug in lobecast (InternalError) exit 1
#pragma once

#include <exception>
#include <new>
#include <stdexcept>
#include <string>

#include "engine/check.h"
#include "engine/error.h"
#include "io/input_error.h"
#include "io/io_error.h"

namespace lobecast::cli {

constexpr int kExitOk = 0;
constexpr int kExitFailure = 1;
constexpr int kExitBadInput = 2;

struct ExitReport {
  int code = kExitFailure;
  std::string message;  // one line for stderr, without the newline
};

// A failure of one process of an MPI run, agreed by every process (cli/mpi): the
// failing process's exit code and its line, "lobecast: rank R failed: ...".
class RankFailure : public std::runtime_error {
 public:
  RankFailure(int exit_code, const std::string& line) : std::runtime_error(line), code(exit_code) {}
  int code;
};

// `error` must hold an exception (from std::current_exception()).
inline ExitReport ReportFor(const std::exception_ptr& error) {
  try {
    std::rethrow_exception(error);
  } catch (const RankFailure& e) {
    return {e.code, e.what()};
  } catch (const InternalError& e) {
    // what() already starts with "internal error: ".
    return {kExitFailure, std::string("lobecast: ") + e.what() +
                              " (a bug in lobecast, not in its input; please report it)"};
  } catch (const InputError& e) {
    return {kExitBadInput, std::string("lobecast: ") + e.what()};
  } catch (const InvalidArgument& e) {
    return {kExitBadInput, std::string("lobecast: invalid input: ") + e.what()};
  } catch (const NotAResultError& e) {
    return {kExitBadInput, std::string("lobecast: ") + e.what()};
  } catch (const IoError& e) {
    return {kExitFailure, std::string("lobecast: ") + e.what()};
  } catch (const std::bad_alloc&) {
    return {kExitFailure, "lobecast: out of memory (try a coarser grid or fewer directions)"};
  } catch (const std::exception& e) {
    return {kExitFailure, std::string("lobecast: error: ") + e.what()};
  } catch (...) {
    return {kExitFailure, "lobecast: error: unknown exception"};
  }
}

}  // namespace lobecast::cli
