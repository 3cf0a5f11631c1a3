// Faults while writing, as a user meets them, on the real executable: a full disk
// for every kind of output (injected through LOBECAST_TEST_FAIL_WRITE_AFTER, so the
// check runs on any machine, and a real full tmpfs where mounting is allowed), a
// read-only folder, SIGINT and SIGTERM during the compute and during the write, a
// 250-character output name and `-o` on a symbolic link. Each failure must exit 1
// (an I/O failure, CONVENTIONS §4) with the system's reason, leave the old output
// byte for byte and leave no temporary behind.
#include <fcntl.h>
#include <signal.h>
#include <sys/mount.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::StartsWith;

constexpr const char* kPrecious = "precious: the output of an earlier run\n";

fs::path Work(const std::string& name) { return testing::TempWorkDir("lobecast-fault-test", name); }

// A fresh empty folder.
fs::path Fresh(const std::string& name) {
  const fs::path d = Work(name);
  for (const auto& e : fs::directory_iterator(d)) fs::remove_all(e.path());
  return d;
}

std::string Sample(const std::string& name) { return std::string(LOBECAST_SAMPLES) + "/" + name; }

std::vector<std::string> Names(const fs::path& dir) {
  std::vector<std::string> v;
  for (const auto& e : fs::directory_iterator(dir)) v.push_back(e.path().filename().string());
  std::sort(v.begin(), v.end());
  return v;
}

struct Outcome {
  int code = -1;         // exit status when it exited
  int signal = 0;        // the signal that ended it
  bool stopped = false;  // it stopped itself (LOBECAST_TEST_STOP_AT) and was signalled
  std::vector<std::string> left_while_stopped;  // the output folder while it was stopped
  std::string out, err;
};

// Runs lobecast with `args` and extra environment `env` ("NAME=VALUE"). With
// `signal_when_stopped`, a child that stops itself is sent that signal, then
// SIGCONT. Waits at most two minutes (a bound against a hang, not a timing check).
Outcome Lobecast(const std::vector<std::string>& args, const std::vector<std::string>& env = {},
                 int signal_when_stopped = 0, const fs::path& watch = {}) {
  const fs::path io = Work("io");
  const std::string out_path = (io / "out.txt").string(), err_path = (io / "err.txt").string();
  Outcome r;
  const pid_t pid = ::fork();
  if (pid == 0) {
    const int o = ::open(out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    const int e = ::open(err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    ::dup2(o, 1);
    ::dup2(e, 2);
    for (const std::string& kv : env) ::putenv(const_cast<char*>(kv.c_str()));
    std::vector<char*> argv = {const_cast<char*>(LOBECAST_EXE)};
    for (const std::string& a : args) argv.push_back(const_cast<char*>(a.c_str()));
    argv.push_back(nullptr);
    ::execv(LOBECAST_EXE, argv.data());
    ::_exit(127);
  }
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::minutes(2);
  int status = 0;
  for (;;) {
    const pid_t w = ::waitpid(pid, &status, WUNTRACED | WNOHANG);
    if (w == pid && WIFSTOPPED(status)) {
      r.stopped = true;
      if (!watch.empty()) r.left_while_stopped = Names(watch);
      ::kill(pid, signal_when_stopped != 0 ? signal_when_stopped : SIGCONT);
      ::kill(pid, SIGCONT);
      continue;
    }
    if (w == pid) break;
    if (std::chrono::steady_clock::now() > deadline) {
      ::kill(pid, SIGKILL);
      ::waitpid(pid, &status, 0);
      ADD_FAILURE() << "lobecast did not finish within two minutes";
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  if (WIFEXITED(status)) r.code = WEXITSTATUS(status);
  if (WIFSIGNALED(status)) r.signal = WTERMSIG(status);
  r.out = testing::ReadFile(out_path);
  r.err = testing::ReadFile(err_path);
  return r;
}

// A result of the single-dipole sample, computed once.
const std::string& Result() {
  static const std::string path = [] {
    const fs::path p = Fresh("result") / "single.h5";
    const Outcome r = Lobecast({"compute", "-q", Sample("single-dipole.toml"), "-o", p.string()});
    EXPECT_EQ(r.code, 0) << r.err;
    return p.string();
  }();
  return path;
}

// One command writing one output: its arguments with `TARGET` for the output.
struct Writer {
  std::string name;  // the case and the output's file name
  std::vector<std::string> args;
};

std::vector<Writer> EveryWriter() {
  const std::string beacon = Sample("parasitic-beacon.toml");
  return {
      {"result.h5", {"compute", "-q", Sample("single-dipole.toml"), "-o", "TARGET"}},
      {"scan.h5", {"scan", "-q", beacon, "--theta-stop", "30", "--step", "30", "-o", "TARGET"}},
      {"scan.csv", {"scan", "-q", beacon, "--theta-stop", "30", "--step", "30", "-o", "TARGET"}},
      {"scan.svg",
       {"scan", "-q", beacon, "--theta-stop", "30", "--step", "30", "--plot", "TARGET"}},
      {"export.csv", {"export", Result(), "-o", "TARGET"}},
      {"export.tsv", {"export", Result(), "--format", "tsv", "-o", "TARGET"}},
      {"report.txt", {"report", Result(), "-o", "TARGET"}},
      {"report.json", {"report", "--json", Result(), "-o", "TARGET"}},
      {"plot.png", {"plot", Result(), "-o", "TARGET"}},
      {"plot.svg", {"plot", Result(), "-o", "TARGET"}},
      {"plot.pdf", {"plot", Result(), "-o", "TARGET"}},
      {"array.toml", {"synth", "-q", Sample("design-mast-dolph-12.toml"), "-o", "TARGET"}},
  };
}

std::vector<std::string> WithTarget(std::vector<std::string> args, const fs::path& target) {
  for (std::string& a : args) {
    if (a == "TARGET") a = target.string();
  }
  return args;
}

void WritePrecious(const fs::path& p) { std::ofstream(p, std::ios::binary) << kPrecious; }

// What every failed write must leave: the old file as it was, nothing else new.
void ExpectFailedCleanly(const Outcome& r, const fs::path& target,
                         const std::vector<std::string>& expected_names, const std::string& reason,
                         const std::string& what) {
  EXPECT_EQ(r.code, 1) << what << "\n" << r.err;
  EXPECT_EQ(r.signal, 0) << what << ": killed by signal " << r.signal << "\n" << r.err;
  EXPECT_THAT(r.err, StartsWith("lobecast: ")) << what;
  EXPECT_THAT(r.err, HasSubstr(reason)) << what;
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << what << "\n" << r.err;
  for (const char* raw : {"HDF5-DIAG", "o_flags", ".tmp", "error while writing to output"}) {
    EXPECT_THAT(r.err, ::testing::Not(HasSubstr(raw))) << what;
  }
  EXPECT_EQ(testing::ReadFile(target), kPrecious) << what << ": the old output was changed";
  EXPECT_EQ(Names(target.parent_path()), expected_names) << what << ": a temporary was left";
}

// ------------------------------------------------------------- a full disk

// Injected: the output layer fails the write as a full disk would, for every output.
TEST(OutputFault, FullDiskInjectedForEveryOutput) {
  for (const Writer& w : EveryWriter()) {
    const fs::path dir = Fresh("injected-" + w.name);
    const fs::path target = dir / w.name;
    WritePrecious(target);
    const Outcome r = Lobecast(WithTarget(w.args, target), {"LOBECAST_TEST_FAIL_WRITE_AFTER=10"});
    ExpectFailedCleanly(r, target, {w.name}, "No space left on device", w.name);
  }
}

// synth's pair (array description and element table): neither is replaced.
TEST(OutputFault, FullDiskInjectedForSynthsPair) {
  const fs::path dir = Fresh("injected-synth-pair");
  // 24 x 12 = 288 elements: above the 256 that go to a CSV table.
  const fs::path design = dir / "panel-design.toml";
  std::ofstream(design) << "frequency = \"1 GHz\"\nlength_unit = \"wavelength\"\n"
                           "[grid]\ntheta = { start = 0, stop = 180, step = 10 }\n"
                           "phi = { start = 0, stop = 360, step = 10 }\n"
                           "[element]\norientation = [0, 0, 1]\nlength = 0.04\n"
                           "[lattice]\nkind = \"rectangular\"\ncount = [24, 12]\n"
                           "spacing = [0.5, 0.5]\n";
  const fs::path out = Fresh("injected-synth-out");
  WritePrecious(out / "panel.toml");
  WritePrecious(out / "panel.csv");
  const Outcome plain =
      Lobecast({"synth", "-q", design.string(), "-o", (Work("x") / "p.toml").string()});
  ASSERT_EQ(plain.code, 0) << plain.err;
  ASSERT_TRUE(fs::exists(Work("x") / "p.csv")) << "the design must need a CSV table";
  const Outcome r = Lobecast({"synth", "-q", design.string(), "-o", (out / "panel.toml").string()},
                             {"LOBECAST_TEST_FAIL_WRITE_AFTER=2000"});
  ExpectFailedCleanly(r, out / "panel.toml", {"panel.csv", "panel.toml"}, "No space left on device",
                      "synth");
  EXPECT_EQ(testing::ReadFile(out / "panel.csv"), kPrecious);
}

// A real full file system, where this machine lets the test mount one.
class TmpfsTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = Fresh("tmpfs");
    if (::mount("tmpfs", dir_.c_str(), "tmpfs", 0, "size=256k") != 0) {
      GTEST_SKIP() << "cannot mount a tmpfs here (" << std::strerror(errno)
                   << "; needs root or CAP_SYS_ADMIN): the injected full-disk test covers the "
                      "same paths";
    }
    mounted_ = true;
  }
  void TearDown() override {
    if (mounted_) ::umount2(dir_.c_str(), MNT_DETACH);
  }
  // Fills the file system to the last byte.
  void Fill() {
    std::ofstream f(dir_ / "filler", std::ios::binary);
    const std::string block(4096, 'x');
    while (f.write(block.data(), static_cast<std::streamsize>(block.size()))) f.flush();
    std::ofstream g(dir_ / "filler-tail", std::ios::binary);
    while (g.put('x')) g.flush();
  }
  fs::path dir_;
  bool mounted_ = false;
};

TEST_F(TmpfsTest, FullDiskForEveryOutput) {
  std::vector<std::string> names;
  for (const Writer& w : EveryWriter()) {
    WritePrecious(dir_ / w.name);
    names.push_back(w.name);
  }
  Fill();
  names.push_back("filler");
  names.push_back("filler-tail");
  std::sort(names.begin(), names.end());
  for (const Writer& w : EveryWriter()) {
    const fs::path target = dir_ / w.name;
    // compute used to print the error and then die of SIGSEGV in HDF5's exit handler.
    const Outcome r = Lobecast(WithTarget(w.args, target));
    ExpectFailedCleanly(r, target, names, "No space left on device", w.name);
  }
}

// A read-only file system: refused before the work, with the reason.
TEST_F(TmpfsTest, ReadOnlyFolderForEveryOutput) {
  std::vector<std::string> names;
  for (const Writer& w : EveryWriter()) {
    WritePrecious(dir_ / w.name);
    names.push_back(w.name);
  }
  std::sort(names.begin(), names.end());
  ASSERT_EQ(::mount("tmpfs", dir_.c_str(), "tmpfs", MS_REMOUNT | MS_RDONLY, "size=256k"), 0)
      << std::strerror(errno);
  for (const Writer& w : EveryWriter()) {
    const Outcome r = Lobecast(WithTarget(w.args, dir_ / w.name));
    ExpectFailedCleanly(r, dir_ / w.name, names, "Read-only file system", w.name);
    EXPECT_THAT(r.err, HasSubstr("cannot write in the folder")) << w.name;
  }
  // --plots into it: refused before the result is computed and written elsewhere.
  const fs::path elsewhere = Fresh("ro-elsewhere");
  const Outcome r = Lobecast({"compute", "-q", Sample("single-dipole.toml"), "-o",
                              (elsewhere / "r.h5").string(), "--plots", dir_.string()});
  EXPECT_EQ(r.code, 1) << r.err;
  EXPECT_THAT(r.err, HasSubstr("Read-only file system"));
  EXPECT_TRUE(fs::is_empty(elsewhere)) << "the result was written before the folder was checked";
}

// The same check without privileges where the permission bits bind (not root).
TEST(OutputFault, UnwritableFolderIsFoundBeforeTheWork) {
  const fs::path locked = Fresh("locked");
  const fs::path elsewhere = Fresh("locked-elsewhere");
  if (::geteuid() == 0) {
    GTEST_SKIP() << "root ignores permission bits; TmpfsTest.ReadOnlyFolderForEveryOutput and "
                    "UnixCli.AFolderThatRefusesFilesIsARunFailureForEveryWriter cover it";
  }
  fs::permissions(locked, fs::perms::owner_read | fs::perms::owner_exec);
  const Outcome r = Lobecast({"compute", "-q", Sample("single-dipole.toml"), "-o",
                              (elsewhere / "r.h5").string(), "--plots", locked.string()});
  fs::permissions(locked, fs::perms::owner_all);
  EXPECT_EQ(r.code, 1) << r.err;
  EXPECT_THAT(r.err, HasSubstr("Permission denied"));
  EXPECT_TRUE(fs::is_empty(elsewhere)) << "the result was written before the folder was checked";
}

// --------------------------------------------------------------- signals

struct SignalCase {
  int signal;
  const char* stage;  // LOBECAST_TEST_STOP_AT
};

class Interrupted : public ::testing::TestWithParam<SignalCase> {};

// The child stops itself at the stage; the test signals it there, so no timing is
// involved. The old output stays, no temporary is left, the signal ends the run.
TEST_P(Interrupted, LeavesTheOldOutputAndNoTemporary) {
  const SignalCase c = GetParam();
  const std::vector<Writer> writers = {
      {"result.h5", {"compute", "-q", Sample("planar-4x4-ground.toml"), "-o", "TARGET"}},
      {"export.csv", {"export", Result(), "-o", "TARGET"}},
  };
  for (const Writer& w : writers) {
    if (std::string(c.stage) == "compute" && w.args[0] != "compute") continue;
    const fs::path dir = Fresh(std::string("signal-") + c.stage + "-" + w.name);
    const fs::path target = dir / w.name;
    WritePrecious(target);
    const Outcome r = Lobecast(WithTarget(w.args, target),
                               {std::string("LOBECAST_TEST_STOP_AT=") + c.stage}, c.signal, dir);
    ASSERT_TRUE(r.stopped) << w.name << ": never reached the stage " << c.stage << "\n" << r.err;
    if (std::string(c.stage) == "commit") {
      EXPECT_EQ(r.left_while_stopped.size(), 2u) << w.name << ": the temporary beside the target";
    }
    EXPECT_EQ(r.signal, c.signal) << w.name << " exit " << r.code << "\n" << r.err;
    EXPECT_EQ(testing::ReadFile(target), kPrecious) << w.name;
    EXPECT_EQ(Names(dir), std::vector<std::string>{w.name}) << w.name << ": a temporary was left";
  }
}

INSTANTIATE_TEST_SUITE_P(
    Signals, Interrupted,
    ::testing::Values(SignalCase{SIGINT, "compute"}, SignalCase{SIGTERM, "compute"},
                      SignalCase{SIGINT, "commit"}, SignalCase{SIGTERM, "commit"}),
    [](const ::testing::TestParamInfo<SignalCase>& info) {
      return std::string(info.param.signal == SIGINT ? "Int" : "Term") +
             (std::string(info.param.stage) == "commit" ? "DuringWrite" : "DuringCompute");
    });

// ------------------------------------------------------- names and links

// NAME_MAX is 255 on Linux file systems: a 250-character name is valid, and its
// temporary must fit too.
TEST(OutputFault, LongOutputNamesWork) {
  const fs::path dir = Fresh("long-names");
  const auto name = [](const std::string& ext) { return std::string(250 - ext.size(), 'n') + ext; };
  for (const Writer& w :
       {Writer{name(".h5"), {"compute", "-q", Sample("single-dipole.toml"), "-o", "TARGET"}},
        Writer{name(".csv"), {"export", Result(), "-o", "TARGET"}},
        Writer{name(".png"), {"plot", Result(), "-o", "TARGET"}}}) {
    ASSERT_EQ(w.name.size(), 250u);
    const Outcome r = Lobecast(WithTarget(w.args, dir / w.name));
    EXPECT_EQ(r.code, 0) << r.err;
    EXPECT_TRUE(fs::is_regular_file(dir / w.name)) << w.name.substr(240);
  }
  EXPECT_EQ(Names(dir).size(), 3u);
}

// `-o LINK` follows the link: the file it points to is replaced (atomically, in
// its own folder) and the link stays a link.
TEST(OutputFault, OutputOnASymlinkReplacesItsTarget) {
  const fs::path links = Fresh("links"), files = Fresh("link-targets"), plain = Fresh("plain");
  for (const Writer& w :
       {Writer{"export.csv", {"export", Result(), "-o", "TARGET"}},
        Writer{"result.h5", {"compute", "-q", Sample("single-dipole.toml"), "-o", "TARGET"}}}) {
    WritePrecious(files / w.name);
    fs::create_symlink(fs::path("..") / files.filename() / w.name, links / w.name);
    const Outcome r = Lobecast(WithTarget(w.args, links / w.name));
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_TRUE(fs::is_symlink(links / w.name)) << w.name << ": the link was replaced";
    EXPECT_NE(testing::ReadFile(files / w.name), kPrecious) << w.name;
    if (w.name == "export.csv") {
      ASSERT_EQ(Lobecast(WithTarget(w.args, plain / w.name)).code, 0);
      EXPECT_EQ(testing::ReadFile(files / w.name), testing::ReadFile(plain / w.name));
    }
  }
  EXPECT_EQ(Names(links), (std::vector<std::string>{"export.csv", "result.h5"}));
  EXPECT_EQ(Names(files), (std::vector<std::string>{"export.csv", "result.h5"}));
}

// ------------------------------------------------------------ huge inputs

// A run past the limits is refused before it starts, with the estimate and the
// option that raises the limit; raising it lets the same run through.
TEST(OutputFault, HugeRunsAreRefusedWithTheEstimateAndTheOption) {
  const fs::path dir = Fresh("huge");
  const fs::path target = dir / "r.h5";
  const Outcome memory = Lobecast({"compute", "-q", Sample("single-dipole.toml"), "-o",
                                   target.string(), "--max-memory-gb", "0.001"});
  EXPECT_EQ(memory.code, 2) << memory.err;
  EXPECT_THAT(memory.err, HasSubstr("too large a run"));
  EXPECT_THAT(memory.err, HasSubstr("GB of memory"));
  EXPECT_THAT(memory.err, HasSubstr("--max-memory-gb"));
  EXPECT_TRUE(fs::is_empty(dir));

  const Outcome time =
      Lobecast({"check", "-q", Sample("design-panel-16x8-taylor.toml"), "--max-hours", "1e-9"});
  EXPECT_EQ(time.code, 2) << time.err;
  EXPECT_THAT(time.err, HasSubstr("dipole pairs"));
  EXPECT_THAT(time.err, HasSubstr("--max-hours"));

  EXPECT_EQ(
      Lobecast({"check", "-q", Sample("design-panel-16x8-taylor.toml"), "--max-hours", "1"}).code,
      0);
}

}  // namespace
}  // namespace lobecast
