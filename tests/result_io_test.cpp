// Round trip and schema checks of the HDF5 result file (CONVENTIONS §3). The
// results are built by hand with recognisable values, not computed: these tests
// are about storage, not physics.
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <limits>
#include <regex>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "engine/error.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "io/input_error.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

fs::path FreshDir(const std::string& name) {
  const fs::path dir =
      fs::path(::testing::TempDir()) / ("lobecast_result_io_" + std::to_string(::getpid())) / name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

std::vector<std::string> FilesIn(const fs::path& dir) {
  std::vector<std::string> names;
  for (const auto& entry : fs::directory_iterator(dir)) names.push_back(entry.path().filename());
  std::sort(names.begin(), names.end());
  return names;
}

Array MakeArray() {
  Array a;
  a.frequency_hz = 433.92e6;
  a.ground = Ground::kPec;
  Dipole d0;
  d0.position_m = Vec3(0.1, -0.2, 0.3);
  d0.orientation = Vec3(0.0, 0.0, 1.0);
  d0.length_m = 0.01;
  d0.distribution = Distribution::kUniform;
  Dipole d1;
  d1.position_m = Vec3(0.5, 0.25, 0.125);
  d1.orientation = Vec3(0.6, 0.8, 0.0);
  d1.length_m = 0.02;
  d1.distribution = Distribution::kTriangular;
  a.dipoles = {d0, d1};
  return a;
}

// MakeArray's terminal currents.
Eigen::VectorXcd MakeCurrents() {
  Eigen::VectorXcd i(2);
  i << Complex(1.0, -0.25), Complex(0.0, 2.0);
  return i;
}

// Nt = 3, Np = 4; every entry distinct so a transposed or shifted write shows.
PatternResult MakeResult() {
  PatternResult r;
  r.grid.theta_deg = {0.0, 45.0, 90.0};
  r.grid.phi_deg = {0.0, 90.0, 180.0, 270.0};
  const std::size_t m = 12;
  r.field.e_theta.resize(m);
  r.field.e_phi.resize(m);
  r.intensity_w_sr.resize(m);
  r.directivity.resize(m);
  r.axial_ratio_db.resize(m);
  r.tilt_deg.resize(m);
  r.sense.resize(m);
  for (std::size_t k = 0; k < m; ++k) {
    const double x = static_cast<double>(k);
    r.field.e_theta[k] = Complex(1.0 + x, -0.5 * x);
    r.field.e_phi[k] = Complex(0.25 * x, 3.0 - x);
    r.intensity_w_sr[k] = 1e-3 * (x + 1.0);
    r.directivity[k] = 0.1 * x;
    r.axial_ratio_db[k] = k == 5 ? kInf : (k == 7 ? kNaN : 0.5 * x);
    r.tilt_deg[k] = k == 7 ? kNaN : -80.0 + 15.0 * x;
    r.sense[k] = static_cast<std::int8_t>(static_cast<int>(k % 3) - 1);
  }
  r.resistance_ohm.resize(2, 2);
  r.resistance_ohm << 0.079, 0.005, 0.007, 0.0790001;  // deliberately not symmetric
  r.active_resistance_ohm.resize(2);
  r.active_resistance_ohm << 0.08, kNaN;
  r.radiated_power_w = 0.125;
  r.summary.field_method_used = FieldMethod::kFast;
  r.summary.fast_transforms_used = {FastTransform::kLattice};
  r.summary.threads_used = 3;
  r.summary.num_dipoles = 2;
  r.summary.num_sources = 4;
  r.summary.num_directions = 12;
  r.summary.pairs = 48;
  r.summary.seconds_plan = 0.001;
  r.summary.seconds_field = 0.002;
  r.summary.seconds_power = 0.003;
  r.summary.seconds_polarization = 0.004;
  r.summary.radiated_power_w = 0.125;
  r.summary.peak_directivity = 1.1;
  r.summary.peak_theta_deg = 90.0;
  r.summary.peak_phi_deg = 270.0;
  return r;
}

ResultMetadata MakeMeta() {
  ResultMetadata m;
  m.name = "Harbour mast test array";
  m.description = "two dipoles, invented scenario";
  m.input_text = "frequency = 433.92e6\nground = \"pec\"\n# ünïcode comment\n";
  m.input_path = "/somewhere/mast.toml";
  return m;
}

// Same bits, NaN equal to NaN.
void ExpectSame(double found, double expected, const std::string& what) {
  if (std::isnan(expected)) {
    EXPECT_TRUE(std::isnan(found)) << what << ": found " << found << ", expected NaN";
  } else {
    EXPECT_EQ(found, expected) << what;
  }
}

void ExpectSameResult(const StoredResult& s, const Array& a, const PatternResult& r) {
  EXPECT_EQ(s.array.frequency_hz, a.frequency_hz);
  EXPECT_EQ(s.array.ground, a.ground);
  ASSERT_EQ(s.array.size(), a.size());
  for (std::size_t k = 0; k < a.size(); ++k) {
    const Dipole& f = s.array.dipoles[k];
    const Dipole& e = a.dipoles[k];
    EXPECT_EQ(f.position_m, e.position_m) << "dipole " << k;
    EXPECT_EQ(f.orientation, e.orientation) << "dipole " << k;
    EXPECT_EQ(f.length_m, e.length_m) << "dipole " << k;
    EXPECT_EQ(f.distribution, e.distribution) << "dipole " << k;
    EXPECT_EQ(s.currents[static_cast<Eigen::Index>(k)],
              MakeCurrents()[static_cast<Eigen::Index>(k)])
        << "dipole " << k;
  }
  const PatternResult& g = s.result;
  EXPECT_EQ(g.grid.theta_deg, r.grid.theta_deg);
  EXPECT_EQ(g.grid.phi_deg, r.grid.phi_deg);
  ASSERT_EQ(g.field.size(), r.field.size());
  ASSERT_EQ(g.sense.size(), r.sense.size());
  for (std::size_t k = 0; k < r.field.size(); ++k) {
    const auto i = static_cast<Eigen::Index>(k);
    EXPECT_EQ(g.field.e_theta[i], r.field.e_theta[i]) << k;
    EXPECT_EQ(g.field.e_phi[i], r.field.e_phi[i]) << k;
    ExpectSame(g.intensity_w_sr[i], r.intensity_w_sr[i], "intensity");
    ExpectSame(g.directivity[i], r.directivity[i], "directivity");
    ExpectSame(g.axial_ratio_db[i], r.axial_ratio_db[i], "axial ratio");
    ExpectSame(g.tilt_deg[i], r.tilt_deg[i], "tilt");
    EXPECT_EQ(g.sense[k], r.sense[k]) << k;
  }
  EXPECT_EQ(g.radiated_power_w, r.radiated_power_w);
  EXPECT_EQ(g.resistance_ohm, r.resistance_ohm);
  ASSERT_EQ(g.active_resistance_ohm.size(), r.active_resistance_ohm.size());
  for (Eigen::Index k = 0; k < r.active_resistance_ohm.size(); ++k) {
    ExpectSame(g.active_resistance_ohm[k], r.active_resistance_ohm[k], "active resistance");
  }
}

TEST(ResultIo, RoundTripKeepsEverything) {
  const fs::path dir = FreshDir("round_trip");
  const std::string path = dir / "out.h5";
  const Array a = MakeArray();
  const PatternResult r = MakeResult();
  WriteResult(path, a, MakeCurrents(), r, MakeMeta());
  EXPECT_EQ(FilesIn(dir), std::vector<std::string>{"out.h5"});

  const StoredResult s = ReadResult(path);
  EXPECT_EQ(s.format_version, 1);
  EXPECT_EQ(s.time_convention, "exp(+jwt)");
  EXPECT_FALSE(s.software_version.empty());
  EXPECT_TRUE(
      std::regex_match(s.metadata.created, std::regex(R"(\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ)")))
      << s.metadata.created;
  EXPECT_EQ(s.metadata.name, MakeMeta().name);
  EXPECT_EQ(s.metadata.description, MakeMeta().description);
  EXPECT_EQ(s.metadata.input_text, MakeMeta().input_text);
  EXPECT_EQ(s.metadata.input_path, MakeMeta().input_path);
  ExpectSameResult(s, a, r);

  ASSERT_TRUE(s.has_summary);
  const ComputeSummary& f = s.result.summary;
  const ComputeSummary& e = r.summary;
  EXPECT_EQ(f.field_method_used, e.field_method_used);
  EXPECT_EQ(f.fast_transforms_used, e.fast_transforms_used);
  EXPECT_EQ(f.threads_used, e.threads_used);
  EXPECT_EQ(f.num_dipoles, e.num_dipoles);
  EXPECT_EQ(f.num_sources, e.num_sources);
  EXPECT_EQ(f.num_directions, e.num_directions);
  EXPECT_EQ(f.pairs, e.pairs);
  EXPECT_EQ(f.seconds_plan, e.seconds_plan);
  EXPECT_EQ(f.seconds_field, e.seconds_field);
  EXPECT_EQ(f.seconds_power, e.seconds_power);
  EXPECT_EQ(f.seconds_polarization, e.seconds_polarization);
  EXPECT_EQ(f.radiated_power_w, e.radiated_power_w);
  EXPECT_EQ(f.peak_directivity, e.peak_directivity);
  EXPECT_EQ(f.peak_theta_deg, e.peak_theta_deg);
  EXPECT_EQ(f.peak_phi_deg, e.peak_phi_deg);
}

TEST(ResultIo, EmptyNameAndDescriptionAreOmittedAndCreatedIsKept) {
  const fs::path dir = FreshDir("no_name");
  const std::string path = dir / "out.h5";
  ResultMetadata meta;
  meta.created = "2026-12-02T01:23:45Z";
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), meta);
  const StoredResult s = ReadResult(path);
  EXPECT_EQ(s.metadata.name, "");
  EXPECT_EQ(s.metadata.description, "");
  EXPECT_EQ(s.metadata.input_path, "");
  EXPECT_EQ(s.metadata.created, "2026-12-02T01:23:45Z");
}

TEST(ResultIo, NeverReplacesAPipeOrFolder) {
  // The atomic rename would replace whatever sits at the path; `-o /dev/null` as
  // root would destroy the device. A pipe and a folder stand in for it here.
  const fs::path dir = FreshDir("not_regular");
  const std::string pipe = dir / "pipe";
  ASSERT_EQ(::mkfifo(pipe.c_str(), 0600), 0);
  EXPECT_THROW(WriteResult(pipe, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta()),
               InputError);
  EXPECT_TRUE(fs::is_fifo(pipe));
  const std::string folder = dir / "folder.h5";
  fs::create_directory(folder);
  EXPECT_THROW(WriteResult(folder, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta()),
               InputError);
  EXPECT_TRUE(fs::is_directory(folder));
}

TEST(ResultIo, LargeInputTextSurvives) {
  // Compact attributes are limited to 64 KiB; variable-length strings are not.
  const fs::path dir = FreshDir("large_input");
  const std::string path = dir / "out.h5";
  ResultMetadata meta;
  for (int k = 0; k < 5000; ++k) meta.input_text += "[[dipole]] # line " + std::to_string(k) + "\n";
  ASSERT_GT(meta.input_text.size(), 100000u);
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), meta);
  EXPECT_EQ(ReadResult(path).metadata.input_text, meta.input_text);
}

TEST(ResultIo, EveryDatasetIsNamedTypedAndHasUnits) {
  const fs::path dir = FreshDir("schema");
  const std::string path = dir / "out.h5";
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta());

  struct Expected {
    std::string path;
    std::vector<std::uint64_t> shape;
    std::string type;
    std::string units;
    bool chunked;
  };
  const std::vector<Expected> expected = {
      {"/array/current", {2}, "complex128", "A", false},
      {"/array/distribution", {2}, "string", "1", false},
      {"/array/effective_length", {2}, "float64", "m", false},
      {"/array/length_m", {2}, "float64", "m", false},
      {"/array/orientation", {2, 3}, "float64", "1", false},
      {"/array/position", {2, 3}, "float64", "m", false},
      {"/field/rE_phi", {3, 4}, "complex128", "V", true},
      {"/field/rE_theta", {3, 4}, "complex128", "V", true},
      {"/grid/phi_deg", {4}, "float64", "deg", false},
      {"/grid/theta_deg", {3}, "float64", "deg", false},
      {"/pattern/directivity", {3, 4}, "float64", "1", true},
      {"/pattern/intensity", {3, 4}, "float64", "W/sr", true},
      {"/polarization/axial_ratio_db", {3, 4}, "float64", "dB", true},
      {"/polarization/sense", {3, 4}, "int8", "1", true},
      {"/polarization/tilt_deg", {3, 4}, "float64", "deg", true},
      {"/power/active_resistance_ohm", {2}, "float64", "ohm", false},
      {"/power/radiated_w", {}, "float64", "W", false},
      {"/power/resistance_ohm", {2, 2}, "float64", "ohm", false},
  };
  const std::vector<StoredDatasetInfo> found = ListDatasets(path);
  ASSERT_EQ(found.size(), expected.size());
  for (std::size_t k = 0; k < expected.size(); ++k) {
    const Expected& e = expected[k];
    const StoredDatasetInfo& f = found[k];
    EXPECT_EQ(f.path, e.path);
    EXPECT_EQ(f.shape, e.shape) << e.path;
    EXPECT_EQ(f.type, e.type) << e.path;
    EXPECT_EQ(f.units, e.units) << e.path;
    EXPECT_EQ(f.chunked, e.chunked) << e.path;
    EXPECT_EQ(f.deflated, e.chunked) << e.path;
  }
}

TEST(ResultIo, RowBlocksInAnyOrderGiveTheSameFile) {
  const fs::path dir = FreshDir("rows");
  const std::string path = dir / "out.h5";
  const Array a = MakeArray();
  const PatternResult r = MakeResult();
  ResultWriteOptions options;
  options.chunk_theta_rows = 1;
  options.deflate_level = -1;
  PatternFileWriter w(path, a, MakeCurrents(), r.grid, MakeMeta(), options);
  // A short hidden name beside the target (io/output_file.h), whatever the target's length.
  EXPECT_EQ(fs::path(w.temporary_path()).parent_path(), dir);
  EXPECT_THAT(fs::path(w.temporary_path()).filename().string(),
              ::testing::StartsWith(".lobecast-" + std::to_string(::getpid()) + "-"));
  w.WriteRows(2, RowsOf(r, 2, 1));
  w.WriteRows(0, RowsOf(r, 0, 2));
  w.WritePower(r.radiated_power_w, r.resistance_ohm, r.active_resistance_ohm);
  w.WriteAttribute("/summary/analysis", "half_power_beamwidth_deg", 78.5);
  w.WriteIntAttribute("/summary/analysis", "num_lobes", 2);
  w.WriteStringAttribute("/summary/analysis", "reference", "rhcp");
  const std::vector<double> table = {1, 2, 3, 4, 5, 6};
  w.WriteTable("/summary/analysis/lobes", {3, 2}, table.data(), "deg");
  EXPECT_FALSE(fs::exists(path)) << "target must not exist before Finish";
  w.Finish();
  EXPECT_EQ(FilesIn(dir), std::vector<std::string>{"out.h5"});

  const StoredResult s = ReadResult(path);
  ExpectSameResult(s, a, r);
  bool found_table = false;
  for (const StoredDatasetInfo& info : ListDatasets(path)) {
    if (info.path == "/summary/analysis/lobes") {
      found_table = true;
      EXPECT_EQ(info.shape, (std::vector<std::uint64_t>{3, 2}));
      EXPECT_EQ(info.units, "deg");
    }
    if (info.path == "/field/rE_theta") {
      EXPECT_FALSE(info.deflated);
    }
  }
  EXPECT_TRUE(found_table);
}

TEST(ResultIo, FinishRefusesAnIncompleteFile) {
  const fs::path dir = FreshDir("incomplete");
  const std::string path = dir / "out.h5";
  const PatternResult r = MakeResult();
  {
    PatternFileWriter w(path, MakeArray(), MakeCurrents(), r.grid, MakeMeta());
    w.WriteRows(0, RowsOf(r, 0, 1));
    w.WritePower(r.radiated_power_w, r.resistance_ohm, r.active_resistance_ohm);
    try {
      w.Finish();
      ADD_FAILURE() << "Finish accepted missing rows";
    } catch (const IoError& e) {
      EXPECT_THAT(e.what(), HasSubstr("theta row 1 of 3 was never written"));
      EXPECT_EQ(e.path(), path);
    }
    EXPECT_THROW(w.Finish(), IoError) << "a failed writer stays failed";
  }
  EXPECT_TRUE(FilesIn(dir).empty());
}

TEST(ResultIo, AbandonedWriterLeavesNothing) {
  const fs::path dir = FreshDir("abandoned");
  const std::string path = dir / "out.h5";
  const PatternResult r = MakeResult();
  {
    PatternFileWriter w(path, MakeArray(), MakeCurrents(), r.grid, MakeMeta());
    w.WriteRows(0, RowsOf(r, 0, 3));
    EXPECT_TRUE(fs::exists(w.temporary_path()));
  }
  EXPECT_TRUE(FilesIn(dir).empty());
}

TEST(ResultIo, MissingDirectoryFailsCleanlyAndQuietly) {
  const fs::path dir = FreshDir("missing_dir");
  const std::string path = dir / "no" / "such" / "out.h5";
  ::testing::internal::CaptureStderr();
  try {
    WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta());
    ADD_FAILURE() << "writing into a missing directory succeeded";
  } catch (const IoError& e) {
    EXPECT_EQ(e.path(), path);
    EXPECT_THAT(e.what(), HasSubstr(path));
    EXPECT_THAT(e.what(), HasSubstr("cannot create the file"));
    EXPECT_THAT(e.what(), HasSubstr("No such file or directory"));  // from HDF5's stack
  }
  EXPECT_EQ(::testing::internal::GetCapturedStderr(), "") << "HDF5 must not print";
  EXPECT_TRUE(FilesIn(dir).empty());
}

TEST(ResultIo, MismatchedResultIsRejectedBeforeAnyFileExists) {
  const fs::path dir = FreshDir("mismatch");
  PatternResult r = MakeResult();
  r.sense.pop_back();
  EXPECT_THROW(WriteResult(dir / "out.h5", MakeArray(), MakeCurrents(), r, MakeMeta()),
               InvalidArgument);
  EXPECT_TRUE(FilesIn(dir).empty());
}

// A failure at any point of the write leaves an existing target as it was and no
// temporary behind.
class FailureAt : public ::testing::TestWithParam<const char*> {};

TEST_P(FailureAt, LeavesExistingTargetUntouched) {
  const fs::path dir =
      FreshDir(std::string("fail_") + std::to_string(std::hash<std::string>{}(GetParam())));
  const std::string path = dir / "out.h5";
  ResultMetadata first = MakeMeta();
  first.name = "first run";
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), first);
  const auto size_before = fs::file_size(path);
  const auto time_before = fs::last_write_time(path);

  ResultWriteOptions options;
  options.before_write = [](std::string_view step) {
    if (step == GetParam()) throw IoError("(injected)", "disk full at " + std::string(step));
  };
  ResultMetadata second = MakeMeta();
  second.name = "second run";
  PatternResult other = MakeResult();
  other.radiated_power_w = 99.0;
  try {
    WriteResult(path, MakeArray(), MakeCurrents(), other, second, options);
    ADD_FAILURE() << "the injected failure at " << GetParam() << " was not reported";
  } catch (const IoError& e) {
    EXPECT_EQ(e.path(), path);
    EXPECT_THAT(e.what(), HasSubstr("disk full"));
  }
  EXPECT_EQ(FilesIn(dir), std::vector<std::string>{"out.h5"});
  EXPECT_EQ(fs::file_size(path), size_before);
  EXPECT_EQ(fs::last_write_time(path), time_before);
  const StoredResult s = ReadResult(path);
  EXPECT_EQ(s.metadata.name, "first run");
  EXPECT_EQ(s.result.radiated_power_w, MakeResult().radiated_power_w);
}

INSTANTIATE_TEST_SUITE_P(Steps, FailureAt,
                         ::testing::Values("create", "/array", "/array/position", "/grid",
                                           "/field/rE_theta", "/field/rE_phi",
                                           "/pattern/directivity", "/polarization/sense", "/power",
                                           "/summary", "/", "rename"));

TEST(ResultIoDeathTest, InterruptedRunNeverLeavesAFinishedLookingFile) {
  const fs::path dir = FreshDir("interrupted");
  const std::string path = dir / "out.h5";
  // The child dies just before the root attributes would be written: everything
  // else is in the temporary file, nothing has been renamed.
  ResultWriteOptions options;
  options.before_write = [](std::string_view step) {
    if (step == "/") std::_Exit(7);
  };
  EXPECT_EXIT(WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta(), options),
              ::testing::ExitedWithCode(7), "");
  EXPECT_FALSE(fs::exists(path));
  const std::vector<std::string> left = FilesIn(dir);
  ASSERT_EQ(left.size(), 1u) << "the killed child's temporary file";
  EXPECT_THAT(left[0], ::testing::StartsWith(".lobecast-"));
  // Even under its own name the leftover is not accepted as a result.
  EXPECT_THROW(ReadResult(dir / left[0]), IoError);
  fs::remove(dir / left[0]);
}

TEST(ResultIo, ReaderRejectsFilesThatAreNotHdf5) {
  const fs::path dir = FreshDir("not_hdf5");
  const std::string path = dir / "notes.h5";
  std::ofstream(path) << "frequency = 1e9\n";
  try {
    ReadResult(path);
    ADD_FAILURE() << "a text file was accepted";
  } catch (const IoError& e) {
    EXPECT_EQ(e.path(), path);
    EXPECT_THAT(e.what(), HasSubstr("not an HDF5 file"));
  }
  EXPECT_THROW(ReadResult(dir / "absent.h5"), IoError);
}

// --- checks through h5py (independent reader of the same file) -----------------------

bool PythonHasH5py() {
  const std::string cmd = std::string(LOBECAST_PYTHON) + " -c 'import h5py, numpy' >/dev/null 2>&1";
  return std::system(cmd.c_str()) == 0;
}

int RunPython(const fs::path& dir, const std::string& script, const std::string& arg) {
  const fs::path file = dir / "check.py";
  std::ofstream(file) << script;
  const std::string cmd = std::string(LOBECAST_PYTHON) + " '" + file.string() + "' '" + arg + "'";
  return std::system(cmd.c_str());
}

TEST(ResultIoH5py, ComplexAndStringsReadNatively) {
  if (!PythonHasH5py()) GTEST_SKIP() << LOBECAST_PYTHON << " lacks h5py";
  const fs::path dir = FreshDir("h5py");
  const std::string path = dir / "out.h5";
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta());
  const std::string script = R"PY(
import sys, h5py, numpy as np
f = h5py.File(sys.argv[1], "r")
assert f.attrs["format"] == "lobecast.pattern", f.attrs["format"]
assert isinstance(f.attrs["format"], str)
assert f.attrs["format_version"] == 1 and np.issubdtype(f.attrs["format_version"].dtype, np.integer)
assert f.attrs["time_convention"] == "exp(+jwt)"
assert f.attrs["input"].startswith("frequency = 433.92e6")
assert f["/array"].attrs["ground"] == "pec"
assert abs(f["/array"].attrs["wavelength_m"] - 299792458.0 / 433.92e6) < 1e-15
for name in ("field/rE_theta", "field/rE_phi", "array/current"):
    assert f[name].dtype == np.complex128, (name, f[name].dtype)
et = f["field/rE_theta"][()]
assert et.shape == (3, 4)
assert et[1, 2] == complex(1 + 6, -0.5 * 6), et[1, 2]  # theta-major: k = 1 * 4 + 2
assert f["array/current"][1] == 2j
assert f["polarization/sense"].dtype == np.int8
assert np.isinf(f["polarization/axial_ratio_db"][1, 1])
r = f["power/resistance_ohm"][()]
assert r[0, 1] == 0.005 and r[1, 0] == 0.007, r
assert list(f["array/distribution"].asstr()[()]) == ["uniform", "triangular"]
count = 0
def check(name, obj):
    global count
    if isinstance(obj, h5py.Dataset):
        u = obj.attrs["units"]
        assert isinstance(u, str) and u, (name, u)
        count += 1
f.visititems(check)
assert count == 18, count
print("h5py check ok")
)PY";
  EXPECT_EQ(RunPython(dir, script, path), 0);
}

// The quadrature's bound and rule (schema::VisitPowerQuadrature) and the note on the
// active resistances are written only when the power took the quadrature, and read
// back then; a closed-form result has neither (its file is as before).
TEST(ResultIoH5py, QuadraturePowerAttributesOnlyWhenUsed) {
  const fs::path dir = FreshDir("quadrature_power");
  const Array a = MakeArray();
  PatternResult closed = MakeResult();
  PatternResult quadrature = MakeResult();
  quadrature.resistance_ohm.resize(0, 0);
  quadrature.active_resistance_ohm.setConstant(kNaN);
  quadrature.summary.power_route = PowerRoute::kQuadrature;
  quadrature.summary.power_error_bound_relative = 3.5e-12;
  quadrature.summary.power_quadrature_degree = 371;
  quadrature.summary.power_quadrature_nodes = 34503;
  for (const PatternResult* r : {&closed, &quadrature}) {
    const std::string path = dir / (r == &quadrature ? "q.h5" : "c.h5");
    WriteResult(path, a, MakeCurrents(), *r, MakeMeta());
    const ComputeSummary back = ReadResult(path).result.summary;
    EXPECT_EQ(back.power_route, r->summary.power_route);
    EXPECT_EQ(back.power_error_bound_relative, r->summary.power_error_bound_relative);
    EXPECT_EQ(back.power_quadrature_degree, r->summary.power_quadrature_degree);
    EXPECT_EQ(back.power_quadrature_nodes, r->summary.power_quadrature_nodes);
  }
  if (!PythonHasH5py()) GTEST_SKIP() << LOBECAST_PYTHON << " lacks h5py";
  const std::string script = R"PY(
import sys, h5py
names = ("power_error_bound_relative", "power_quadrature_degree", "power_quadrature_nodes")
for path, quadrature in ((sys.argv[1] + "/q.h5", True), (sys.argv[1] + "/c.h5", False)):
    f = h5py.File(path, "r")
    s = f["/summary"].attrs
    assert all((n in s) == quadrature for n in names), (path, list(s))
    assert ("active_resistance_ohm_omitted" in f["/power"].attrs) == quadrature, path
    assert s["power_method"] == ("quadrature" if quadrature else "matrix"), s["power_method"]
    if quadrature:
        assert s["power_error_bound_relative"] == 3.5e-12 and s["power_quadrature_nodes"] == 34503
print("h5py check ok")
)PY";
  EXPECT_EQ(RunPython(dir, script, dir.string()), 0);
}

TEST(ResultIoH5py, ReaderRejectsAForeignHdf5File) {
  if (!PythonHasH5py()) GTEST_SKIP() << LOBECAST_PYTHON << " lacks h5py";
  const fs::path dir = FreshDir("foreign");
  const std::string path = dir / "foreign.h5";
  ASSERT_EQ(RunPython(dir,
                      "import sys, h5py\n"
                      "with h5py.File(sys.argv[1], 'w') as f:\n"
                      "    f['data'] = [1.0, 2.0]\n"
                      "    f.attrs['format'] = 'someone.else'\n",
                      path),
            0);
  try {
    ReadResult(path);
    ADD_FAILURE() << "a foreign HDF5 file was accepted";
  } catch (const IoError& e) {
    EXPECT_EQ(e.path(), path);
    EXPECT_THAT(e.what(), HasSubstr("not a lobecast result file"));
    EXPECT_THAT(e.what(), HasSubstr("someone.else"));
  }
}

TEST(ResultIoH5py, ReaderRejectsANewerFormatVersion) {
  if (!PythonHasH5py()) GTEST_SKIP() << LOBECAST_PYTHON << " lacks h5py";
  const fs::path dir = FreshDir("newer");
  const std::string path = dir / "out.h5";
  WriteResult(path, MakeArray(), MakeCurrents(), MakeResult(), MakeMeta());
  ASSERT_EQ(RunPython(dir,
                      "import sys, h5py, numpy as np\n"
                      "with h5py.File(sys.argv[1], 'r+') as f:\n"
                      "    f.attrs['format_version'] = np.int32(2)\n",
                      path),
            0);
  try {
    ReadResult(path);
    ADD_FAILURE() << "a format_version 2 file was accepted";
  } catch (const IoError& e) {
    EXPECT_THAT(e.what(), HasSubstr("format_version 2 is newer than this lobecast (reads 1)"));
  }
}

}  // namespace
}  // namespace lobecast
