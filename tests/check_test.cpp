// Internal-invariant checks (engine/check.h) and the exit code every error maps
// to (cli/exit_code.h).
#include "engine/check.h"

#include <cmath>
#include <limits>
#include <new>
#include <stdexcept>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "cli/exit_code.h"
#include "engine/analysis/local_search.h"
#include "engine/error.h"
#include "engine/grid.h"
#include "engine/power/radiated_power.h"
#include "io/input_error.h"
#include "io/io_error.h"

namespace lobecast {
namespace {

// The message of the InternalError `f` throws (fails the test when it throws
// anything else or nothing).
template <typename F>
std::string InternalErrorOf(F f) {
  try {
    f();
  } catch (const InternalError& e) {
    return e.what();
  } catch (const std::exception& e) {
    ADD_FAILURE() << "threw another error: " << e.what();
    return {};
  }
  ADD_FAILURE() << "did not throw";
  return {};
}

TEST(Check, PassingChecksDoNotThrow) {
  EXPECT_NO_THROW(LOBECAST_CHECK(1 + 1 == 2));
  EXPECT_NO_THROW(LOBECAST_CHECK_EQ(3, 3));
  EXPECT_NO_THROW(LOBECAST_CHECK_NE(3, 4));
  EXPECT_NO_THROW(LOBECAST_CHECK_LT(3, 4));
  EXPECT_NO_THROW(LOBECAST_CHECK_LE(4, 4));
  EXPECT_NO_THROW(LOBECAST_CHECK_GT(5, 4));
  EXPECT_NO_THROW(LOBECAST_CHECK_GE(4, 4));
  EXPECT_NO_THROW(LOBECAST_CHECK_SHOWING(true, 1, 2));
}

TEST(Check, FailedEqualityNamesPlaceConditionAndBothValues) {
  const std::size_t three = 3;
  const int line = __LINE__ + 1;
  const std::string m = InternalErrorOf([&] { LOBECAST_CHECK_EQ(three, std::size_t{4}); });
  EXPECT_EQ(m, "internal error: tests/check_test.cpp:" + std::to_string(line) +
                   ": three == std::size_t{4} (3 vs 4)");
}

TEST(Check, EveryComparisonShowsBothValues) {
  EXPECT_NE(InternalErrorOf([] { LOBECAST_CHECK_NE(7, 7); }).find("7 != 7 (7 vs 7)"),
            std::string::npos);
  EXPECT_NE(InternalErrorOf([] { LOBECAST_CHECK_LT(2.5, 1.0); }).find("2.5 < 1.0 (2.5 vs 1)"),
            std::string::npos);
  EXPECT_NE(InternalErrorOf([] { LOBECAST_CHECK_LE(2, 1); }).find("(2 vs 1)"), std::string::npos);
  EXPECT_NE(InternalErrorOf([] { LOBECAST_CHECK_GT(1, 2); }).find("(1 vs 2)"), std::string::npos);
  EXPECT_NE(InternalErrorOf([] { LOBECAST_CHECK_GE(1, 2); }).find("(1 vs 2)"), std::string::npos);
}

TEST(Check, DoublesPrintWithEveryDigitAndBoolsAsWords) {
  // 17 significant digits read back to the same double (IEEE 754-2019, 5.12.2).
  const double x = 0.1 + 0.2;
  const std::string m = InternalErrorOf([&] { LOBECAST_CHECK_EQ(x, 0.3); });
  EXPECT_NE(m.find("(0.30000000000000004 vs 0.29999999999999999)"), std::string::npos) << m;
  const std::string b = InternalErrorOf([] { LOBECAST_CHECK_EQ(true, false); });
  EXPECT_NE(b.find("(true vs false)"), std::string::npos) << b;
}

TEST(Check, PlainCheckNamesTheConditionOnly) {
  const std::string m = InternalErrorOf([] { LOBECAST_CHECK(2 < 1); });
  EXPECT_EQ(m.substr(0, 37), "internal error: tests/check_test.cpp:");
  EXPECT_EQ(m.substr(m.size() - 7), ": 2 < 1") << m;
}

TEST(Check, ArgumentsAreEvaluatedOnce) {
  int calls = 0;
  auto next = [&] { return ++calls; };
  LOBECAST_CHECK_EQ(next(), 1);
  EXPECT_EQ(calls, 1);
}

TEST(Check, InternalErrorIsNotBadInput) {
  // cli/ maps InvalidArgument to exit 2; an internal error must not be caught as one.
  bool caught_as_invalid = false;
  try {
    LOBECAST_CHECK(false);
  } catch (const InvalidArgument&) {
    caught_as_invalid = true;
  } catch (const InternalError&) {
  }
  EXPECT_FALSE(caught_as_invalid);
}

// The engine's own invariants throw InternalError, with both values.
TEST(Check, EngineInvariantsThrowInternalError) {
  const std::string d = InternalErrorOf([] { Directions::FromAngles({0.1, 0.2}, {0.3}); });
  EXPECT_NE(d.find("engine/grid.cpp:"), std::string::npos) << d;
  EXPECT_NE(d.find("(2 vs 1)"), std::string::npos) << d;

  const std::string r = InternalErrorOf(
      [] { RadiatedPower(Eigen::MatrixXd::Identity(2, 2), Eigen::VectorXcd::Ones(3)); });
  EXPECT_NE(r.find("engine/power/radiated_power.cpp:"), std::string::npos) << r;
  EXPECT_NE(r.find("(2 vs 3)"), std::string::npos) << r;

  // x^2 + 1 has no root in [-1, 1]: not a bracket.
  const std::string f =
      InternalErrorOf([] { FindRoot([](double x) { return x * x + 1; }, -1, 1, 2, 2, 1e-9); });
  EXPECT_NE(f.find("engine/analysis/local_search.cpp:"), std::string::npos) << f;
  EXPECT_NE(f.find("(2 vs 2)"), std::string::npos) << f;
}

cli::ExitReport ReportOf(auto error) { return cli::ReportFor(std::make_exception_ptr(error)); }

// CONVENTIONS §4: bad input exits 2, a failure while running exits 1; a bug in
// lobecast is a failure (1) and says so.
TEST(ExitCode, InternalErrorExitsOneAndSaysSo) {
  std::string what;
  try {
    LOBECAST_CHECK_EQ(1, 2);
  } catch (const InternalError& e) {
    what = e.what();
  }
  const cli::ExitReport r = ReportOf(InternalError(what));
  EXPECT_EQ(r.code, 1);
  EXPECT_EQ(r.message.rfind("lobecast: internal error: tests/check_test.cpp:", 0), 0u) << r.message;
  EXPECT_NE(r.message.find("(1 vs 2)"), std::string::npos) << r.message;
}

TEST(ExitCode, BadInputExitsTwoAndFailuresOne) {
  EXPECT_EQ(ReportOf(InputError(SourceLocation{"a.toml", 3, 5}, "k", "x", "y")).code, 2);
  EXPECT_EQ(ReportOf(InvalidArgument("dipole 0: bad")).code, 2);
  EXPECT_EQ(ReportOf(InvalidArgument("dipole 0: bad")).message,
            "lobecast: invalid input: dipole 0: bad");
  EXPECT_EQ(ReportOf(NotAResultError("r.h5", "not HDF5")).code, 2);
  EXPECT_EQ(ReportOf(IoError("r.h5", "disk full")).code, 1);
  EXPECT_EQ(ReportOf(IoError("r.h5", "disk full")).message, "lobecast: r.h5: disk full");
  EXPECT_EQ(ReportOf(std::bad_alloc()).code, 1);
  EXPECT_EQ(ReportOf(std::runtime_error("boom")).code, 1);
  EXPECT_EQ(ReportOf(std::runtime_error("boom")).message, "lobecast: error: boom");
  EXPECT_EQ(ReportOf(42).code, 1);
}

}  // namespace
}  // namespace lobecast
