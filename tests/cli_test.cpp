// End to end through the `lobecast` executable: every sample array computed and
// its HDF5 result checked against the engine run in-process; the bad-input corpus
// rejected with exit code 2, a located message, and no output file.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "bad_corpus.h"
#include "cli_util.h"
#include "engine/pattern.h"
#include "io/hdf5/result_reader.h"
#include "io/input/array_reader.h"
#include "io/input/solve_circuit.h"

namespace fs = std::filesystem;
using ::testing::HasSubstr;

namespace lobecast {
namespace {

using testing::Quote;
using testing::RunOutput;
using testing::SampleArrays;

// Runs a shell command, capturing stdout+stderr and the exit code.
RunOutput RunCommand(const std::string& command) { return testing::RunShell(command + " 2>&1"); }

fs::path WorkDir(const std::string& name) {
  return testing::TempWorkDir("lobecast-cli-test", name);
}

double MaxAbsDiff(const Eigen::VectorXcd& a, const Eigen::VectorXcd& b) {
  return (a - b).cwiseAbs().maxCoeff();
}

class SampleArray : public ::testing::TestWithParam<std::string> {};

TEST_P(SampleArray, ComputedResultMatchesTheEngine) {
  const std::string input = GetParam();
  const fs::path out = WorkDir("samples") / (fs::path(input).stem().string() + ".h5");
  fs::remove(out);
  const RunOutput run = RunCommand(std::string(LOBECAST_EXE) + " compute " + Quote(input) + " -o " +
                                   Quote(out.string()));
  ASSERT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("dBi"));
  EXPECT_THAT(run.out, HasSubstr("not an RF-exposure"));
  ASSERT_TRUE(fs::exists(out));

  const StoredResult stored = ReadResult(out.string());
  ArrayDescription desc = ReadArrayDescription(input);
  SolveArrayCircuit(desc, 0);  // driven and loaded dipoles: the solved currents
  const PatternResult direct = ComputePattern(desc.array, desc.currents, desc.grid);

  EXPECT_EQ(stored.format_version, 1);
  EXPECT_EQ(stored.metadata.input_text, desc.source_text);
  EXPECT_EQ(stored.metadata.name, desc.name);
  ASSERT_EQ(stored.array.size(), desc.array.size());
  EXPECT_DOUBLE_EQ(stored.array.frequency_hz, desc.array.frequency_hz);
  EXPECT_EQ(stored.array.ground, desc.array.ground);
  ASSERT_EQ(stored.result.grid.theta_deg, direct.grid.theta_deg);
  ASSERT_EQ(stored.result.grid.phi_deg, direct.grid.phi_deg);

  // The file holds what the engine computes (bit-for-bit up to the thread split,
  // which does not change per-direction sums; allow rounding anyway).
  const double peak = std::sqrt(direct.field.e_theta.cwiseAbs2().maxCoeff() +
                                direct.field.e_phi.cwiseAbs2().maxCoeff());
  EXPECT_LE(MaxAbsDiff(stored.result.field.e_theta, direct.field.e_theta), 1e-13 * peak);
  EXPECT_LE(MaxAbsDiff(stored.result.field.e_phi, direct.field.e_phi), 1e-13 * peak);
  EXPECT_NEAR(stored.result.radiated_power_w, direct.radiated_power_w,
              1e-14 * direct.radiated_power_w);
  EXPECT_LE((stored.result.directivity - direct.directivity).cwiseAbs().maxCoeff(),
            1e-12 * direct.directivity.maxCoeff());
  EXPECT_LE((stored.result.resistance_ohm - direct.resistance_ohm).cwiseAbs().maxCoeff(),
            1e-14 * direct.resistance_ohm.cwiseAbs().maxCoeff());
  for (std::size_t n = 0; n < desc.array.size(); ++n) {
    EXPECT_LE((stored.array.dipoles[n].position_m - desc.array.dipoles[n].position_m).norm(),
              1e-15 + 1e-15 * desc.array.dipoles[n].position_m.norm());
    EXPECT_EQ(stored.currents[static_cast<Eigen::Index>(n)],
              desc.currents[static_cast<Eigen::Index>(n)]);
  }
}

INSTANTIATE_TEST_SUITE_P(Samples, SampleArray, ::testing::ValuesIn(SampleArrays()),
                         [](const ::testing::TestParamInfo<std::string>& info) {
                           std::string n = fs::path(info.param).stem().string();
                           for (char& c : n) {
                             if (!std::isalnum(static_cast<unsigned char>(c))) c = '_';
                           }
                           return n;
                         });

TEST(Samples, AtLeastFiveDemoArrays) { EXPECT_GE(SampleArrays().size(), 5u); }

TEST(Samples, CheckDescribesWithoutWriting) {
  const fs::path dir = WorkDir("check");
  const std::string input = std::string(LOBECAST_SAMPLES) + "/turnstile.toml";
  const RunOutput run =
      RunCommand("cd " + Quote(dir.string()) + " && " + LOBECAST_EXE + " check " + Quote(input));
  ASSERT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("401.5 MHz"));
  EXPECT_THAT(run.out, HasSubstr("wavelength"));
  EXPECT_TRUE(fs::is_empty(dir));
}

TEST(Samples, CheckShowsTheSolvedCurrentsOfDrivenAndLoadedDipoles) {
  // The dipole table comes after the circuit solve: no "0 A" for a driven element.
  const fs::path dir = WorkDir("check-coupled");
  const std::string input = std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml";
  const RunOutput run =
      RunCommand("cd " + Quote(dir.string()) + " && " + LOBECAST_EXE + " check " + Quote(input));
  ASSERT_EQ(run.exit_code, 0) << run.out;
  const std::size_t table = run.out.find("dipoles ");
  const std::size_t circuit = run.out.find("circuit ");
  ASSERT_NE(table, std::string::npos) << run.out;
  ASSERT_NE(circuit, std::string::npos) << run.out;
  EXPECT_EQ(run.out.substr(table, circuit - table).find(" 0 A "), std::string::npos) << run.out;
}

TEST(Cli, DefaultOutputNameComesFromTheInput) {
  const fs::path dir = WorkDir("default-name");
  const std::string input = std::string(LOBECAST_SAMPLES) + "/single-dipole.toml";
  const RunOutput run = RunCommand("cd " + Quote(dir.string()) + " && " + LOBECAST_EXE +
                                   " compute --quiet " + Quote(input));
  ASSERT_EQ(run.exit_code, 0) << run.out;
  EXPECT_TRUE(run.out.empty()) << run.out;
  EXPECT_TRUE(fs::exists(dir / "single-dipole.h5"));
}

TEST(Cli, VersionAndHelp) {
  RunOutput v = RunCommand(std::string(LOBECAST_EXE) + " --version");
  EXPECT_EQ(v.exit_code, 0);
  EXPECT_THAT(v.out, HasSubstr("lobecast "));
  RunOutput h = RunCommand(std::string(LOBECAST_EXE) + " compute --help");
  EXPECT_EQ(h.exit_code, 0);
  EXPECT_THAT(h.out, HasSubstr("--threads"));
  EXPECT_THAT(h.out, HasSubstr("(V)"));
  RunOutput bad = RunCommand(std::string(LOBECAST_EXE) + " compute --no-such-option x.toml");
  EXPECT_EQ(bad.exit_code, 2) << bad.out;
}

TEST(Cli, ThreadCountDoesNotChangeTheResult) {
  const fs::path dir = WorkDir("threads");
  const std::string input = std::string(LOBECAST_SAMPLES) + "/planar-4x4-ground.toml";
  ASSERT_EQ(RunCommand(std::string(LOBECAST_EXE) + " compute -q -t 1 " + Quote(input) + " -o " +
                       Quote((dir / "t1.h5").string()))
                .exit_code,
            0);
  ASSERT_EQ(RunCommand(std::string(LOBECAST_EXE) + " compute -q -t 2 " + Quote(input) + " -o " +
                       Quote((dir / "t2.h5").string()))
                .exit_code,
            0);
  const StoredResult a = ReadResult((dir / "t1.h5").string());
  const StoredResult b = ReadResult((dir / "t2.h5").string());
  const double peak = a.result.field.e_theta.cwiseAbs().maxCoeff();
  EXPECT_LE(MaxAbsDiff(a.result.field.e_theta, b.result.field.e_theta), 1e-13 * peak);
  EXPECT_LE(MaxAbsDiff(a.result.field.e_phi, b.result.field.e_phi), 1e-13 * peak);
}

// --------------------------------------------------------------- bad input

using lobecast::testing::BadCase;

class BadInputCli : public ::testing::TestWithParam<BadCase> {};

TEST_P(BadInputCli, ExitTwoLocatedMessageNothingWritten) {
  const BadCase& c = GetParam();
  ASSERT_FALSE(c.Get("line").empty()) << c.path << ": no '# expect:' header";
  const fs::path dir = WorkDir("bad");
  const fs::path out = dir / (fs::path(c.path).stem().string() + ".h5");
  // An existing target must survive a rejected run untouched.
  { std::ofstream(out) << "precious"; }
  const RunOutput run = RunCommand(std::string(LOBECAST_EXE) + " compute " + Quote(c.path) +
                                   " -o " + Quote(out.string()));
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr(c.MessageFile() + ":" + c.Get("line") + ":"));
  if (!c.Get("key").empty()) {
    EXPECT_THAT(run.out, HasSubstr("key '" + c.Get("key")));
  }
  std::ifstream in(out);
  std::string content((std::istreambuf_iterator<char>(in)), {});
  EXPECT_EQ(content, "precious");
  // No temporary left beside it either.
  for (const auto& e : fs::directory_iterator(dir)) {
    EXPECT_EQ(e.path().string().find(".tmp"), std::string::npos) << e.path();
  }
  fs::remove(out);

  const RunOutput check = RunCommand(std::string(LOBECAST_EXE) + " check " + Quote(c.path));
  EXPECT_EQ(check.exit_code, 2) << check.out;
}

INSTANTIATE_TEST_SUITE_P(
    Corpus, BadInputCli,
    ::testing::ValuesIn(lobecast::testing::BadCases(std::string(LOBECAST_TESTS_DIR) + "/data/bad")),
    [](const ::testing::TestParamInfo<BadCase>& info) {
      return lobecast::testing::CaseName(info.param);
    });

TEST(Cli, LongDipoleWarnsButRuns) {
  const fs::path dir = WorkDir("warn");
  const fs::path toml = dir / "long.toml";
  std::ofstream(toml) << "frequency = \"300 MHz\"\n[grid]\ntheta = { start = 0, stop = 180, "
                         "step = 10 }\nphi = { start = 0, stop = 360, step = 30 }\n"
                         "[[dipole]]\nposition = [0, 0, 0]\norientation = [0, 0, 1]\n"
                         "length = 0.2\ncurrent = { magnitude = 1 }\n";
  const RunOutput run =
      RunCommand(std::string(LOBECAST_EXE) + " compute -q " + Quote(toml.string()) + " -o " +
                 Quote((dir / "long.h5").string()));
  EXPECT_EQ(run.exit_code, 0) << run.out;
  EXPECT_THAT(run.out, HasSubstr("long.toml:8:"));
  EXPECT_THAT(run.out, HasSubstr("warning"));
}

TEST(Cli, OutputInAMissingFolderIsRefusedBeforeComputing) {
  const std::string input = std::string(LOBECAST_SAMPLES) + "/single-dipole.toml";
  const RunOutput run = RunCommand(std::string(LOBECAST_EXE) + " compute -q " + Quote(input) +
                                   " -o /nonexistent-dir/x.h5");
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr("/nonexistent-dir"));
  EXPECT_FALSE(fs::exists("/nonexistent-dir"));
}

TEST(Cli, FailureWhileWritingExitsOneAndLeavesNothing) {
  // /proc exists but takes no new files (not even as root): the file cannot be
  // created -- a failure while running (exit 1), not bad input.
  const std::string input = std::string(LOBECAST_SAMPLES) + "/single-dipole.toml";
  const RunOutput run = RunCommand(std::string(LOBECAST_EXE) + " compute -q " + Quote(input) +
                                   " -o /proc/lobecast-target.h5");
  EXPECT_EQ(run.exit_code, 1) << run.out;
  EXPECT_THAT(run.out, HasSubstr("lobecast-target.h5"));
  for (const auto& e : fs::directory_iterator("/proc")) {
    EXPECT_EQ(e.path().string().find("lobecast-target"), std::string::npos) << e.path();
  }
}

TEST(Cli, AFolderOrDeviceAtTheOutputPathIsRefusedUntouched) {
  // The result is renamed into place, which would replace a folder or a device
  // (-o /dev/null as root): refused before any work, as bad input.
  const fs::path dir = WorkDir("not-regular");
  fs::create_directories(dir / "target.h5");
  const std::string input = std::string(LOBECAST_SAMPLES) + "/single-dipole.toml";
  const RunOutput run = RunCommand(std::string(LOBECAST_EXE) + " compute -q " + Quote(input) +
                                   " -o " + Quote((dir / "target.h5").string()));
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr("not a regular file"));
  EXPECT_TRUE(fs::is_directory(dir / "target.h5"));
  for (const auto& e : fs::directory_iterator(dir)) {
    EXPECT_EQ(e.path().string().find(".tmp"), std::string::npos) << e.path();
  }
}

TEST(Cli, AnArrayFileWhereAResultIsExpectedIsBadInput) {
  // report/export/plot read result files; handing them the TOML is a user slip
  // (exit 2), not a failure while running.
  const std::string toml = std::string(LOBECAST_SAMPLES) + "/turnstile.toml";
  const RunOutput report = RunCommand(std::string(LOBECAST_EXE) + " report " + Quote(toml));
  EXPECT_EQ(report.exit_code, 2) << report.out;
  EXPECT_THAT(report.out, HasSubstr("not an HDF5 file"));
  const RunOutput exp = RunCommand(std::string(LOBECAST_EXE) + " export " + Quote(toml));
  EXPECT_EQ(exp.exit_code, 2) << exp.out;
}

TEST(Cli, CheckRejectsCurrentsThatOverflow) {
  const fs::path dir = WorkDir("overflow");
  const fs::path toml = dir / "huge.toml";
  std::ofstream(toml) << "frequency = 1e9\n[[dipole]]\nposition = [0, 0, 0]\n"
                         "orientation = [0, 0, 1]\nlength = 0.01\n"
                         "current = { magnitude = 1e300 }\n";
  EXPECT_EQ(RunCommand(std::string(LOBECAST_EXE) + " check " + Quote(toml.string())).exit_code, 2);
  const RunOutput run =
      RunCommand(std::string(LOBECAST_EXE) + " compute -q " + Quote(toml.string()) + " -o " +
                 Quote((dir / "huge.h5").string()));
  EXPECT_EQ(run.exit_code, 2) << run.out;
  EXPECT_THAT(run.out, HasSubstr("overflows"));
  EXPECT_FALSE(fs::exists(dir / "huge.h5"));
}

TEST(Cli, PowerMethodQuadratureIsStoredAndItsMisusesRefused) {
  // --power-method quadrature: P within the bound the file stores of the closed
  // form's, no active resistances (NaN, with the note); the options that cannot go
  // with it are refused before any work (exit 2, nothing written).
  const fs::path dir = WorkDir("power_method");
  const std::string toml = std::string(LOBECAST_SAMPLES) + "/planar-4x4-ground.toml";
  const std::string exe = std::string(LOBECAST_EXE) + " compute " + Quote(toml) + " --no-analysis";
  const RunOutput q =
      RunCommand(exe + " --power-method quadrature -o " + Quote((dir / "q.h5").string()));
  ASSERT_EQ(q.exit_code, 0) << q.out;
  EXPECT_THAT(q.out, HasSubstr("band-limited quadrature, within"));
  EXPECT_THAT(q.out, HasSubstr("active resistance: not computed"));
  const RunOutput c =
      RunCommand(exe + " --power-method closed -q -o " + Quote((dir / "c.h5").string()));
  ASSERT_EQ(c.exit_code, 0) << c.out;
  const StoredResult sq = ReadResult((dir / "q.h5").string());
  const StoredResult sc = ReadResult((dir / "c.h5").string());
  EXPECT_EQ(sq.result.summary.power_route, PowerRoute::kQuadrature);
  EXPECT_GT(sq.result.summary.power_error_bound_relative, 0.0);
  EXPECT_LE(std::abs(sq.result.radiated_power_w - sc.result.radiated_power_w),
            sq.result.summary.power_error_bound_relative * sq.result.radiated_power_w +
                1e-14 * sc.result.radiated_power_w);
  EXPECT_TRUE(sq.result.active_resistance_ohm.array().isNaN().all());
  EXPECT_EQ(sc.result.summary.power_route, PowerRoute::kMatrix);
  for (const std::string& bad :
       {std::string(" --power-method quadrature --resistance-matrix"),
        std::string(" --power-method closed --power-tolerance 1e-8"),
        std::string(" --power-method numeric"), std::string(" --power-tolerance 0.5")}) {
    const fs::path out = dir / "bad.h5";
    const RunOutput r = RunCommand(exe + bad + " -o " + Quote(out.string()));
    EXPECT_EQ(r.exit_code, 2) << bad << ": " << r.out;
    EXPECT_THAT(r.out, HasSubstr("lobecast: ")) << bad;
    EXPECT_FALSE(fs::exists(out)) << bad;
  }
}

}  // namespace
}  // namespace lobecast
