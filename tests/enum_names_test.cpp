// The names enum options accept (cli/enum_names.h): taken from ToString, so each one
// parses back with the matching FromString. (The options that use them are checked
// through the executable in report_export_test.cpp, BadEnumNamesListTheAcceptedOnes.)
#include "cli/enum_names.h"

#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine/field/far_field.h"
#include "engine/polarization.h"

namespace lobecast::cli {
namespace {

TEST(EnumNames, JoinAlternatives) {
  EXPECT_EQ(JoinAlternatives({}), "");
  EXPECT_EQ(JoinAlternatives({"a"}), "a");
  EXPECT_EQ(JoinAlternatives({"a", "b"}), "a or b");
  EXPECT_EQ(JoinAlternatives({"a", "b", "c"}), "a, b or c");
}

TEST(EnumNames, EveryNameParsesBackToItsValue) {
  const std::vector<FieldMethod> methods = {FieldMethod::kDirect, FieldMethod::kFast,
                                            FieldMethod::kAuto};
  const std::vector<std::string> m =
      NamesOf({FieldMethod::kDirect, FieldMethod::kFast, FieldMethod::kAuto});
  ASSERT_EQ(m.size(), methods.size());
  for (std::size_t i = 0; i < m.size(); ++i) EXPECT_EQ(FieldMethodFromString(m[i]), methods[i]);

  const std::vector<PolarizationReference> refs(std::begin(kAllPolarizationReferences),
                                                std::end(kAllPolarizationReferences));
  const std::vector<std::string> r =
      NamesOf({PolarizationReference::kLinearX, PolarizationReference::kLinearY,
               PolarizationReference::kRightCircular, PolarizationReference::kLeftCircular,
               PolarizationReference::kTheta, PolarizationReference::kPhi});
  EXPECT_EQ(JoinAlternatives(r), "x, y, rhcp, lhcp, theta or phi");
  for (std::size_t i = 0; i < r.size(); ++i) {
    EXPECT_EQ(PolarizationReferenceFromString(r[i]), refs[i]) << r[i];
  }
}

}  // namespace
}  // namespace lobecast::cli
