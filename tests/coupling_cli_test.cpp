// Coupled arrays end to end: `report` reads back the circuit `compute` printed; large
// arrays stream their impedances; `plot` draws the realized gain.
#include <filesystem>
#include <fstream>
#include <optional>
#include <sstream>
#include <string>
#include <utility>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "engine/decibels.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/cut_traces.h"
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
// report reads the file back. A driven element there is solved iteratively. 4000 dipoles (the
// matrix route) once made a result whose global heap's object headers spelled the collection's
// address: report refused its own file ("a string ... claims 7630437 bytes"); now it reads.
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
  // The scan table streams too: every element's active impedance per direction.
  const fs::path scan_csv = dir / "scan.csv";
  const auto scan =
      Lobecast("scan " + Quote((dir / "panel4160.toml").string()) +
               " --phi 0 --theta-stop 10 --step 10 -q -o " + Quote(scan_csv.string()));
  ASSERT_EQ(scan.exit_code, 0) << scan.out;
  std::ifstream table(scan_csv);
  std::size_t rows = 0;
  for (std::string line; std::getline(table, line);) rows += !line.empty() && line[0] != '#';
  EXPECT_EQ(rows, 1u + 2u * 4160u);  // a header, then every element at both directions
  // A driven element there is solved iteratively (engine/coupling/iterative_circuit.h),
  // and compute says so.
  const fs::path driven = WritePanel(dir, "driven4160", 4160, 1);
  const auto solved =
      Lobecast("compute " + Quote(driven.string()) + " -o " + Quote((dir / "d.h5").string()));
  EXPECT_EQ(solved.exit_code, 0) << solved.out;
  EXPECT_THAT(solved.out, ::testing::HasSubstr("solve        iterative (restarted GMRES on "
                                               "streamed products, 1 unknowns"));
  EXPECT_THAT(solved.out, ::testing::HasSubstr("relative residual"));
  EXPECT_THAT(solved.out, ::testing::HasSubstr("no 0.277 GB impedance matrix"));
}

// `plot --quantity realized-gain` (io/plot/cut_traces.h, map.h, cli/plot_command.cpp):
// the trace is the file's own /pattern/realized_gain (4 pi U / P_available, coupling.h),
// read here independently with h5py, in dBi, with the definition in the title; results
// without voltage sources are refused with the reason.
TEST(RealizedGainPlot, TraceIsTheStoredRealizedGain) {
  const fs::path dir = testing::TempWorkDir("lobecast-realized-gain-plot", "beacon");
  const std::string h5 = (dir / "beacon.h5").string();
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/parasitic-beacon.toml";
  ASSERT_EQ(Lobecast("compute " + Quote(sample) + " -q -o " + Quote(h5)).exit_code, 0);

  const StoredResult r = ReadResult(h5);
  const std::optional<StoredCoupling> c = ReadCoupling(h5, r.array, r.currents);
  const std::optional<StoredAnalysis> a = ReadAnalysis(h5);
  ASSERT_TRUE(c && a);
  plot::PlotOptions o;
  o.cut = *plot::CutSpecFromString("phi=0");
  o.quantity = plot::Quantity::kRealizedGain;
  o.realized_gain_factor = c->result.radiated_w / c->result.available_w;
  const plot::CutTraces t = plot::MakeCutTraces(r, &a->analysis, o);
  ASSERT_FALSE(t.companion.has_value());
  EXPECT_EQ(t.units, "dBi");
  EXPECT_THAT(t.title_lines[1], ::testing::HasSubstr("Realized gain 4 pi U / P_available"));
  EXPECT_THAT(t.labels.front().text, ::testing::StartsWith("peak realized gain "));

  // The file's realized gain along the cut, by h5py (the grid indices of the cut).
  std::ostringstream indices;
  for (std::size_t k : t.cut.grid_index) indices << k << ',';
  const auto py = testing::RunShell(
      std::string(LOBECAST_PYTHON) + " -c \"import h5py; g = h5py.File('" + h5 +
      "')['/pattern/realized_gain'][...].ravel(); print(' '.join(repr(float(g[k])) for k in [" +
      indices.str() + "]))\" 2>&1");
  ASSERT_EQ(py.exit_code, 0) << py.out;
  std::istringstream values(py.out);
  std::size_t n = 0;
  for (double v; values >> v; ++n) {
    ASSERT_LT(n, t.main_db.size());
    EXPECT_EQ(t.main_db[n], ToDb(v)) << n;  // bit for bit: the same product, one ToDb
  }
  EXPECT_EQ(n, t.main_db.size());
  // Below the directivity trace by -10 log10(P_rad / P_available) dB (> 0: losses and
  // mismatch), so the check can tell the two apart.
  plot::PlotOptions d = o;
  d.quantity = plot::Quantity::kDirectivity;
  const plot::CutTraces td = plot::MakeCutTraces(r, &a->analysis, d);
  EXPECT_GT(td.peak_db - t.peak_db, 1.0);

  // The command draws it, and refuses results without voltage sources.
  const std::string png = (dir / "rg.png").string();
  const auto ok =
      Lobecast("plot " + Quote(h5) + " --quantity realized-gain -k map -o " + Quote(png));
  EXPECT_EQ(ok.exit_code, 0) << ok.out;
  EXPECT_TRUE(fs::exists(png));
  const std::string plain = (dir / "single.h5").string();
  ASSERT_EQ(Lobecast("compute " + Quote(std::string(LOBECAST_SAMPLES) + "/single-dipole.toml") +
                     " -q -o " + Quote(plain))
                .exit_code,
            0);
  const auto refused =
      Lobecast("plot " + Quote(plain) + " --quantity realized-gain -o " + Quote(png + "2.png"));
  EXPECT_EQ(refused.exit_code, 2) << refused.out;
  EXPECT_THAT(refused.out, ::testing::HasSubstr("which has no circuit"));
}

}  // namespace
}  // namespace lobecast
