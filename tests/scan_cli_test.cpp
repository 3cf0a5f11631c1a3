// `lobecast scan` end to end: the table, the CSV and the refusals.
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using testing::Quote;

testing::RunOutput RunCommand(const std::string& command) {
  return testing::RunShell(command + " 2>&1");
}
fs::path WorkDir(const std::string& name) {
  return testing::TempWorkDir("lobecast-scan-test", name);
}

TEST(ScanCommand, TableAndCsvOnTheParasiticSample) {
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml";
  const fs::path csv = WorkDir("scan") / "scan.csv";
  fs::remove(csv);
  const auto run =
      RunCommand(std::string(LOBECAST_EXE) + " scan " + Quote(sample) +
                 " --theta-start 90 --theta-stop 30 --step 30 --phi 0 -o " + Quote(csv.string()));
  // start > stop is refused as bad input (exit 2), nothing written.
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_FALSE(fs::exists(csv));
  const auto ok =
      RunCommand(std::string(LOBECAST_EXE) + " scan " + Quote(sample) +
                 " --theta-start 30 --theta-stop 90 --step 30 -o " + Quote(csv.string()));
  ASSERT_EQ(ok.exit_code, 0) << ok.out;
  EXPECT_THAT(ok.out, HasSubstr("conjugate match at theta 30 deg"));
  std::ifstream in(csv);
  std::string line;
  std::vector<std::string> rows;
  while (std::getline(in, line)) rows.push_back(line);
  ASSERT_EQ(rows.size(), 1u + 3u * 3u);  // header + 3 angles x 3 dipoles
  EXPECT_EQ(rows[0].substr(0, 26), "theta_deg,phi_deg,element,");
  // The first angle is the match: |Gamma| = 0 (column 6) for every element.
  for (int m = 1; m <= 3; ++m) {
    std::stringstream s(rows[m]);
    std::string cell;
    for (int c = 0; c < 6; ++c) std::getline(s, cell, ',');
    EXPECT_LT(std::stod(cell), 1e-12) << rows[m];
  }
}

TEST(ScanCommand, EveryDipoleNeedsASelfReactance) {
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/endfire-pair.toml";
  const auto run = RunCommand(std::string(LOBECAST_EXE) + " scan " + Quote(sample));
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr("no self reactance"));
}

}  // namespace
}  // namespace lobecast
