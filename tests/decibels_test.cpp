// Decibel conversions (engine/decibels.h): the definitions and the project's
// conventions at 0, below 0, at infinity and for NaN.
#include "engine/decibels.h"

#include <cmath>
#include <limits>

#include <gtest/gtest.h>

namespace lobecast {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNan = std::numeric_limits<double>::quiet_NaN();

TEST(Decibels, PowersTakeTenLogAndAmplitudesTwentyLog) {
  // Definitions of the decibel for power and root-power quantities (IEC 60027-3:2002,
  // from memory): 10 log10 of a power ratio, 20 log10 of an amplitude ratio.
  EXPECT_EQ(ToDb(100.0), 20.0);
  EXPECT_EQ(ToDb(1.0), 0.0);
  EXPECT_EQ(ToDb(1e-3), -30.0);
  EXPECT_EQ(AmplitudeToDb(10.0), 20.0);
  EXPECT_EQ(AmplitudeToDb(1.0), 0.0);
  EXPECT_NEAR(ToDb(2.0), 3.0102999566398120, 1e-15);  // 10 log10 2, from memory
  EXPECT_EQ(FromDb(30.0), 1000.0);
  EXPECT_EQ(FromDb(-20.0), 0.01);
  for (double db : {-123.4, -3.0, 0.5, 47.0}) EXPECT_NEAR(ToDb(FromDb(db)), db, 1e-13) << db;
}

TEST(Decibels, NoPowerIsMinusInfinityAndNanStaysNan) {
  EXPECT_EQ(ToDb(0.0), -kInf);
  EXPECT_EQ(ToDb(-0.0), -kInf);
  EXPECT_EQ(ToDb(-1e-300), -kInf);  // a negative power only comes from rounding
  EXPECT_EQ(ToDb(kInf), kInf);
  EXPECT_TRUE(std::isnan(ToDb(kNan)));
  EXPECT_EQ(AmplitudeToDb(0.0), -kInf);
  EXPECT_EQ(AmplitudeToDb(-2.0), -kInf);
  EXPECT_EQ(AmplitudeToDb(kInf), kInf);
  EXPECT_TRUE(std::isnan(AmplitudeToDb(kNan)));
  EXPECT_EQ(FromDb(-kInf), 0.0);
}

TEST(Decibels, PowerRatioIsInfiniteAgainstAnExactZero) {
  EXPECT_NEAR(PowerRatioDb(4.0, 1.0), ToDb(4.0), 0.0);
  EXPECT_EQ(PowerRatioDb(1.0, 0.0), kInf);
  EXPECT_EQ(PowerRatioDb(0.0, 1.0), -kInf);
  EXPECT_TRUE(std::isnan(PowerRatioDb(0.0, 0.0)));
  // No threshold of its own: what is rounding was floored to an exact zero before
  // (engine/rounding_floor.h), so a tiny but non-zero power is a finite ratio.
  EXPECT_NEAR(PowerRatioDb(1.0, 1e-40), 400.0, 1e-12);
  EXPECT_NEAR(PowerRatioDb(1e-40, 1.0), -400.0, 1e-12);
}

}  // namespace
}  // namespace lobecast
