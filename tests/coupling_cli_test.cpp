// Coupled arrays end to end: `report` reads back the circuit `compute` printed.
#include <filesystem>
#include <fstream>
#include <string>
#include <utility>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "tests/cli_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using testing::Quote;

testing::RunOutput Lobecast(const std::string& args) {
  return testing::RunShell(std::string(LOBECAST_EXE) + " " + args + " 2>&1");
}

// The lines from "circuit" to "gain" of a command's output.
std::string CircuitBlock(const std::string& out) {
  const auto begin = out.find("circuit      ");
  const auto gain = out.find("gain         ", begin);
  if (begin == std::string::npos || gain == std::string::npos) return "";
  return out.substr(begin, out.find('\n', gain) - begin);
}

TEST(CouplingCli, ReportShowsTheCircuitComputePrinted) {
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml";
  const fs::path out = testing::TempWorkDir("lobecast-coupling-test", "r") / "beacon.h5";
  const auto compute = Lobecast("compute " + Quote(sample) + " -o " + Quote(out.string()));
  ASSERT_EQ(compute.exit_code, 0) << compute.out;
  const auto report = Lobecast("report " + Quote(out.string()));
  ASSERT_EQ(report.exit_code, 0) << report.out;
  const std::string block = CircuitBlock(compute.out);
  ASSERT_FALSE(block.empty()) << compute.out;
  EXPECT_EQ(CircuitBlock(report.out), block);
  EXPECT_THAT(block, ::testing::HasSubstr("realized gain at the peak"));
  // The JSON carries the same circuit under the file's names.
  const auto json = Lobecast("report --json " + Quote(out.string()));
  ASSERT_EQ(json.exit_code, 0) << json.out;
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"coupling\": {"));
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"port_kind\": \"load\""));
  EXPECT_THAT(json.out, ::testing::HasSubstr("\"input_impedance_ohm\": {"));
  // A forced-current sample has no circuit to show.
  const fs::path plain = out.parent_path() / "single.h5";
  ASSERT_EQ(Lobecast("compute " + Quote(std::string(LOBECAST_SAMPLES) + "/single-dipole.toml") +
                     " -q -o " + Quote(plain.string()))
                .exit_code,
            0);
  EXPECT_EQ(CircuitBlock(Lobecast("report " + Quote(plain.string())).out), "");
}

// A panel of 65 x 64 wired dipoles writes `rows` of them (and `driven` voltage
// sources first, through the CSV port column) beside a TOML file; returns its path.
fs::path WritePanel(const fs::path& dir, const std::string& name, int rows, int driven) {
  std::ofstream csv(dir / (name + ".csv"));
  csv << "x,y,z,ux,uy,uz,length,distribution,radius,port,magnitude,phase,voltage\n";
  for (int k = 0; k < rows; ++k) {
    const int i = k / 64, j = k % 64;
    csv << i * 0.5 << ',' << j * 0.5 << ",0,0,0,1,0.05,triangular,0.001,"
        << (k < driven ? "drive,,0,1" : "current,1," + std::to_string((i * 13 + j * 7) % 360) + ",")
        << '\n';
  }
  std::ofstream toml(dir / (name + ".toml"));
  toml << "frequency = 0.3e9\nlength_unit = \"wavelength\"\ndipoles_csv = \"" << name
       << ".csv\"\n[grid]\ntheta = { start = 0, stop = 180, step = 10 }\n"
          "phi = { start = 0, stop = 360, step = 10 }\n";
  return dir / (name + ".toml");
}

// Above the coupling limit (4096) a current-forced array with wires streams its
// impedances: compute writes the active impedance without the N x N matrix, and
// report reads the file back. A driven element there is refused, naming the limit
// and --resistance-matrix. 4000 dipoles (the matrix route) once made a result whose
// global heap's object headers spelled the collection's address: report refused
// its own file ("a string ... claims 7630437 bytes"); now it reads.
TEST(CouplingCli, LargeCurrentForcedArraysStreamTheirImpedances) {
  const fs::path dir = testing::TempWorkDir("lobecast-coupling-test", "large");
  for (const auto& [name, rows] : {std::pair{"panel4000", 4000}, std::pair{"panel4160", 4160}}) {
    const fs::path toml = WritePanel(dir, name, rows, 0);
    const fs::path out = dir / (std::string(name) + ".h5");
    const auto compute =
        Lobecast("compute " + Quote(toml.string()) + " -q -o " + Quote(out.string()));
    ASSERT_EQ(compute.exit_code, 0) << compute.out;
    const auto report = Lobecast("report " + Quote(out.string()));
    ASSERT_EQ(report.exit_code, 0) << report.out;
    EXPECT_THAT(CircuitBlock(report.out),
                ::testing::HasSubstr(std::to_string(rows) + " current-forced"));
    const auto h5 = testing::RunShell(
        std::string(LOBECAST_PYTHON) + " -c \"import h5py, numpy as np; f = h5py.File('" +
        out.string() +
        "'); z = f['/power/active_impedance_ohm'][...]; "
        "print('matrix' if '/power/impedance_ohm' in f else 'streamed', z.size, "
        "bool(np.all(np.isfinite(z))), "
        "float(np.max(np.abs(z.real - f['/power/active_resistance_ohm'][...]))))\" 2>&1");
    ASSERT_EQ(h5.exit_code, 0) << h5.out;
    // The active impedance of every element, its real part the stored active resistance.
    EXPECT_THAT(h5.out, ::testing::StartsWith(std::string(rows > 4096 ? "streamed " : "matrix ") +
                                              std::to_string(rows) + " True "))
        << h5.out;
  }
  const fs::path driven = WritePanel(dir, "driven4160", 4160, 1);
  const auto refused =
      Lobecast("compute " + Quote(driven.string()) + " -q -o " + Quote((dir / "d.h5").string()));
  EXPECT_EQ(refused.exit_code, 2) << refused.out;
  EXPECT_THAT(refused.out, ::testing::HasSubstr("dipole 0 is driven"));
  EXPECT_THAT(refused.out, ::testing::HasSubstr("built up to 4096 dipoles"));
  EXPECT_THAT(refused.out, ::testing::HasSubstr("--resistance-matrix"));
}

}  // namespace
}  // namespace lobecast
