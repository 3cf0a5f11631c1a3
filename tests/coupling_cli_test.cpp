// Coupled arrays end to end: `report` reads back the circuit `compute` printed.
#include <filesystem>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using testing::Quote;

testing::RunOutput Lobecast(const std::string& args) {
  return testing::RunShell(std::string(LOBECAST_EXE) + " " + args + " 2>&1");
}

// The lines from "circuit" to "gain" of a command's output.
std::string CircuitBlock(const std::string& out) {
  const auto begin = out.find("circuit      ");
  const auto gain = out.find("gain         ", begin);
  if (begin == std::string::npos || gain == std::string::npos) return "";
  return out.substr(begin, out.find('\n', gain) - begin);
}

TEST(CouplingCli, ReportShowsTheCircuitComputePrinted) {
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml";
  const fs::path out = testing::TempWorkDir("lobecast-coupling-test", "r") / "beacon.h5";
  const auto compute = Lobecast("compute " + Quote(sample) + " -o " + Quote(out.string()));
  ASSERT_EQ(compute.exit_code, 0) << compute.out;
  const auto report = Lobecast("report " + Quote(out.string()));
  ASSERT_EQ(report.exit_code, 0) << report.out;
  const std::string block = CircuitBlock(compute.out);
  ASSERT_FALSE(block.empty()) << compute.out;
  EXPECT_EQ(CircuitBlock(report.out), block);
  EXPECT_THAT(block, ::testing::HasSubstr("realized gain at the peak"));
  // The JSON carries the same circuit under the file's names.
  const auto json = Lobecast("report --json " + Quote(out.string()));
  ASSERT_EQ(json.exit_code, 0) << json.out;
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"coupling\": {"));
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"port_kind\": \"load\""));
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"input_impedance_ohm\": {"));
  // A forced-current sample has no circuit to show.
  const fs::path plain = out.parent_path() / "single.h5";
  ASSERT_EQ(Lobecast("compute " + Quote(std::string(LOBECAST_SAMPLES) + "/single-dipole.toml") +
                     " -q -o " + Quote(plain.string()))
                .exit_code,
            0);
  EXPECT_EQ(CircuitBlock(Lobecast("report " + Quote(plain.string())).out), "");
}

}  // namespace
}  // namespace lobecast
