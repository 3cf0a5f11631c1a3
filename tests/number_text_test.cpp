// Round-trip number text (io/text/number_text.h).
#include "io/text/number_text.h"
#include "io/text/text_format.h"

#include <clocale>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include <gtest/gtest.h>

namespace lobecast {
namespace {

std::string Shortest(double v) {
  std::string s;
  AppendShortest(s, v);
  return s;
}

TEST(AppendShortest, ShortestDecimalThatReadsBack) {
  // std::to_chars without a format gives the shortest representation that reads back
  // to the same value (ISO/IEC 14882:2020 [charconv.to.chars], from memory).
  EXPECT_EQ(Shortest(0.1), "0.1");
  EXPECT_EQ(Shortest(0.1 + 0.2), "0.30000000000000004");
  EXPECT_EQ(Shortest(1e-30), "1e-30");
  EXPECT_EQ(Shortest(-2.5), "-2.5");
  EXPECT_EQ(Shortest(0.0), "0");
  EXPECT_EQ(Shortest(-0.0), "-0");
  EXPECT_EQ(Shortest(100.0), "100");
  EXPECT_EQ(Shortest(std::numeric_limits<double>::infinity()), "inf");
  EXPECT_EQ(Shortest(-std::numeric_limits<double>::infinity()), "-inf");
  EXPECT_EQ(Shortest(std::numeric_limits<double>::quiet_NaN()), "nan");
  std::string appended = "x=";
  AppendShortest(appended, 3.25);
  EXPECT_EQ(appended, "x=3.25");
}

TEST(AppendShortest, EveryDoubleReadsBackExactlyWithStrtod) {
  // Random bit patterns over the whole finite range, plus the extremes; std::strtod
  // (C17 7.22.1.3) is the independent reader the header promises.
  std::mt19937_64 rng(12);
  std::vector<double> values = {std::numeric_limits<double>::max(),
                                std::numeric_limits<double>::min(),
                                std::numeric_limits<double>::denorm_min(),
                                std::numeric_limits<double>::lowest(),
                                5e-324,
                                1.7976931348623157e308};
  for (int i = 0; i < 20000; ++i) {
    const std::uint64_t bits = rng();
    double v;
    std::memcpy(&v, &bits, sizeof v);
    if (std::isfinite(v)) values.push_back(v);
  }
  for (double v : values) {
    const std::string s = Shortest(v);
    EXPECT_EQ(std::strtod(s.c_str(), nullptr), v) << s;
    EXPECT_LE(s.size(), 24u) << s;
  }
}

TEST(AppendShortest, DecimalPointIgnoresTheLocale) {
  // A locale with a decimal comma, when the system has one; "C" otherwise (then the
  // test still checks the output).
  const char* old = std::setlocale(LC_NUMERIC, nullptr);
  const std::string saved = old ? old : "C";
  const bool comma = std::setlocale(LC_NUMERIC, "de_DE.UTF-8") != nullptr;
  EXPECT_EQ(Shortest(1.5), "1.5") << (comma ? "de_DE" : "C");
  EXPECT_EQ(ParseFiniteNumber("1.5"), 1.5);
  std::setlocale(LC_NUMERIC, saved.c_str());
}

TEST(ParseFiniteNumber, WholeStringFiniteOnly) {
  EXPECT_EQ(ParseFiniteNumber("433.92"), 433.92);
  EXPECT_EQ(ParseFiniteNumber("+5"), 5.0);
  EXPECT_EQ(ParseFiniteNumber("-5e-3"), -5e-3);
  EXPECT_EQ(ParseFiniteNumber("1E3"), 1000.0);
  EXPECT_EQ(ParseFiniteNumber(".5"), 0.5);
  for (const char* bad : {"", "+", "+-5", "++5", " 5", "5 ", "5x", "1,5", "inf", "-inf", "nan",
                          "infinity", "1e999", "0x10", "--1"}) {
    EXPECT_FALSE(ParseFiniteNumber(bad).has_value()) << "'" << bad << "'";
  }
}

TEST(ParseFiniteNumber, ReadsBackWhatAppendShortestWrites) {
  for (double v : {0.1, -7.25e-12, 6.02214076e23, 1.0 / 3.0}) {
    EXPECT_EQ(ParseFiniteNumber(Shortest(v)), v) << v;
  }
}

TEST(Fixed2, NoSignOnAValueThatRoundsToZero) {
  // A mirror lobe a hair below the peak by rounding prints as its twin a hair above.
  EXPECT_EQ(text::Fixed2(-1e-15), "0.00");
  EXPECT_EQ(text::Fixed2(1e-15), "0.00");
  EXPECT_EQ(text::Fixed2(-0.0), "0.00");
  EXPECT_EQ(text::Fixed2(-0.004999), "0.00");
  EXPECT_EQ(text::Fixed2(-0.005001), "-0.01");
  EXPECT_EQ(text::Fixed2(-12.345), "-12.35");  // %.2f's rounding otherwise
  EXPECT_EQ(text::Fixed2(3.0), "3.00");
}

}  // namespace
}  // namespace lobecast
