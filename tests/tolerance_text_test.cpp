// The tolerance study's terminal table: every cell stays apart from its
// neighbours, whatever the numbers' widths.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <sstream>
#include <string>
#include <vector>

#include "io/text/tolerance_text.h"

namespace lobecast::text {
namespace {

// The table rows (after the "per trial" header, up to the time line), split on
// whitespace after the label's 48 columns.
std::vector<std::vector<std::string>> TableCells(const std::string& text) {
  std::istringstream in(text);
  std::string line;
  bool in_table = false;
  std::vector<std::vector<std::string>> rows;
  while (std::getline(in, line)) {
    if (line.rfind("  per trial", 0) == 0) {
      in_table = true;
      continue;
    }
    if (line.rfind("time", 0) == 0) break;
    if (!in_table) continue;
    std::istringstream cells(line.substr(48));
    std::vector<std::string> row;
    for (std::string c; cells >> c;) row.push_back(c);
    rows.push_back(row);
  }
  return rows;
}

TEST(ToleranceText, NegativeSmallNumbersDoNotRunTogether) {
  ArrayDescription desc;
  desc.array.frequency_hz = 1e9;
  desc.array.dipoles.resize(4);
  ToleranceResult r;
  r.percentiles = {5, 50, 95};
  // Directivity losses whose %.5g takes 11 characters (-0.00012814), side by side.
  for (double loss : {-0.025359, -0.00012814, -0.00012813, 0.23304}) {
    TrialFigures t;
    t.directivity_loss_db = loss;
    t.beam_directivity = 197.25;
    t.peak_sidelobe_db = -25.5;
    r.trials.push_back(t);
  }
  ToleranceOptions o;
  const std::vector<std::vector<std::string>> rows =
      TableCells(DescribeTolerance(desc, r, o, "out.h5", 1.0));
  ASSERT_FALSE(rows.empty());
  for (const std::vector<std::string>& row : rows) {
    // error-free, mean, std, min, p5, p50, p95, max: 8 cells, each one number.
    ASSERT_EQ(row.size(), 8u) << ::testing::PrintToString(row);
    for (const std::string& c : row) {
      if (c == "-" || c == "undefined") continue;
      char* end = nullptr;
      std::strtod(c.c_str(), &end);
      EXPECT_EQ(*end, '\0') << "cell '" << c << "' is not one number";
    }
  }
}

}  // namespace
}  // namespace lobecast::text
