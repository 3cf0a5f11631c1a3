// The small JSON writer (io/text/json_writer.h), against RFC 8259 and Python's json
// module as an independent parser.
#include "io/text/json_writer.h"

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

TEST(JsonWriter, NestedDocumentLayout) {
  JsonWriter w;
  w.BeginObject();
  w.Member("name", "dipole");
  w.Member("d", 1.5);
  w.MemberInt("n", -3);
  w.MemberBool("ok", true);
  w.Key("list");
  w.BeginArray();
  w.Number(0.1);
  w.Null();
  w.BeginObject();
  w.EndObject();
  w.BeginArray();
  w.EndArray();
  w.EndArray();
  w.EndObject();
  // Two-space indentation, ": " after keys, empty containers on one line, and a final
  // newline once the top-level value is closed (json_writer.h).
  EXPECT_EQ(w.text(),
            "{\n"
            "  \"name\": \"dipole\",\n"
            "  \"d\": 1.5,\n"
            "  \"n\": -3,\n"
            "  \"ok\": true,\n"
            "  \"list\": [\n"
            "    0.1,\n"
            "    null,\n"
            "    {},\n"
            "    []\n"
            "  ]\n"
            "}\n");
}

TEST(JsonWriter, StringEscapesFollowRfc8259) {
  // RFC 8259 sec. 7: quotation mark, reverse solidus and the control characters
  // U+0000..U+001F must be escaped; everything else may pass through (UTF-8 here).
  JsonWriter w;
  w.String(std::string("q\"b\\n\nt\tr\r\x01\x1f/\xC3\xA9", 15));
  EXPECT_EQ(w.text(), "\"q\\\"b\\\\n\\nt\\tr\\r\\u0001\\u001f/\xC3\xA9\"");
  JsonWriter z;
  z.String(std::string("a\0b", 3));
  EXPECT_EQ(z.text(), "\"a\\u0000b\"");
}

TEST(JsonWriter, InfinitiesAreStringsAndNanIsNull) {
  // RFC 8259 sec. 6: "Numeric values that cannot be represented ... (such as Infinity
  // and NaN) are not permitted." lobecast's one encoding (README "JSON numbers"): the
  // strings "inf" and "-inf" keep the sign, null is undefined.
  JsonWriter w;
  w.BeginArray();
  w.Number(std::numeric_limits<double>::infinity());
  w.Number(-std::numeric_limits<double>::infinity());
  w.Number(std::numeric_limits<double>::quiet_NaN());
  w.Number(-0.0);
  w.Number(1e-300);
  w.EndArray();
  EXPECT_EQ(w.text(), "[\n  \"inf\",\n  \"-inf\",\n  null,\n  -0,\n  1e-300\n]\n");
}

TEST(JsonWriter, PythonJsonReadsBackEveryValue) {
  // Python's json module (an independent parser; standard library) reads the
  // document, and each number comes back as the same double; the infinities through
  // float("inf") and float("-inf") of their strings, with their sign.
  const double inf = std::numeric_limits<double>::infinity();
  const double values[] = {0.1,     1.0 / 3.0, 6.02214076e23, -2.2250738585072014e-308,
                           12345.0, inf,       -inf};
  JsonWriter w;
  w.BeginObject();
  w.Key("values");
  w.BeginArray();
  for (double v : values) w.Number(v);
  w.EndArray();
  w.Member("text", "caf\xC3\xA9 \"quoted\"\n\x02");
  w.EndObject();
  const auto dir = testing::TempWorkDir("lobecast-json", "python");
  const auto path = dir / "doc.json";
  std::ofstream(path) << w.text();
  const auto script = dir / "read.py";
  std::ofstream(script) << "import json, sys\n"
                           "d = json.load(open(sys.argv[1], encoding='utf-8'))\n"
                           "print(' '.join(float(x).hex() for x in d['values']))\n"
                           "print(ascii(d['text']))\n";
  const testing::RunOutput r =
      testing::RunShell(std::string(LOBECAST_PYTHON) + " " + testing::Quote(script.string()) + " " +
                        testing::Quote(path.string()) + " 2>&1");
  ASSERT_EQ(r.exit_code, 0) << r.out;
  // float.hex() is exact; C's strtod reads hexadecimal floats back (C17 7.22.1.3).
  std::istringstream got(r.out.substr(0, r.out.find('\n')));
  for (double v : values) {
    std::string hex;
    got >> hex;
    EXPECT_EQ(std::strtod(hex.c_str(), nullptr), v) << hex;
  }
  EXPECT_NE(r.out.find("'caf\\xe9 \"quoted\"\\n\\x02'"), std::string::npos) << r.out;
}

}  // namespace
}  // namespace lobecast
