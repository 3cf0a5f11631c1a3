// Design files end to end: `synth` and the commands that accept a design, the
// located errors of the design reader, and the grating-lobe warning.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "io/input/array_reader.h"
#include "io/input_error.h"
#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::Not;
using testing::Quote;

testing::RunOutput Lobecast(const std::string& args) {
  return testing::RunShell(std::string(LOBECAST_EXE) + " " + args + " 2>&1");
}

const std::string kBase = R"(frequency = "1 GHz"
length_unit = "wavelength"
[grid]
theta = 90
phi = { start = 0, stop = 180, step = 5 }
[element]
orientation = [0, 0, 1]
length = 0.02
)";

fs::path Write(const std::string& name, const std::string& text) {
  const fs::path p = testing::TempWorkDir("lobecast-design-test", "d") / name;
  std::ofstream(p) << text;
  return p;
}

// The InputError message of parsing `text`, or "" when it parses.
std::string ErrorOf(const std::string& text) {
  try {
    ParseArrayDescription(text, "design.toml", "");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(DesignCli, SynthWritesAnArrayThatCheckAccepts) {
  const fs::path design = Write("line.toml", kBase + R"([lattice]
kind = "line"
count = 8
spacing = 0.5
[taper]
kind = "chebyshev"
sidelobe_db = -25
[steer]
theta = 90
phi = 60
)");
  const fs::path out = design.parent_path() / "line-array.toml";
  const auto r = Lobecast("synth " + Quote(design.string()) + " -o " + Quote(out.string()));
  ASSERT_EQ(r.exit_code, 0) << r.out;
  EXPECT_THAT(r.out, HasSubstr("lattice      line, 8 elements"));
  EXPECT_THAT(r.out, HasSubstr("efficiency   0."));
  EXPECT_THAT(r.out, HasSubstr("steering     theta 90 deg, phi 60 deg, phase"));
  const auto check = Lobecast("check " + Quote(out.string()));
  EXPECT_EQ(check.exit_code, 0) << check.out;
  // check and compute take the design itself too.
  const auto check_design = Lobecast("check " + Quote(design.string()));
  EXPECT_EQ(check_design.exit_code, 0) << check_design.out;
  EXPECT_THAT(check_design.out, HasSubstr("taper        chebyshev, side lobes -25 dB"));
  EXPECT_THAT(check.out, Not(HasSubstr("taper        ")));
  const std::string text = testing::ReadFile(out);
  EXPECT_THAT(text, HasSubstr("[[dipole]]"));
  EXPECT_THAT(text, Not(HasSubstr("[lattice]")));
  // synth refuses a plain array description.
  const auto plain = Lobecast("synth " + Quote(out.string()) + " -o " +
                              Quote((design.parent_path() / "again.toml").string()));
  EXPECT_EQ(plain.exit_code, 2);
  EXPECT_THAT(plain.out, HasSubstr("no [lattice] table"));
}

// Nulls and objectives are parsed and validated, then refused in one place until
// the excitation synthesis is built: exit 2, nothing written, nothing clobbered.
TEST(DesignCli, NullsAndObjectivesAreRefusedForNowAndNothingIsWritten) {
  const std::string lattice = "[lattice]\nkind = \"line\"\ncount = 8\nspacing = 0.5\n";
  const fs::path design = Write("nulls.toml", kBase + lattice + "[[null]]\ntheta = 90\nphi = 30\n");
  const fs::path out = design.parent_path() / "nulls-array.toml";
  std::ofstream(out) << "old";
  const auto r = Lobecast("synth " + Quote(design.string()) + " -o " + Quote(out.string()));
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_THAT(r.out, HasSubstr("nulls.toml:"));
  EXPECT_THAT(r.out, HasSubstr("not built yet in this version"));
  EXPECT_EQ(testing::ReadFile(out), "old");
  const fs::path obj =
      Write("objective.toml", kBase + lattice + "[objective]\nkind = \"max-directivity\"\n");
  const auto c = Lobecast("compute " + Quote(obj.string()) + " -o " +
                          Quote((design.parent_path() / "o.h5").string()));
  EXPECT_EQ(c.exit_code, 2);
  EXPECT_THAT(c.out, HasSubstr("not built yet in this version"));
  EXPECT_FALSE(fs::exists(design.parent_path() / "o.h5"));
  // Validation comes first: a bad null direction or objective is located.
  EXPECT_THAT(ErrorOf(kBase + lattice + "[[null]]\ntheta = 190\nphi = 0\n"),
              HasSubstr("design.toml:14:9: key 'null[0].theta': found 190"));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[objective]\nkind = \"best\"\n"),
              HasSubstr("key 'objective.kind': found \"best\""));
  EXPECT_THAT(ErrorOf(kBase + lattice +
                      "[objective]\nkind = \"sidelobe-envelope\"\nsidelobe_db = -35\nmask = [{ "
                      "theta = [0, 60], level_db = -40 }]\n"),
              HasSubstr("not built yet"));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[objective]\nkind = \"max-directivity\"\nmask = []\n"),
              HasSubstr("key 'objective.mask'"));
  EXPECT_THAT(ErrorOf(kBase + lattice +
                      "[taper]\nkind = \"uniform\"\n[objective]\nkind = "
                      "\"max-directivity\"\n"),
              HasSubstr("both [taper] and [objective]"));
}

TEST(DesignCli, LocatedErrors) {
  // Over ground, an element at or below the plane.
  EXPECT_THAT(ErrorOf("ground = \"pec\"\n" + kBase +
                      "[lattice]\nkind = \"ring\"\ncount = 4\nradius = 1\ncenter = [0, 0, 0]\n"),
              HasSubstr("design.toml:14:10: key 'lattice.center': found element 0 at z = 0 m"));
  EXPECT_THAT(
      ErrorOf(kBase + "[lattice]\nkind = \"line\"\ncount = 4\nspacing = 0.5\nremove = [4]\n"),
      HasSubstr("key 'lattice.remove[0]': found 4, expected an element index in [0, 3]"));
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"hexagonal\"\ncount = 4\n"),
              HasSubstr("key 'lattice.kind': found \"hexagonal\""));
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"line\"\ncount = 4\nspacing = 0.5\n[taper]\nkind "
                              "= \"chebyshev\"\nnbar = 4\n"),
              HasSubstr("key 'taper.nbar': found a nbar key"));
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"line\"\ncount = 4\nspacing = 0.5\n[taper]\nkind "
                              "= \"chebyshev\"\nsidelobe_db = 10\n"),
              HasSubstr("key 'taper.sidelobe_db': found 10"));
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"line\"\ncount = 4\nspacing = 0.5\n[taper]\nkind "
                              "= \"circular-taylor\"\n"),
              HasSubstr("taper rejected"));
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"rectangular\"\ncount = 4\nspacing = 0.5\n"),
              HasSubstr("key 'lattice.count': found integer 4, expected [Nx, Ny]"));
  // An unknown key in a design table, with the reader's hint machinery.
  EXPECT_THAT(ErrorOf(kBase + "[lattice]\nkind = \"line\"\ncount = 4\nspacing = 0.5\n[steer]\n"
                              "theta = 10\nazimuth = 3\n"),
              HasSubstr("steer.azimuth"));
  // A plain array file keeps refusing design tables without a [lattice].
  EXPECT_THAT(ErrorOf("frequency = 1e9\n[taper]\nkind = \"uniform\"\n"), HasSubstr("taper"));
}

TEST(DesignCli, GeneratedAndExplicitDipolesMix) {
  const ArrayDescription d = ParseArrayDescription(
      kBase +
          "[lattice]\nkind = \"line\"\ncount = 3\nspacing = 0.5\n[[dipole]]\nposition = [0, 2, "
          "0]\norientation = [0, 0, 1]\nlength = 0.02\ncurrent = { magnitude = 0.5, phase = 90 }\n",
      "design.toml", "");
  ASSERT_EQ(d.array.size(), 4u);
  ASSERT_TRUE(d.design);
  EXPECT_EQ(d.design->first_generated, 0u);
  EXPECT_EQ(d.design->generated, 3u);
  EXPECT_NEAR(d.array.dipoles[3].position_m.y(), 2 * d.array.wavelength_m(), 1e-15);
  EXPECT_NEAR(std::abs(d.currents[3]), 0.5, 1e-15);
}

// The warning appears exactly when a grating lobe enters visible space: a line
// steered 30 deg off broadside has one once d / lambda >= 1 / (1 + sin 30 deg) = 2/3.
TEST(DesignCli, GratingLobeWarningExactlyWhenTheConditionSays) {
  for (const double spacing : {0.66, 0.67}) {
    const fs::path design =
        Write("grating.toml", kBase +
                                  "[lattice]\nkind = \"line\"\ncount = 10\n"
                                  "spacing = " +
                                  std::to_string(spacing) + "\n[steer]\ntheta = 90\nphi = 60\n");
    const auto r = Lobecast("synth " + Quote(design.string()) + " -o " +
                            Quote((design.parent_path() / "g.toml").string()));
    ASSERT_EQ(r.exit_code, 0) << r.out;
    if (spacing > 2.0 / 3.0) {
      EXPECT_THAT(r.out, HasSubstr("warning: a grating lobe enters visible space at theta 90 deg"));
      EXPECT_THAT(r.out, HasSubstr("grating      WARNING"));
    } else {
      EXPECT_THAT(r.out, Not(HasSubstr("grating lobe")));
      EXPECT_THAT(r.out, HasSubstr("grating      none"));
    }
  }
}

}  // namespace
}  // namespace lobecast
