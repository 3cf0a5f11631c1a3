// `lobecast size` end to end: the sample requirements give candidate files that
// synth and compute accept, the table and JSON, and located refusals (exit 2) that
// write nothing.
#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using testing::Quote;

testing::RunOutput Lobecast(const std::string& args) {
  return testing::RunShell(std::string(LOBECAST_EXE) + " " + args + " 2>&1");
}

const std::string kSample = std::string(LOBECAST_SAMPLES) + "/requirements-kestrel-relay.toml";

fs::path Fresh(const std::string& name) {
  const fs::path d = testing::TempWorkDir("lobecast-size-test", name);
  fs::remove_all(d);
  fs::create_directories(d);
  return d;
}

TEST(SizeCli, SampleWritesCandidatesThatSynthAndComputeAccept) {
  const fs::path dir = Fresh("sample");
  const auto run = Lobecast("size " + Quote(kSample) + " -o " + Quote(dir.string()));
  ASSERT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("rank  lattice"));
  EXPECT_THAT(run.out, HasSubstr("dBi"));
  EXPECT_THAT(run.out, HasSubstr("candidate 1: meets"));
  EXPECT_THAT(run.out, ::testing::Not(HasSubstr("NOT MET")));
  for (int k = 1; k <= 4; ++k) {
    const fs::path c = dir / ("candidate-" + std::to_string(k) + ".toml");
    ASSERT_TRUE(fs::exists(c)) << c;
  }
  EXPECT_FALSE(fs::exists(dir / "candidate-5.toml"));
  const std::string first = (dir / "candidate-1.toml").string();
  const auto synth = Lobecast("synth " + Quote(first) + " -o " + Quote((dir / "a.toml").string()));
  EXPECT_EQ(synth.exit_code, 0) << synth.out;
  EXPECT_THAT(synth.out, HasSubstr("grating      none"));
  const auto compute =
      Lobecast("compute " + Quote(first) + " -q -o " + Quote((dir / "c1.h5").string()));
  EXPECT_EQ(compute.exit_code, 0) << compute.out;
  const auto report = Lobecast("report " + Quote((dir / "c1.h5").string()) + " --json");
  EXPECT_EQ(report.exit_code, 0);
  EXPECT_THAT(report.out, HasSubstr("directivity_dbi"));
}

TEST(SizeCli, JsonListsComputedBesidePredicted) {
  const fs::path dir = Fresh("json");
  const auto run = testing::RunShell(std::string(LOBECAST_EXE) + " size " + Quote(kSample) +
                                     " --json -o " + Quote(dir.string()) + " 2>/dev/null");
  ASSERT_EQ(run.exit_code, 0);
  EXPECT_EQ(run.out.front(), '{');
  for (const char* key : {"\"format\": \"lobecast.sizing\"", "\"predicted\"", "\"computed\"",
                          "\"meets\": true", "\"grating_margin\"", "\"binding\": []"})
    EXPECT_THAT(run.out, HasSubstr(key));
}

TEST(SizeCli, BrokenRequirementsAreLocatedAndWriteNothing) {
  const fs::path dir = Fresh("broken");
  struct Case {
    std::string text, message;
  };
  const Case cases[] = {
      {"frequency = \"10 GHz\"\nsidelobe_db = -25\n", "neither directivity_dbi nor beamwidth_deg"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = 5\n",
       ":3:15: key 'sidelobe_db': found 5, expected a level in dB re the peak in [-60, -10]"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = -25\nscan_deg = 95\n",
       "key 'scan_deg': found 95"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = -25\nground_height = 0.01\n",
       "key 'ground_height': found a ground height without a ground plane"},
      // Circular polarization is sized (crossed pairs); its axial-ratio limit is
      // checked, and refused with linear elements.
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = -25\npolarization = "
       "\"rhcp\"\naxial_ratio_db = 25\n",
       ":5:18: key 'axial_ratio_db': found 25, expected a limit in (0, 20] dB"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = -25\naxial_ratio_db = 3\n",
       "key 'axial_ratio_db': found an axial-ratio limit with linear polarization"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_db = -25\nmax_aperture = 0.001\n",
       "room for two elements"},
      {"frequency = \"10 GHz\"\ndirectivity_dbi = 25\nsidelobe_dB = -25\n", "key 'sidelobe_dB'"},
  };
  for (const Case& c : cases) {
    const fs::path req = dir / "req.toml";
    std::ofstream(req) << c.text;
    const auto run = Lobecast("size " + Quote(req.string()) + " -o " + Quote(dir.string()));
    EXPECT_EQ(run.exit_code, 2) << c.text << run.out;
    EXPECT_THAT(run.out, HasSubstr(c.message)) << c.text;
    EXPECT_THAT(run.out, HasSubstr("lobecast: ")) << c.text;
    EXPECT_FALSE(fs::exists(dir / "candidate-1.toml")) << c.text;
  }
}

TEST(SizeCli, TheOutputFolderMustExist) {
  const fs::path dir = Fresh("nofolder");
  const auto run = Lobecast("size " + Quote(kSample) + " -o " + Quote((dir / "missing").string()));
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr("does not create folders"));
  const auto dash = Lobecast("size " + Quote(kSample) + " -o -");
  EXPECT_EQ(dash.exit_code, 2);
  EXPECT_THAT(dash.out, HasSubstr("expected a folder"));
  EXPECT_TRUE(fs::is_empty(dir));
}

TEST(SizeCli, AnUnmeetableSetIsAnAnswer) {
  const fs::path dir = Fresh("unmeetable");
  const fs::path req = dir / "req.toml";
  std::ofstream(req) << "frequency = \"10 GHz\"\ndirectivity_dbi = 30\nsidelobe_db = -25\n"
                        "scan_deg = 30\nground = \"pec\"\nmax_elements = 100\nlattice = "
                        "\"rectangular\"\n";
  const auto run = Lobecast("size " + Quote(req.string()) + " -o " + Quote(dir.string()));
  EXPECT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("NOT MET within the constraints"));
  EXPECT_THAT(run.out, HasSubstr("bound by max_elements"));
  EXPECT_THAT(run.out, HasSubstr("dB short"));
  EXPECT_TRUE(fs::exists(dir / "candidate-1.toml"));
}

}  // namespace
}  // namespace lobecast
