// The link and exposure text (io/text/link_text.h, exposure_text.h): the notes column
// of their CSV tables and when each caution is given.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "io/safety_note.h"
#include "io/text/exposure_text.h"
#include "io/text/link_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

using ::testing::HasSubstr;

std::vector<std::string> Lines(const std::string& s) {
  std::vector<std::string> out;
  std::size_t start = 0;
  for (std::size_t nl; (nl = s.find('\n', start)) != std::string::npos; start = nl + 1)
    out.push_back(s.substr(start, nl - start));
  return out;
}

TEST(CsvWithNotes, OneNotePerRowAndTheLastRowTakesTheRest) {
  // More notes than rows: the last row joins the rest with " | ".
  EXPECT_EQ(CsvWithNotes("a,b", {"1,2"}, {"first", "second", "third"}),
            "a,b,notes\n1,2,first | second | third\n");
  // Fewer notes than rows: empty cells below them, the table stays rectangular.
  EXPECT_EQ(CsvWithNotes("a", {"1", "2", "3"}, {"only"}), "a,notes\n1,only\n2,\n3,\n");
  // A note with the separator or a quote is quoted (RFC 4180).
  EXPECT_EQ(CsvWithNotes("a", {"1"}, {"x, \"y\""}), "a,notes\n1,\"x, \"\"y\"\"\"\n");
}

LinkReport ResultToResult(double distance_m, double start_m) {
  LinkReport r;
  r.distance_m = distance_m;
  for (LinkEnd* e : {&r.tx, &r.rx}) {
    e->result_path = "x.h5";
    e->region.region.fraunhofer_m = start_m;
    e->region.region.few_wavelengths_m = 0.5 * start_m;
  }
  return r;
}

TEST(LinkCautions, FarFieldGroundAndHand) {
  // At the far-field distance no caution; just inside it one per end.
  EXPECT_TRUE(LinkCautions(ResultToResult(10.0, 10.0)).empty());
  const auto inside = LinkCautions(ResultToResult(9.99, 10.0));
  ASSERT_EQ(inside.size(), 2u);
  EXPECT_THAT(inside[0], HasSubstr("inside the far field of the transmitter"));
  EXPECT_THAT(inside[1], HasSubstr("inside the far field of the receiver"));
  // A receiver given by numbers has no far field of its own.
  LinkReport given = ResultToResult(9.99, 10.0);
  given.rx.result_path.clear();
  EXPECT_EQ(LinkCautions(given).size(), 1u);
  // Both over PEC ground.
  LinkReport g = ResultToResult(20.0, 10.0);
  g.tx.ground_pec = g.rx.ground_pec = true;
  ASSERT_EQ(LinkCautions(g).size(), 1u);
  EXPECT_THAT(LinkCautions(g)[0], HasSubstr("PEC ground"));
  g.rx.ground_pec = false;
  EXPECT_TRUE(LinkCautions(g).empty());
  // Opposite hands toward each other; an undefined PLF.
  LinkReport h = ResultToResult(20.0, 10.0);
  h.tx.toward.polarization.sense = 1;
  h.rx.toward.polarization.sense = -1;
  ASSERT_EQ(LinkCautions(h).size(), 1u);
  EXPECT_THAT(LinkCautions(h)[0], HasSubstr("--rx-rotate"));
  h.rx.toward.polarization.sense = 1;
  h.polarization_loss_factor = std::nan("");
  ASSERT_EQ(LinkCautions(h).size(), 1u);
  EXPECT_THAT(LinkCautions(h)[0], HasSubstr("undefined"));
}

TEST(LinkText, EveryOutputCarriesTheSafetyNote) {
  LinkReport r = ResultToResult(5.0, 10.0);
  r.cautions = LinkCautions(r);
  EXPECT_THAT(LinkText(r), HasSubstr("not an RF-exposure or"));
  EXPECT_THAT(LinkText(r), HasSubstr("caution: the distance 5 m is inside the far field"));
  EXPECT_THAT(LinkJson(r), HasSubstr(std::string(kSafetyNote)));
  const std::vector<std::string> csv = Lines(LinkCsv(r));
  ASSERT_EQ(csv.size(), 2u);
  EXPECT_THAT(csv[1], HasSubstr(std::string(kSafetyNote)));
  // Without a sensitivity the margin cells are empty, not a number.
  EXPECT_THAT(csv[1], HasSubstr(",,,"));
}

TEST(ExposureText, CautionsAndTheExposureNote) {
  ExposureReport r;
  r.result_path = "x.h5";
  r.limit_w_m2 = 10;
  r.region.region.fraunhofer_m = 7;
  ExposureRow row;
  row.kind = "worst";
  row.distance_to_limit_m = 5;
  r.rows = {row};
  ASSERT_EQ(ExposureCautions(r).size(), 1u);
  EXPECT_THAT(ExposureCautions(r)[0], HasSubstr("inside the far-field distance 7 m"));
  r.rows[0].distance_to_limit_m = 8;
  EXPECT_TRUE(ExposureCautions(r).empty());
  // A row whose limit falls inside the far-field distance is marked in every form,
  // even when the worst direction's is outside it.
  ExposureRow side = row;
  side.kind = "cut";
  side.distance_to_limit_m = 0.5;
  r.rows.push_back(side);
  ASSERT_EQ(ExposureCautions(r).size(), 1u);
  EXPECT_THAT(ExposureCautions(r)[0], HasSubstr("1 of 2 rows reach the limit inside"));
  // Whole (Printf once cut every text at 255 bytes).
  EXPECT_EQ(Printf("%s.", std::string(1000, 'a').c_str()), std::string(1000, 'a') + ".");
  EXPECT_THAT(ExposureCautions(r)[0], testing::EndsWith("is outside it"));
  EXPECT_THAT(ExposureText(r), HasSubstr("0.5*"));
  EXPECT_THAT(ExposureText(r), HasSubstr("* inside the far-field distance 7 m"));
  EXPECT_THAT(ExposureJson(r), HasSubstr("\"limit_in_far_field\": false"));
  EXPECT_THAT(ExposureJson(r), HasSubstr("\"limit_in_far_field\": true"));
  const std::vector<std::string> csv = Lines(ExposureCsv(r));
  ASSERT_GE(csv.size(), 3u);
  EXPECT_THAT(csv[0], HasSubstr("distance_to_limit_m,limit_in_far_field"));
  EXPECT_THAT(csv[1], HasSubstr(",8,true"));
  EXPECT_THAT(csv[2], HasSubstr(",0.5,false"));
  r.rows.pop_back();
  r.distance_m = 3.0;
  EXPECT_EQ(ExposureCautions(r).size(), 1u);
  EXPECT_THAT(ExposureGroundNote(Ground::kPec), HasSubstr("theta < 90 deg"));
  EXPECT_THAT(ExposureGroundNote(Ground::kNone), HasSubstr("free space"));
  for (const std::string& out : {ExposureText(r), ExposureJson(r), ExposureCsv(r)}) {
    EXPECT_THAT(out, HasSubstr("qualified persons"));
    EXPECT_THAT(out, HasSubstr("lobecast holds no exposure limits"));
  }
}

}  // namespace
}  // namespace lobecast::text
