// lobecast as a Unix tool, end to end: a new user's misuse cases each get one
// `lobecast: ...` line on stderr (what was found, what was expected), the exit code
// of CONVENTIONS §4 (2 bad input, 1 run failure) and leave nothing behind; `-o -`
// gives standard output the same bytes as `-o FILE`; `-q` silences every command;
// the terminal carries the safety note as one stderr line.
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::Not;
using testing::Quote;

struct Outcome {
  int code = -1;
  std::string out, err;
};

fs::path Work(const std::string& name) { return testing::TempWorkDir("lobecast-unix-test", name); }

// `lobecast ARGS` run in `cwd`, stdout and stderr captured apart.
Outcome Lobecast(const std::string& args, const fs::path& cwd = Work("cwd")) {
  const fs::path err = Work("stderr") / "err.txt";
  const testing::RunOutput r =
      testing::RunShell("cd " + Quote(cwd.string()) + " && " + std::string(LOBECAST_EXE) + " " +
                        args + " 2>" + Quote(err.string()));
  return {r.exit_code, r.out, testing::ReadFile(err)};
}

std::string Sample(const std::string& name) {
  return Quote(std::string(LOBECAST_SAMPLES) + "/" + name);
}

// A result of the single-dipole sample, computed once.
const std::string& Result() {
  static const std::string path = [] {
    const fs::path p = Work("inputs") / "single.h5";
    fs::remove(p);
    const Outcome r = Lobecast("compute -q " + Sample("single-dipole.toml") + " -o " + Quote(p));
    EXPECT_EQ(r.code, 0) << r.err;
    return p.string();
  }();
  return path;
}

std::size_t Lines(const std::string& s) {
  std::size_t n = 0;
  for (char c : s) n += c == '\n';
  return n;
}

TEST(UnixCli, MisuseGetsOneLineTheRightCodeAndWritesNothing) {
  const std::string result = Quote(Result());
  const fs::path in = Work("inputs");
  // A truncated result (an interrupted copy), and an HDF5 file of another kind.
  {
    const std::string whole = testing::ReadFile(Result());
    std::ofstream(in / "truncated.h5", std::ios::binary) << whole.substr(0, whole.size() / 3);
  }
  const fs::path scan_h5 = in / "scan.h5";
  fs::remove(scan_h5);
  ASSERT_EQ(Lobecast("scan -q " + Sample("parasitic-beacon.toml") +
                     " --theta-stop 30 --step 30 "
                     "-o " +
                     Quote(scan_h5))
                .code,
            0);
  // An element table saved by a spreadsheet in a decimal-comma locale.
  std::ofstream(in / "semicolon.csv") << "x;y;z;ux;uy;uz;length;magnitude;phase\n"
                                         "0;0;0;0;0;1;0,01;1;0\n";
  std::ofstream(in / "semicolon.toml") << "frequency = 1e8\ndipoles_csv = \"semicolon.csv\"\n";
  std::ofstream(in / "h5-table.toml") << "frequency = 1e8\ndipoles_csv = \"single.h5\"\n";
  // A copy of an array, for the case that names it as its own output.
  fs::copy_file(std::string(LOBECAST_SAMPLES) + "/single-dipole.toml", in / "copy.toml",
                fs::copy_options::overwrite_existing);
  const std::string copy_before = testing::ReadFile(in / "copy.toml");
  const std::string result_before = testing::ReadFile(Result());

  const fs::path out = Work("out");  // every case would write here; it must stay empty
  fs::remove_all(out);
  fs::create_directories(out);
  const std::string o = " -o " + Quote(out / "r.h5");
  const std::string array = Sample("single-dipole.toml");
  struct Case {
    std::string args;
    int code;
    std::string says;  // part of the message
  };
  const std::vector<Case> cases = {
      // CLI11's own errors, reworded
      {"frobnicate", 2, "found 'frobnicate', expected a command: compute, check"},
      {"compute", 2, "missing ARRAY"},
      {"compute " + array + o + " --bogus", 2, "found '--bogus', which is not an option"},
      {"compute " + array + o + " --threads", 2, "--threads: found no value"},
      // numbers printed as written: no 300-digit bound, no 0.000000 for 1e-14
      {"compute " + array + o + " --threads -1", 2,
       "--threads: found -1, expected a whole number >= 0 (0 = all cores)"},
      {"compute " + array + o + " --threads many", 2, "--threads: found 'many'"},
      {"compute " + array + o + " --tolerance 1", 2,
       "--tolerance: found 1, expected a number in 1e-14 .. 0.01"},
      {"compute " + array + o + " --method fastt", 2,
       "--method: found 'fastt', expected direct, fast or auto"},
      {"scan " + Sample("parasitic-beacon.toml") + " --step 0", 2,
       "--step: found 0, expected a number in 0.001 .. 180 deg"},
      // files that are not what they should be
      {"compute " + Quote(in / "nothing.toml") + o, 2,
       "'" + (in / "nothing.toml").string() + "', which does not exist"},
      {"compute " + result + o, 2, "found an HDF5 file (a lobecast result?), expected an array"},
      {"report " + Quote(in / "truncated.h5"), 2, "not a complete lobecast result"},
      {"export " + Quote(scan_h5) + " -o " + Quote(out / "t.csv"), 2,
       "not a complete lobecast result: the root attribute format is"},
      {"report " + array, 2, "not an HDF5 file"},
      {"compute " + Quote(in / "semicolon.toml") + o, 2, "cells separated by ';'"},
      {"check " + Quote(in / "h5-table.toml"), 2,
       "key 'dipoles_csv': found \"single.h5\", an HDF5"},
      // outputs: '-' only for text, folders never created
      {"compute " + array + " -o -", 2, "an HDF5 result is binary"},
      {"plot " + result + " -o -", 2, "an image is binary"},
      {"compute " + array + " -o " + Quote(out / "new" / "r.h5"), 2, "does not exist"},
      {"compute " + array + o + " --plots " + Quote(out / "plots"), 2, "does not exist"},
      {"export " + result + " -o " + Quote(out / "new" / "t.csv"), 2, "does not exist"},
      // options that do not apply to what was asked
      {"compute " + array + o + " --method direct --tolerance 1e-6", 2,
       "--tolerance: found it with --method direct"},
      {"compute " + array + o + " --no-analysis --reference x", 2, "--reference: found it with"},
      {"plot " + result + " --kind map --cut phi=0 -o " + Quote(out / "m.png"), 2,
       "--cut: found it with --kind map"},
      {"plot " + result + " --projection uv -o " + Quote(out / "m.png"), 2,
       "--projection: found it with --kind polar"},
      {"plot " + result + " --kind map --reference x -o " + Quote(out / "m.png"), 2,
       "--reference: found it with --quantity directivity (the map's default)"},
      {"export " + result + " --cut phi=0 --step 2 -o " + Quote(out / "t.csv"), 2,
       "--step: found it with --cut phi=0"},
      {"export " + result + " --step 2 -o " + Quote(out / "t.csv"), 2,
       "--step: found it with the whole grid"},
      {"export " + result + " --cut phi=0 --at 10,20", 2, "--cut: found together with --at"},
      {"export " + result + " --format xlsx", 2, "--format: found 'xlsx', expected csv or tsv"},
      {"report " + result + " --reference z", 2, "expected x, y, rhcp, lhcp, theta, phi or auto"},
      {"report " + result + " --toward 1", 2, "--toward: found '1', expected THETA,PHI in deg"},
      {"report " + result + " --null-threshold 5", 2,
       "--null-threshold: found 5 dB, expected a level below 0 dB"},
      {"scan " + Sample("parasitic-beacon.toml") + " --theta-start 50 --theta-stop 10", 2,
       "--theta-stop: found 10 deg, below --theta-start 50 deg"},
      // an output that names the input is refused, never written over it
      {"compute " + Quote(in / "copy.toml") + " -o " + Quote(in / "copy.toml"), 2,
       "the input file itself"},
      {"export " + result + " -o " + result, 2, "--output: found '" + Result() + "', the input"},
      {"report " + result + " -o " + result, 2, "the input file itself"},
  };
  for (const Case& c : cases) {
    const Outcome r = Lobecast(c.args);
    EXPECT_EQ(r.code, c.code) << c.args << "\n" << r.err;
    EXPECT_TRUE(r.err.starts_with("lobecast: ")) << c.args << "\n" << r.err;
    EXPECT_EQ(Lines(r.err), 1u) << c.args << "\n" << r.err;
    EXPECT_THAT(r.err, HasSubstr(c.says)) << c.args;
    for (const char* raw : {"Run with --help", "o_flags", "eof =", ".tmp-", "179769", "0.000000"}) {
      EXPECT_THAT(r.err, Not(HasSubstr(raw))) << c.args;
    }
    EXPECT_EQ(r.out, "") << c.args;
    EXPECT_TRUE(fs::is_empty(out)) << c.args << ": wrote " << fs::directory_iterator(out)->path();
    EXPECT_TRUE(fs::is_empty(Work("cwd"))) << c.args << ": wrote into the working folder";
    fs::remove_all(out);
    fs::create_directories(out);
  }
  EXPECT_EQ(testing::ReadFile(in / "copy.toml"), copy_before);
  EXPECT_EQ(testing::ReadFile(Result()), result_before);
}

// A failure while running (here: a folder the user may not write) is exit 1, with
// the system's reason and none of HDF5's internals or temporary names.
TEST(UnixCli, AnUnwritableFolderIsARunFailure) {
  if (geteuid() == 0) GTEST_SKIP() << "root writes into read-only folders";
  const fs::path locked = Work("locked");
  fs::permissions(locked, fs::perms::owner_read | fs::perms::owner_exec);
  const Outcome r =
      Lobecast("compute " + Sample("single-dipole.toml") + " -o " + Quote(locked / "r.h5"));
  fs::permissions(locked, fs::perms::owner_all);
  EXPECT_EQ(r.code, 1) << r.err;
  EXPECT_TRUE(r.err.starts_with("lobecast: ")) << r.err;
  EXPECT_THAT(r.err, HasSubstr("Permission denied"));
  EXPECT_THAT(r.err, Not(HasSubstr("o_flags")));
  EXPECT_THAT(r.err, Not(HasSubstr(".tmp-")));
  EXPECT_TRUE(fs::is_empty(locked));
}

// /sys refuses new files even to root: every writer says so as a run failure.
TEST(UnixCli, AFolderThatRefusesFilesIsARunFailureForEveryWriter) {
  if (!fs::is_directory("/sys")) GTEST_SKIP() << "no /sys";
  for (const std::string& args :
       {"compute -q " + Sample("single-dipole.toml") + " -o /sys/lobecast-test.h5",
        "scan -q " + Sample("parasitic-beacon.toml") + " --theta-stop 30 -o /sys/lobecast.h5",
        "scan -q " + Sample("parasitic-beacon.toml") + " --theta-stop 30 -o /sys/lobecast.csv",
        "export " + Quote(Result()) + " -o /sys/lobecast-test.csv",
        "report " + Quote(Result()) + " -o /sys/lobecast-test.txt",
        "plot " + Quote(Result()) + " -o /sys/lobecast-test.png"}) {
    const Outcome r = Lobecast(args);
    EXPECT_EQ(r.code, 1) << args << "\n" << r.err;
    EXPECT_TRUE(r.err.starts_with("lobecast: /sys/lobecast")) << args << "\n" << r.err;
    EXPECT_EQ(Lines(r.err), 1u) << args << "\n" << r.err;
    for (const char* raw : {"HDF5-DIAG", "o_flags", ".tmp-"}) {
      EXPECT_THAT(r.err, Not(HasSubstr(raw))) << args;
    }
  }
}

// `-o -` writes to standard output exactly what `-o FILE` writes to the file.
TEST(UnixCli, DashIsStandardOutputForEveryTextOutput) {
  const std::string result = Quote(Result());
  const fs::path dir = Work("dash");
  const std::vector<std::pair<std::string, std::string>> outputs = {
      {"report " + result, "report.txt"},
      {"report --json " + result, "report.json"},
      {"export " + result + " --cut phi=0", "cut.csv"},
      {"export " + result + " --cut theta=90 --decimal-comma --format csv", "cone.csv"},
      {"scan -q " + Sample("parasitic-beacon.toml") + " --theta-stop 60 --step 30", "scan.csv"},
  };
  for (const auto& [args, name] : outputs) {
    const fs::path file = dir / name;
    fs::remove(file);
    const Outcome to_file = Lobecast(args + " -o " + Quote(file));
    ASSERT_EQ(to_file.code, 0) << args << "\n" << to_file.err;
    EXPECT_EQ(to_file.out, "") << args;
    const Outcome dash = Lobecast(args + " -o -");
    ASSERT_EQ(dash.code, 0) << args << "\n" << dash.err;
    EXPECT_FALSE(dash.out.empty()) << args;
    EXPECT_EQ(dash.out, testing::ReadFile(file)) << args;
  }
  // Without -q, scan's own table still stays off a `-o -` stream.
  const Outcome scan =
      Lobecast("scan " + Sample("parasitic-beacon.toml") + " --theta-stop 60 --step 30 -o -");
  ASSERT_EQ(scan.code, 0) << scan.err;
  EXPECT_TRUE(scan.out.starts_with("theta_deg,phi_deg,element,")) << scan.out;
}

// -q silences every command; the requested output itself still comes.
TEST(UnixCli, QuietMeansQuietEverywhere) {
  const std::string result = Quote(Result());
  const fs::path dir = Work("quiet");
  fs::remove_all(dir);
  fs::create_directories(dir);
  for (const std::string& args :
       {"check -q " + Sample("single-dipole.toml"),
        "compute -q " + Sample("single-dipole.toml") + " -o " + Quote(dir / "r.h5"),
        "report -q " + result + " -o " + Quote(dir / "r.txt"),
        "export -q " + result + " -o " + Quote(dir / "r.csv"),
        "plot -q " + result + " -o " + Quote(dir / "r.png"),
        "scan -q " + Sample("parasitic-beacon.toml") + " --theta-stop 30 -o " +
            Quote(dir / "s.csv")}) {
    const Outcome r = Lobecast(args);
    EXPECT_EQ(r.code, 0) << args << "\n" << r.err;
    EXPECT_EQ(r.out, "") << args;
    EXPECT_EQ(r.err, "") << args;
  }
  EXPECT_EQ(std::distance(fs::directory_iterator(dir), fs::directory_iterator()), 5);
}

// The terminal gets the safety note as one line on stderr; reports keep it whole.
TEST(UnixCli, SafetyNoteIsOneStderrLineInTheTerminal) {
  const fs::path out = Work("note") / "r.h5";
  fs::remove(out);
  const Outcome compute = Lobecast("compute " + Sample("single-dipole.toml") + " -o " + Quote(out));
  ASSERT_EQ(compute.code, 0) << compute.err;
  EXPECT_THAT(compute.out, Not(HasSubstr("RF-exposure")));
  EXPECT_EQ(Lines(compute.err), 1u) << compute.err;
  EXPECT_THAT(compute.err, HasSubstr("lobecast: note: far-field figures"));
  const Outcome report = Lobecast("report " + Quote(out));
  ASSERT_EQ(report.code, 0) << report.err;
  EXPECT_THAT(report.out, HasSubstr("Exposure limits near"));
}

}  // namespace
}  // namespace lobecast
