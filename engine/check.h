// Broken internal invariants: LOBECAST_CHECK and friends throw InternalError.
//
// Three kinds of failure are kept apart: bad input is the caller's
// (InvalidArgument, InputError: exit 2, CONVENTIONS §4), a failure while running
// is the machine's (IoError, out of memory: exit 1), and a broken invariant is a
// bug in lobecast itself (InternalError: exit 1, "lobecast: internal error: ..."). A check guards
// only what lobecast's own code guarantees (two parallel lists it built have the same length, a
// bracket it found does bracket), never what a user wrote: those get a located message saying what
// was expected.
//
//   LOBECAST_CHECK(cond)             "internal error: FILE:LINE: cond"
//   LOBECAST_CHECK_EQ(a, b)          "internal error: FILE:LINE: a == b (<a> vs <b>)"
//   (and _NE, _LT, _LE, _GT, _GE)
//   LOBECAST_CHECK_SHOWING(cond, a, b)  cond, and the two values that explain it
//
// FILE is relative to the source tree. Values print as by `<<` with 17
// significant digits (doubles read back exactly), bools as true/false.
// Checks are always on (Release too): every one guards a cheap comparison.
// Do not check inside an OpenMP parallel region (an exception cannot leave it).
#pragma once

#include <sstream>
#include <stdexcept>
#include <string>

namespace lobecast {

// A bug in lobecast, not in its input. Only cli/ turns it into an exit code (1).
class InternalError : public std::logic_error {
 public:
  explicit InternalError(const std::string& what) : std::logic_error(what) {}
};

namespace check_detail {

// Throws InternalError("internal error: FILE:LINE: CONDITION" + (" (VALUES)" if any)).
[[noreturn]] void Fail(const char* file, int line, const char* condition,
                       const std::string& values);

template <typename T>
std::string Show(const T& v) {
  std::ostringstream s;
  s.precision(17);
  s << std::boolalpha << v;
  return s.str();
}

template <typename A, typename B>
[[noreturn]] void FailShowing(const char* file, int line, const char* condition, const A& a,
                              const B& b) {
  Fail(file, line, condition, Show(a) + " vs " + Show(b));
}

}  // namespace check_detail
}  // namespace lobecast

#define LOBECAST_CHECK(cond)                                                               \
  do {                                                                                     \
    if (!(cond)) ::lobecast::check_detail::Fail(__FILE__, __LINE__, #cond, std::string()); \
  } while (false)

#define LOBECAST_CHECK_SHOWING(cond, a, b)                                               \
  do {                                                                                   \
    if (!(cond)) ::lobecast::check_detail::FailShowing(__FILE__, __LINE__, #cond, a, b); \
  } while (false)

#define LOBECAST_CHECK_OP_(a, op, b)                                               \
  do {                                                                             \
    const auto& lobecast_check_a = (a);                                            \
    const auto& lobecast_check_b = (b);                                            \
    if (!(lobecast_check_a op lobecast_check_b)) {                                 \
      ::lobecast::check_detail::FailShowing(__FILE__, __LINE__, #a " " #op " " #b, \
                                            lobecast_check_a, lobecast_check_b);   \
    }                                                                              \
  } while (false)

#define LOBECAST_CHECK_EQ(a, b) LOBECAST_CHECK_OP_(a, ==, b)
#define LOBECAST_CHECK_NE(a, b) LOBECAST_CHECK_OP_(a, !=, b)
#define LOBECAST_CHECK_LT(a, b) LOBECAST_CHECK_OP_(a, <, b)
#define LOBECAST_CHECK_LE(a, b) LOBECAST_CHECK_OP_(a, <=, b)
#define LOBECAST_CHECK_GT(a, b) LOBECAST_CHECK_OP_(a, >, b)
#define LOBECAST_CHECK_GE(a, b) LOBECAST_CHECK_OP_(a, >=, b)
