// Design files end to end: `synth` and the commands that accept a design, the
// located errors of the design reader, and the grating-lobe warning.
#include <cmath>
#include <complex>
#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>
#include <Eigen/Dense>

#include "engine/constants.h"
#include "engine/synthesis/field_map.h"
#include "engine/synthesis/max_directivity.h"
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

// A design that cannot be met is refused at its [[null]] or [objective] table: exit
// 2, nothing written, nothing clobbered; validation comes first.
TEST(DesignCli, UnmeetableSynthesisIsRefusedAndNothingIsWritten) {
  const std::string lattice = "[lattice]\nkind = \"line\"\ncount = 8\nspacing = 0.5\n";
  // z dipoles along x: the unsteered beam is +y (theta 90, phi 90); a null there is
  // inside the main beam.
  const fs::path design = Write("nulls.toml", kBase + lattice + "[[null]]\ntheta = 90\nphi = 90\n");
  const fs::path out = design.parent_path() / "nulls-array.toml";
  std::ofstream(out) << "old";
  const auto r = Lobecast("synth " + Quote(design.string()) + " -o " + Quote(out.string()));
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_THAT(r.out, HasSubstr("nulls.toml:13:1: the design cannot be met"));
  EXPECT_EQ(testing::ReadFile(out), "old");
  const fs::path mixed =
      Write("mixed.toml", kBase + lattice +
                              "[[null]]\ntheta = 90\nphi = 30\n[[dipole]]\nposition = [0, 0, 1]\n"
                              "orientation = [0, 0, 1]\nlength = 0.02\n"
                              "current = { magnitude = 1, phase = 0 }\n");
  const auto c = Lobecast("compute " + Quote(mixed.string()) + " -o " +
                          Quote((design.parent_path() / "o.h5").string()));
  EXPECT_EQ(c.exit_code, 2);
  EXPECT_THAT(c.out, HasSubstr("remove the explicit [[dipole]] tables"));
  EXPECT_FALSE(fs::exists(design.parent_path() / "o.h5"));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[[null]]\ntheta = 190\nphi = 0\n"),
              HasSubstr("design.toml:14:9: key 'null[0].theta': found 190"));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[[null]]\ntheta = 80\nphi = 0\nmethod = \"lms\"\n"),
              HasSubstr("key 'null[0].method': found \"lms\""));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[objective]\nkind = \"best\"\n"),
              HasSubstr("key 'objective.kind': found \"best\""));
  // Every sampled side lobe 60 dB down is more than 8 dipoles can do with this
  // main beam.
  EXPECT_THAT(ErrorOf(kBase + lattice +
                      "[objective]\nkind = \"sidelobe-envelope\"\nsidelobe_db = -60\n"
                      "main_beam_factor = 1\n"),
              HasSubstr("the side-lobe envelope cannot be met"));
  EXPECT_THAT(ErrorOf(kBase + lattice + "[objective]\nkind = \"max-directivity\"\nmask = []\n"),
              HasSubstr("key 'objective.mask'"));
  EXPECT_THAT(ErrorOf(kBase + lattice +
                      "[taper]\nkind = \"uniform\"\n[objective]\nkind = "
                      "\"max-directivity\"\n"),
              HasSubstr("both [taper] and [objective]"));
}

// The design reader's [[null]] tables give the currents of the closed-form
// projection I0 - A^H (A A^H)^-1 A I0 (computed here independently, with Eigen's
// complete orthogonal decomposition), and the field at every null is at least
// 120 dB below the beam (issue 13's acceptance level).
TEST(DesignSynthesis, NullsAreTheClosedFormProjection) {
  const std::string panel = R"(frequency = "5.8 GHz"
ground = "pec"
length_unit = "wavelength"
[grid]
theta = { start = 0, stop = 90, step = 3 }
phi = { start = 0, stop = 360, step = 6 }
[element]
orientation = [0, 1, 0]
length = 0.05
[lattice]
kind = "rectangular"
count = [8, 4]
spacing = [0.5, 0.5]
center = [0, 0, 0.25]
[taper]
kind = "taylor"
sidelobe_db = -30
nbar = 4
[steer]
theta = 20
phi = 0
)";
  const std::string nulls = "[[null]]\ntheta = 40\nphi = 180\n[[null]]\ntheta = 55\nphi = 30\n";
  const ArrayDescription plain = ParseArrayDescription(panel, "p.toml", "");
  const ArrayDescription nulled = ParseArrayDescription(panel + nulls, "p.toml", "");
  const Directions at = Directions::FromAngles({40 * kDegree, 55 * kDegree}, {kPi, 30 * kDegree});
  const Eigen::MatrixXcd a = FieldMap(plain.array, at);
  const Eigen::VectorXcd i0 = plain.currents;
  const Eigen::VectorXcd expected =
      i0 - a.adjoint() * (a * a.adjoint()).completeOrthogonalDecomposition().solve(a * i0);
  EXPECT_LT((nulled.currents - expected).norm(), 1e-12 * i0.norm());
  const Directions beam = Directions::FromAngles({20 * kDegree}, {0.0});
  const double beam_field = (FieldMap(nulled.array, beam) * nulled.currents).norm();
  const Eigen::VectorXcd null_field = a * nulled.currents;
  for (int k = 0; k < 2; ++k) {
    const double e = std::hypot(std::abs(null_field[k]), std::abs(null_field[k + 2]));
    EXPECT_LT(20 * std::log10(e / beam_field + 1e-300), -120.0) << "null " << k;
  }
  ASSERT_TRUE(nulled.design->null_placement.has_value());
  // Phase-only nulling keeps every magnitude.
  std::string phase_only = nulls;
  phase_only.replace(phase_only.find("phi = 180\n"), 10, "phi = 180\nmethod = \"phase-only\"\n");
  phase_only += "method = \"phase-only\"\n";
  const ArrayDescription p = ParseArrayDescription(panel + phase_only, "p.toml", "");
  EXPECT_LT((p.currents.cwiseAbs() - i0.cwiseAbs()).norm(), 1e-9 * i0.norm());
}

// [objective] max-directivity gives the engine's optimum (MaximizeDirectivity,
// tests/max_directivity_test.cpp checks its optimality) and says plainly when it is
// superdirective: four z dipoles a tenth of a wavelength apart, endfire along x.
TEST(DesignSynthesis, MaxDirectivityIsTheEnginesOptimumAndWarns) {
  const std::string design = R"(frequency = "300 MHz"
length_unit = "wavelength"
[grid]
theta = { start = 0, stop = 180, step = 5 }
phi = { start = 0, stop = 360, step = 5 }
[element]
orientation = [0, 0, 1]
length = 0.02
[lattice]
kind = "line"
count = 4
spacing = 0.1
axis = "x"
[steer]
theta = 90
phi = 0
[objective]
kind = "max-directivity"
)";
  const ArrayDescription d = ParseArrayDescription(design, "m.toml", "");
  const MaxDirectivityResult r =
      MaximizeDirectivity(d.array, Direction{kPi / 2, 0.0}, PolarizationVector::Theta());
  // The same currents up to one complex factor (the sign of the polarization vector).
  const Complex f = d.currents[0] / r.currents_a[0];
  EXPECT_LT((d.currents - f * r.currents_a).norm(), 1e-9 * d.currents.norm());
  EXPECT_GT(r.directivity, 4.0);  // more than N: superdirective (Uzkov 1946, from memory)
  const fs::path file = Write("m.toml", design);
  const auto run = Lobecast("check " + Quote(file.string()));
  EXPECT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("WARNING: superdirective"));
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
