// `plot --quantity realized-gain` (io/plot/cut_traces.h, map.h, cli/plot_command.cpp):
// the trace is the file's own /pattern/realized_gain (4 pi U / P_available, coupling.h),
// read here independently with h5py, in dBi, with the definition in the title; results
// without voltage sources are refused with the reason.
#include <cmath>
#include <filesystem>
#include <sstream>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "cli_util.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/decibels.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/coupling_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/cut_traces.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using testing::Quote;

testing::RunOutput Lobecast(const std::string& args) {
  return testing::RunShell(std::string(LOBECAST_EXE) + " " + args + " 2>&1");
}

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
