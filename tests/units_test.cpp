// Quantity strings and length units (io/input/units.h).
#include "io/input/units.h"

#include <cmath>
#include <limits>
#include <string>

#include <gtest/gtest.h>

namespace lobecast {
namespace {

TEST(Units, FrequencyNeedsAnExactUnit) {
  // SI prefixes k = 1e3, M = 1e6, G = 1e9, T = 1e12 (BIPM, The International System
  // of Units, 9th ed. 2019, sec. 3); spellings are case-sensitive (m is milli, M mega).
  EXPECT_EQ(FrequencyFromString("433.92 MHz"), 433.92 * 1e6);
  EXPECT_EQ(FrequencyFromString("2.45GHz"), 2.45 * 1e9);
  EXPECT_EQ(FrequencyFromString("  915e6 Hz "), 915e6);
  EXPECT_EQ(FrequencyFromString("50 kHz"), 50e3);
  EXPECT_EQ(FrequencyFromString("0.3 THz"), 0.3 * 1e12);
  EXPECT_FALSE(FrequencyFromString("433.92").has_value());  // bare number: a slip
  EXPECT_FALSE(FrequencyFromString("433.92 mHz").has_value());
  EXPECT_FALSE(FrequencyFromString("433.92 mhz").has_value());
  EXPECT_FALSE(FrequencyFromString("433.92 MHz x").has_value());
  EXPECT_FALSE(FrequencyFromString("MHz").has_value());
  EXPECT_FALSE(FrequencyFromString("").has_value());
  EXPECT_EQ(HertzPerUnit("GHz"), 1e9);
  EXPECT_FALSE(HertzPerUnit("Ghz").has_value());
}

TEST(Units, NumbersParseWholeOrNotAtAll) {
  EXPECT_EQ(ParseNumber(" 1.5 "), 1.5);
  EXPECT_EQ(ParseNumber("+2"), 2.0);
  EXPECT_EQ(ParseNumber("-3e-2"), -3e-2);
  EXPECT_FALSE(ParseNumber("+-2").has_value());
  EXPECT_FALSE(ParseNumber("1.5m").has_value());
  EXPECT_FALSE(ParseNumber("").has_value());
  EXPECT_FALSE(ParseNumber("1,5").has_value());
  // Non-finite values parse, so the caller can say "a finite number".
  EXPECT_TRUE(std::isinf(*ParseNumber("inf")));
  EXPECT_TRUE(std::isnan(*ParseNumber("nan")));
  EXPECT_EQ(ParseNumber("1e999"), std::numeric_limits<double>::infinity());
  EXPECT_EQ(ParseNumber("-1e999"), -std::numeric_limits<double>::infinity());
  // Underflow reads as the nearest double (a subnormal), or zero beyond it.
  EXPECT_EQ(ParseNumber("4.9406564584124654e-324"), std::numeric_limits<double>::denorm_min());
  EXPECT_EQ(ParseNumber("1e-400"), 0.0);
  EXPECT_TRUE(std::signbit(*ParseNumber("-1e-99999")));
}

TEST(Units, SplitQuantityKeepsTheUnitText) {
  const auto q = SplitQuantity("12.5 cm");
  ASSERT_TRUE(q.has_value());
  EXPECT_EQ(q->value, 12.5);
  EXPECT_EQ(q->unit, "cm");
  EXPECT_EQ(SplitQuantity("7")->unit, "");
  EXPECT_FALSE(SplitQuantity("cm 7").has_value());
}

TEST(Units, LengthUnitsRoundTripAndScale) {
  for (LengthUnit u : {LengthUnit::kMetre, LengthUnit::kCentimetre, LengthUnit::kMillimetre,
                       LengthUnit::kWavelength}) {
    EXPECT_EQ(LengthUnitFromString(ToString(u)), u) << ToString(u);
  }
  EXPECT_FALSE(LengthUnitFromString("M").has_value());
  EXPECT_FALSE(LengthUnitFromString("metre").has_value());
  EXPECT_EQ(MetresPer(LengthUnit::kMetre, 0.7), 1.0);
  EXPECT_EQ(MetresPer(LengthUnit::kCentimetre, 0.7), 1e-2);
  EXPECT_EQ(MetresPer(LengthUnit::kMillimetre, 0.7), 1e-3);
  EXPECT_EQ(MetresPer(LengthUnit::kWavelength, 0.7), 0.7);
  // The list in messages names exactly the accepted spellings.
  std::string listed;
  for (LengthUnit u : {LengthUnit::kMetre, LengthUnit::kCentimetre, LengthUnit::kMillimetre,
                       LengthUnit::kWavelength}) {
    listed += (listed.empty() ? "" : ", ") + std::string(ToString(u));
  }
  EXPECT_EQ(listed, kLengthUnitList);
}

TEST(Units, NumberTextReadsBack) {
  for (double v : {0.01, 433920000.0, 1.0 / 3.0, -2.5e-300}) {
    EXPECT_EQ(ParseNumber(FormatNumber(v)), v) << FormatNumber(v);
  }
  EXPECT_EQ(FormatNumber(0.01), "0.01");
  EXPECT_EQ(FormatApprox(0.04914634146341463), "0.0491463");
  EXPECT_EQ(FormatApprox(1.0 / 3.0, 3), "0.333");
}

}  // namespace
}  // namespace lobecast
