// What input errors echo from a file (issue 12, item 8): capped, escaped, UTF-8
// kept. Expected strings are written out by hand from the rules in io/echo_text.h;
// the UTF-8 byte ranges are RFC 3629 sec. 4.
#include "io/echo_text.h"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <string>

#include "io/input/array_reader.h"
#include "io/input/csv_dipoles.h"

namespace lobecast {
namespace {

using ::testing::HasSubstr;
using ::testing::Not;

TEST(EchoText, PrintableTextUnderTheCapIsUnchanged) {
  EXPECT_EQ(EchoText("dipole[2].position"), "dipole[2].position");
  EXPECT_EQ(EchoText(""), "");
  const std::string sixty(60, 'a');
  EXPECT_EQ(EchoText(sixty), sixty);
}

TEST(EchoText, LongTextIsCutAfterTheCapWithDots) {
  EXPECT_EQ(EchoText(std::string(61, 'a')), std::string(60, 'a') + "...");
  EXPECT_EQ(EchoText("abcdef", 4), "abcd...");
}

TEST(EchoText, ControlBytesDelAndNonUtf8AreEscaped) {
  EXPECT_EQ(EchoText(std::string("a\x01\n\tb\x7f", 6)), "a\\x01\\x0a\\x09b\\x7f");
  EXPECT_EQ(EchoText(std::string("\xff\xfe\x80", 3)), "\\xff\\xfe\\x80");
  EXPECT_EQ(EchoText(std::string("x\0y", 3)), "x\\x00y");
  // Overlong "/" (C0 AF), a surrogate (ED A0 80), above U+10FFFF (F4 90 80 80).
  EXPECT_EQ(EchoText("\xc0\xaf"), "\\xc0\\xaf");
  EXPECT_EQ(EchoText("\xed\xa0\x80"), "\\xed\\xa0\\x80");
  EXPECT_EQ(EchoText("\xf4\x90\x80\x80"), "\\xf4\\x90\\x80\\x80");
  // A character cut short by the end of the text.
  EXPECT_EQ(EchoText("\xe2\x82"), "\\xe2\\x82");
}

TEST(EchoText, Utf8IsKeptAndNeverCutInsideACharacter) {
  EXPECT_EQ(EchoText("Quillanby \xc3\xa9 \xe2\x82\xac \xf0\x9f\x93\xa1"),
            "Quillanby \xc3\xa9 \xe2\x82\xac \xf0\x9f\x93\xa1");
  // "a" + euro sign (3 bytes): a cap of 2 stops before the euro sign.
  EXPECT_EQ(EchoText("a\xe2\x82\xac", 2), "a...");
  EXPECT_EQ(EchoText("a\xe2\x82\xac", 4), "a\xe2\x82\xac");
}

TEST(EchoText, IsUtf8) {
  EXPECT_TRUE(IsUtf8("plain"));
  EXPECT_TRUE(IsUtf8("\xc3\xa9\xe2\x82\xac\xf0\x9f\x93\xa1"));
  EXPECT_FALSE(IsUtf8("\xff"));
  EXPECT_FALSE(IsUtf8("\xc3"));
  EXPECT_FALSE(IsUtf8("\xed\xa0\x80"));
}

// A 1 MB unknown key (issue 12: echoed whole) prints its first 60 bytes.
TEST(EchoText, AHugeUnknownKeyIsCapped) {
  const std::string key(1 << 20, 'k');
  const std::string text = "frequency = 1e8\n" + key +
                           " = 1\n[[dipole]]\nposition = [0, 0, 0]\n"
                           "orientation = [0, 0, 1]\nlength = 0.01\ncurrent = { magnitude = 1 }\n";
  try {
    (void)ParseArrayDescription(text, "huge.toml", "");
    FAIL() << "accepted";
  } catch (const InputError& e) {
    const std::string m = e.what();
    EXPECT_LT(m.size(), 1000u) << m.substr(0, 300);
    EXPECT_THAT(m, HasSubstr("huge.toml:2:1: key '" + std::string(60, 'k') + "...'"));
  }
}

// Raw bytes in a CSV never reach the message (issue 12: they reached the terminal).
TEST(EchoText, RawBytesInACsvCellAreEscaped) {
  const std::string csv = std::string("x,y,z,ux,uy,uz,length,magnitude,phase\n") +
                          "0,0,0,0,0,1,0.01,\x1b[2J\x07\xff,0\n";
  try {
    (void)ParseCsvDipoles(csv, "raw.csv", 1.0, 0);
    FAIL() << "accepted";
  } catch (const InputError& e) {
    const std::string m = e.what();
    EXPECT_THAT(m, HasSubstr("found '\\x1b[2J\\x07\\xff'"));
    for (char c : m) {
      const auto b = static_cast<unsigned char>(c);
      EXPECT_TRUE(b >= 0x20 && b < 0x7f) << "byte " << int(b) << " in " << m;
    }
  }
}

// A long bad CSV cell is capped like a key.
TEST(EchoText, ALongCsvCellIsCapped) {
  const std::string cell(5000, 'z');
  const std::string csv =
      "x,y,z,ux,uy,uz,length,magnitude,phase\n" + cell + ",0,0,0,0,1,0.01,1,0\n";
  try {
    (void)ParseCsvDipoles(csv, "long.csv", 1.0, 0);
    FAIL() << "accepted";
  } catch (const InputError& e) {
    const std::string m = e.what();
    EXPECT_THAT(m, HasSubstr("found '" + std::string(60, 'z') + "...'"));
    EXPECT_THAT(m, Not(HasSubstr(std::string(61, 'z'))));
  }
}

}  // namespace
}  // namespace lobecast
