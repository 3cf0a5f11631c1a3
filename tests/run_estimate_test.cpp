// The run estimate behind --max-hours and --max-memory-gb (engine/run_estimate.h):
// the counts it rests on, and the two huge runs of issue 12 that it must stop.
#include "engine/run_estimate.h"

#include <gtest/gtest.h>

namespace lobecast {
namespace {

TEST(RunEstimate, CountsPairsOfDipolesSourcesAndDirections) {
  RunSize s;
  s.dipoles = 1000;
  s.directions = 181 * 361;
  s.threads = 1;
  const RunEstimate free_space = EstimateRun(s);
  EXPECT_EQ(free_space.power_pairs, 1000.0 * 1000.0);
  EXPECT_EQ(free_space.field_pairs, 1000.0 * 181 * 361);
  s.ground = Ground::kPec;  // one image per dipole: twice the sources
  const RunEstimate pec = EstimateRun(s);
  EXPECT_EQ(pec.power_pairs, 2 * free_space.power_pairs);
  EXPECT_EQ(pec.field_pairs, 2 * free_space.field_pairs);
  // More threads, less wall time; the memory does not depend on them.
  s.threads = 4;
  EXPECT_LT(EstimateRun(s).seconds(), pec.seconds());
  EXPECT_EQ(EstimateRun(s).memory_bytes, pec.memory_bytes);
  // The stored N x N matrix costs 8 N^2 bytes.
  s.resistance_matrix = true;
  EXPECT_EQ(EstimateRun(s).memory_bytes - pec.memory_bytes, 8.0 * 1000 * 1000);
}

// Issue 12 measured both: a 10^7-row element table spends ~10 days in the power;
// 9.97e7 directions need 6.7 GB. The estimate must put the first past the default
// two hours even on 64 threads, and the second near its measured memory.
TEST(RunEstimate, IssueTwelvesHugeRunsAreSeenAsHuge) {
  RunSize rows;
  rows.dipoles = 10'000'000;
  rows.threads = 64;
  EXPECT_GT(EstimateRun(rows).seconds(), 2 * 3600.0);
  rows.threads = 1;
  EXPECT_GT(EstimateRun(rows).seconds(), 5 * 86400.0) << "about 10 days were measured";
  EXPECT_LT(EstimateRun(rows).seconds(), 60 * 86400.0);

  RunSize grid;
  grid.dipoles = 1;
  grid.directions = 99'700'000;
  const double gb = EstimateRun(grid).memory_bytes / 1e9;
  EXPECT_GT(gb, 6.7 * 0.9);
  EXPECT_LT(gb, 6.7 * 1.5);
}

TEST(RunEstimate, DescribesTimeAndMemory) {
  RunSize s;
  s.dipoles = 10'000'000;
  s.threads = 1;
  const std::string d = EstimateRun(s).Describe();
  EXPECT_NE(d.find("power 1e+14 dipole pairs"), std::string::npos) << d;
  EXPECT_NE(d.find("days"), std::string::npos) << d;
  EXPECT_NE(d.find("GB of memory"), std::string::npos) << d;
}

}  // namespace
}  // namespace lobecast
