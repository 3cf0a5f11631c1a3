// Streaming (engine/pattern.h ComputePatternBlocks and PeakTracker,
// engine/pattern_stream.h PatternSampler, io/hdf5 PatternFileWriter row by row,
// `compute --stream`): the streamed result equals the in-memory one bit for bit,
// the peak and the analysis agree, and what does not fit on the disk is refused
// before the work.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cstring>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "cli_util.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/pattern.h"
#include "engine/pattern_stream.h"
#include "engine/run_estimate.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "io/input_error.h"
#include "test_util.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::Not;
using testing::TestArray;

template <typename V>
bool SameBits(const V& a, const V& b) {
  return a.size() == b.size() &&
         std::memcmp(a.data(), b.data(), sizeof(*a.data()) * static_cast<std::size_t>(a.size())) ==
             0;
}

// Every per-direction quantity, the power and the peak, to the bit.
void ExpectSameBits(const PatternResult& a, const PatternResult& b, const std::string& what) {
  EXPECT_EQ(a.grid.theta_deg, b.grid.theta_deg) << what;
  EXPECT_EQ(a.grid.phi_deg, b.grid.phi_deg) << what;
  EXPECT_TRUE(SameBits(a.field.e_theta, b.field.e_theta)) << what;
  EXPECT_TRUE(SameBits(a.field.e_phi, b.field.e_phi)) << what;
  EXPECT_TRUE(SameBits(a.intensity_w_sr, b.intensity_w_sr)) << what;
  EXPECT_TRUE(SameBits(a.directivity, b.directivity)) << what;
  EXPECT_TRUE(SameBits(a.axial_ratio_db, b.axial_ratio_db)) << what;
  EXPECT_TRUE(SameBits(a.tilt_deg, b.tilt_deg)) << what;
  EXPECT_EQ(a.sense, b.sense) << what;
  EXPECT_TRUE(SameBits(a.active_resistance_ohm, b.active_resistance_ohm)) << what;
  EXPECT_EQ(a.radiated_power_w, b.radiated_power_w) << what;
}

// The in-memory reference of PeakTracker: PeakIndex on the whole vector.
TEST(PatternStream, PeakTrackerIsPeakIndexWhateverTheBlocks) {
  testing::TestRng rng(11);
  for (int trial = 0; trial < 200; ++trial) {
    const int n = 1 + trial % 37;
    Eigen::VectorXd v(n);
    for (int i = 0; i < n; ++i) {
      // Few distinct levels and near-ties within and just beyond 1e-9.
      const double level = std::floor(rng.Uniform(0, 4));
      const double nudge = (rng.Uniform() < 0.5 ? 1 : -1) * rng.Uniform(0, 2e-9) * level;
      v[i] = level + (rng.Uniform() < 0.3 ? nudge : 0.0);
    }
    const std::size_t block = 1 + static_cast<std::size_t>(trial % 5);
    PeakTracker t;
    for (std::size_t first = 0; first < static_cast<std::size_t>(n); first += block) {
      const auto len = static_cast<Eigen::Index>(std::min<std::size_t>(block, n - first));
      t.Add(first, v.segment(static_cast<Eigen::Index>(first), len));
    }
    ASSERT_EQ(t.index(), static_cast<std::size_t>(PeakIndex(v))) << "trial " << trial;
    EXPECT_EQ(t.value(), v[PeakIndex(v)]);
  }
}

struct Case {
  std::string name;
  TestArray array;
  FieldMethod method;
};

std::vector<Case> Cases() {
  testing::TestRng rng(5);
  return {
      {"random-free-direct", testing::RandomArray(rng, 6, Ground::kNone), FieldMethod::kDirect},
      {"random-pec-auto", testing::RandomArray(rng, 5, Ground::kPec), FieldMethod::kAuto},
      {"lattice-pec-fast", testing::ZLattice(rng, 8, Ground::kPec), FieldMethod::kFast},
      {"random-free-fast", testing::RandomArray(rng, 40, Ground::kNone, 3.0), FieldMethod::kFast}};
}

AngularGrid Grid(double step_deg) {
  return AngularGrid::FromRanges({0, 180, step_deg}, {0, 360, step_deg});
}

PatternOptions Options(FieldMethod method) {
  PatternOptions o;
  o.field.method = method;
  o.field.tolerance_relative = 1e-9;
  o.block_directions = 1500;  // several blocks on a 2 deg grid (16 471 directions)
  return o;
}

// The streamed file (blocks straight into PatternFileWriter) and the in-memory file
// (ComputePattern, WriteResult) hold the same datasets, bit for bit; so do the
// results themselves and their summaries.
TEST(PatternStream, StreamedFileEqualsInMemoryFileBitForBit) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "files");
  for (const Case& c : Cases()) {
    const AngularGrid grid = Grid(2.0);
    const PatternOptions options = Options(c.method);
    const PatternResult whole = ComputePattern(c.array, c.array.currents, grid, options);
    const std::string a = (dir / (c.name + "-memory.h5")).string();
    const std::string b = (dir / (c.name + "-streamed.h5")).string();
    WriteResult(a, c.array, c.array.currents, whole, ResultMetadata{});

    PatternFileWriter writer(b, c.array, c.array.currents, grid, ResultMetadata{});
    std::size_t blocks = 0;
    const PatternResult header = ComputePatternBlocks(
        c.array, c.array.currents, grid, options,
        [&](std::size_t first_row, const PatternResult& rows) {
          ++blocks;
          writer.WriteRows(first_row, RowsOf(rows, 0, rows.grid.theta_deg.size()));
        });
    WriteResultTail(writer, header);
    writer.Finish();
    EXPECT_GT(blocks, 5u) << c.name;
    EXPECT_EQ(header.field.size(), 0u) << c.name << ": the header holds no grid";
    EXPECT_EQ(header.summary.peak_directivity, whole.summary.peak_directivity) << c.name;
    EXPECT_EQ(header.summary.peak_theta_deg, whole.summary.peak_theta_deg) << c.name;
    EXPECT_EQ(header.summary.field_error_bound_relative, whole.summary.field_error_bound_relative);
    EXPECT_EQ(header.summary.fast_transforms_used, whole.summary.fast_transforms_used);
    EXPECT_EQ(header.summary.message, whole.summary.message) << c.name;

    const StoredResult ra = ReadResult(a), rb = ReadResult(b);
    ExpectSameBits(ra.result, rb.result, c.name);
    ExpectSameBits(ra.result, whole, c.name + " (read back)");
    EXPECT_EQ(rb.result.summary.peak_directivity, whole.summary.peak_directivity) << c.name;
  }
}

// Progress comes during the stream, between blocks, not only at the end: the
// fraction rises, reaches 1, and each block is handed over once its rows are counted.
TEST(PatternStream, ProgressAdvancesWhileBlocksAreStreamed) {
  const Case c = Cases()[0];
  const AngularGrid grid = Grid(2.0);
  PatternOptions options = Options(c.method);
  std::vector<double> fractions;
  std::vector<double> at_block;  // the last fraction reported when each block arrived
  std::vector<double> done;      // the share of the grid finished with each block
  options.progress = [&](double f) { fractions.push_back(f); };
  ComputePatternBlocks(
      c.array, c.array.currents, grid, options,
      [&](std::size_t first_row, const PatternResult& rows) {
        ASSERT_FALSE(fractions.empty());
        at_block.push_back(fractions.back());
        done.push_back(
            static_cast<double>((first_row + rows.grid.theta_deg.size()) * grid.phi_deg.size()) /
            static_cast<double>(grid.size()));
      });
  ASSERT_GT(at_block.size(), 5u);
  // The bar gives the power its share s of the estimated time first, then the field
  // the rest: at each block s + (1 - s) x (share of the grid finished).
  const double power_share = (at_block[0] - done[0]) / (1.0 - done[0]);
  EXPECT_GE(power_share, 0.0);
  EXPECT_LT(power_share, 1.0);
  for (std::size_t i = 0; i < at_block.size(); ++i)
    EXPECT_NEAR(at_block[i], power_share + (1.0 - power_share) * done[i], 1e-12) << i;
  EXPECT_LT(at_block.front(), 0.2);
  for (std::size_t i = 1; i < fractions.size(); ++i) EXPECT_LE(fractions[i - 1], fractions[i]);
  EXPECT_EQ(fractions.back(), 1.0);
}

PatternResult StreamView(const TestArray& array, const AngularGrid& grid,
                         const PatternOptions& options, std::size_t max_directions,
                         std::size_t* stride) {
  PatternSampler sampler(grid, max_directions);
  const PatternResult header = ComputePatternBlocks(
      array, array.currents, grid, options,
      [&](std::size_t first_row, const PatternResult& rows) { sampler.Add(first_row, rows); });
  *stride = sampler.stride();
  return sampler.Finish(array, array.currents, header, options.field);
}

// A grid within the view's size is the view: the streamed analysis is the
// in-memory one.
TEST(PatternStream, SmallGridViewIsTheWholeResult) {
  for (const Case& c : Cases()) {
    const AngularGrid grid = Grid(2.0);
    const PatternOptions options = Options(c.method);
    const PatternResult whole = ComputePattern(c.array, c.array.currents, grid, options);
    std::size_t stride = 0;
    const PatternResult view = StreamView(c.array, grid, options, grid.size(), &stride);
    EXPECT_EQ(stride, 1u);
    ExpectSameBits(view, whole, c.name + " view");
  }
}

// A sub-sampled view keeps the grid peak (same direction and value, so the same
// auto reference), and the analysis refined from it reports the same peak and
// beamwidths as the in-memory analysis within the printed resolution (report:
// angles 4 decimals in deg, levels 2 decimals in dB).
TEST(PatternStream, SubGridAnalysisAgreesWithTheWholeGrid) {
  for (const Case& c : Cases()) {
    const AngularGrid grid = Grid(1.0);  // 65 341 directions
    PatternOptions options = Options(c.method);
    options.block_directions = 6000;
    const PatternResult whole = ComputePattern(c.array, c.array.currents, grid, options);
    std::size_t stride = 0;
    const PatternResult view = StreamView(c.array, grid, options, 2000, &stride);
    EXPECT_GE(stride, 5u) << c.name;
    EXPECT_LE(view.grid.size(), 2000u + view.grid.theta_deg.size() + view.grid.phi_deg.size());
    const Eigen::Index pv = PeakIndex(view.directivity), pw = PeakIndex(whole.directivity);
    const std::size_t npv = view.grid.phi_deg.size(), npw = grid.phi_deg.size();
    EXPECT_EQ(view.directivity[pv], whole.directivity[pw]) << c.name;
    EXPECT_EQ(view.grid.theta_deg[pv / npv], grid.theta_deg[pw / npw]) << c.name;
    EXPECT_EQ(view.grid.phi_deg[pv % npv], grid.phi_deg[pw % npw]) << c.name;
    EXPECT_EQ(AutoReference(view), AutoReference(whole)) << c.name;

    const PatternAnalysis a = AnalyzePattern(c.array, c.array.currents, whole);
    const PatternAnalysis b = AnalyzePattern(c.array, c.array.currents, view);
    EXPECT_NEAR(a.peak.directivity_dbi, b.peak.directivity_dbi, 0.005) << c.name;
    EXPECT_NEAR(a.peak.direction.theta_deg, b.peak.direction.theta_deg, 5e-5) << c.name;
    if (!std::isnan(a.peak.direction.phi_deg)) {
      EXPECT_NEAR(a.peak.direction.phi_deg, b.peak.direction.phi_deg, 5e-5) << c.name;
    }
    for (const auto& [x, y] : {std::pair{&a.elevation_cut, &b.elevation_cut},
                               std::pair{&a.orthogonal_cut, &b.orthogonal_cut}}) {
      EXPECT_EQ(x->plane, y->plane) << c.name;
      if (std::isfinite(x->half_power_width_deg)) {
        EXPECT_NEAR(x->half_power_width_deg, y->half_power_width_deg, 5e-5) << c.name;
      } else {
        EXPECT_EQ(x->half_power_width_deg, y->half_power_width_deg) << c.name;
      }
    }
  }
}

// A result whose grid would not fit in memory is refused by the reader (report,
// export, plot, link, exposure read the whole grid) before its grid datasets are
// read, naming both sizes; one that fits is read as before.
TEST(PatternStream, ReaderRefusesAGridLargerThanTheMemory) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "reader");
  const Case c = Cases()[0];
  const AngularGrid grid = Grid(2.0);
  const std::string path = (dir / "r.h5").string();
  WriteResult(path, c.array, c.array.currents,
              ComputePattern(c.array, c.array.currents, grid, Options(c.method)), ResultMetadata{});
  const double need = kReadBytesPerDirection * static_cast<double>(grid.size());
  EXPECT_EQ(ReadResult(path, need).result.grid.size(), grid.size());
  try {
    ReadResult(path, need / 2);
    ADD_FAILURE() << "a grid above the limit was read";
  } catch (const InputError& e) {
    EXPECT_THAT(e.what(), HasSubstr("16471 directions needs about 0.00133 GB"));
    EXPECT_THAT(e.what(), HasSubstr("above the 0.000667 GB available"));
  }
}

// The estimate behind the automatic choice: in memory a 1e8-direction grid needs
// its ~65 bytes a direction; streamed only a block and the view, whatever the grid.
TEST(PatternStream, StreamedEstimateIsBoundedByTheBlock) {
  RunSize size;
  size.dipoles = 16;
  size.directions = 100'000'000;
  const double in_memory = EstimateRun(size).memory_bytes;
  size.streamed = true;
  const double streamed = EstimateRun(size).memory_bytes;
  EXPECT_GT(in_memory, 65e8);
  EXPECT_LT(streamed, 0.5e9);
  size.directions *= 10;
  EXPECT_EQ(EstimateRun(size).memory_bytes, streamed);
  // A grid within one block costs no more streamed than in memory, beyond the view.
  size.directions = 1000;
  const double small_streamed = EstimateRun(size).memory_bytes;
  size.streamed = false;
  EXPECT_LE(small_streamed, 2 * EstimateRun(size).memory_bytes);
}

// ------------------------------------------------------------------ the command

std::string Sample(const std::string& name) { return std::string(LOBECAST_SAMPLES) + "/" + name; }

testing::RunOutput Lobecast(const std::string& args, const std::string& env = "") {
  return testing::RunShell(env + " " + testing::Quote(LOBECAST_EXE) + " " + args + " 2>&1");
}

// `compute --stream` writes the same datasets as `compute`, bit for bit, with the
// same analysis (a sample grid is within the view: the whole grid), and says so.
TEST(PatternStream, ComputeStreamEqualsComputeOnTheSamples) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "cli");
  for (const char* name : {"single-dipole.toml", "planar-4x4-ground.toml", "turnstile.toml"}) {
    const std::string a = (dir / (std::string(name) + "-memory.h5")).string();
    const std::string b = (dir / (std::string(name) + "-streamed.h5")).string();
    const auto ra = Lobecast("compute -q " + testing::Quote(Sample(name)) + " -o " + a);
    ASSERT_EQ(ra.exit_code, 0) << ra.out;
    const auto rb = Lobecast("compute --stream " + testing::Quote(Sample(name)) + " -o " + b);
    ASSERT_EQ(rb.exit_code, 0) << rb.out;
    EXPECT_THAT(rb.out, HasSubstr("streamed     to the file"));
    EXPECT_THAT(rb.out, HasSubstr("analysis on  the whole streamed grid"));
    const StoredResult sa = ReadResult(a), sb = ReadResult(b);
    ExpectSameBits(sa.result, sb.result, name);
    // The stored analysis, through the report's JSON (the path and time aside).
    const auto json = [&](const std::string& file) {
      fs::copy_file(file, dir / "same-name.h5", fs::copy_options::overwrite_existing);
      std::string out = Lobecast("report --json " + (dir / "same-name.h5").string()).out;
      return out.erase(out.find("\"seconds\""));
    };
    const std::string report_a = json(a);
    EXPECT_THAT(report_a, HasSubstr("\"peak\""));
    EXPECT_EQ(report_a, json(b)) << name;
  }
}

// A result that would not fit on the file system is refused before the work, exit
// 1 (a file-system failure, CONVENTIONS §4), with both sizes; nothing is left.
TEST(PatternStream, TooSmallADiskIsRefusedBeforeTheWork) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "disk");
  const std::string out = (dir / "r.h5").string();
  const auto r =
      Lobecast("compute --stream " + testing::Quote(Sample("single-dipole.toml")) + " -o " + out,
               "LOBECAST_TEST_FREE_BYTES=1000000");
  EXPECT_EQ(r.exit_code, 1) << r.out;
  EXPECT_THAT(r.out, HasSubstr("the streamed result would need up to 0.00615 GB"));
  EXPECT_THAT(r.out, HasSubstr("has 0.001 GB free"));
  EXPECT_TRUE(fs::is_empty(dir));
  // The same run with room for it goes through.
  EXPECT_EQ(
      Lobecast("compute -q --stream " + testing::Quote(Sample("single-dipole.toml")) + " -o " + out,
               "LOBECAST_TEST_FREE_BYTES=7000000")
          .exit_code,
      0);
}

// Above the memory limit the run streams by itself (where it was refused before)
// and says why: a 0.15 deg grid (2.9 M directions) needs ~0.3 GB in memory by the
// estimate, ~0.23 GB streamed (engine/run_estimate.cpp).
TEST(PatternStream, RunAboveTheMemoryLimitStreamsByItself) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "auto");
  const fs::path input = dir / "fine.toml";
  std::ofstream(input) << "frequency = 433.92e6\n[grid]\n"
                          "theta = { start = 0, stop = 180, step = 0.15 }\n"
                          "phi = { start = 0, stop = 360, step = 0.15 }\n"
                          "[[dipole]]\nposition = [0, 0, 0]\norientation = [1, 0, 0]\n"
                          "length = 0.01\ncurrent = { magnitude = 1.0, phase = 0.0 }\n";
  const std::string out = (dir / "fine.h5").string();
  const auto r = Lobecast("compute --max-memory-gb 0.26 " + input.string() + " -o " + out);
  ASSERT_EQ(r.exit_code, 0) << r.out;
  EXPECT_THAT(r.out, HasSubstr("streamed     to the file in blocks of theta rows as they were "
                               "finished (the in-memory estimate of 0.298 GB is above the memory "
                               "limit of 0.26 GB)"));
  EXPECT_THAT(r.out, HasSubstr("analysis on  a 1-in-4 sub-grid of the streamed grid"));
  EXPECT_EQ(ReadResult(out).result.grid.size(), 1201u * 2401u);
}

// Without an analysis the summary still names the grid peak (from the view).
TEST(PatternStream, StreamWithoutAnalysisStillPrintsThePeak) {
  const fs::path dir = testing::TempWorkDir("pattern-stream", "no-analysis");
  const auto r =
      Lobecast("compute --stream --no-analysis " + testing::Quote(Sample("broadside-line-8.toml")) +
               " -o " + (dir / "r.h5").string());
  ASSERT_EQ(r.exit_code, 0) << r.out;
  EXPECT_THAT(r.out, HasSubstr("peak         D = "));
  EXPECT_THAT(r.out, Not(HasSubstr("analysis on")));
}

// What cannot stream yet is refused when asked for.
TEST(PatternStream, StreamRefusesWhatItCannotStream) {
  const auto plots = Lobecast("compute --stream --plots /tmp " +
                              testing::Quote(Sample("single-dipole.toml")) + " -o /tmp/x.h5");
  EXPECT_EQ(plots.exit_code, 2) << plots.out;
  EXPECT_THAT(plots.out, HasSubstr("--stream"));
  const auto sweep =
      Lobecast("compute --stream " + testing::Quote(Sample("design-line-sweep-phase.toml")) +
               " -o /tmp/x.h5");
  EXPECT_EQ(sweep.exit_code, 2) << sweep.out;
  EXPECT_THAT(sweep.out, HasSubstr("frequency sweep"));
}

}  // namespace
}  // namespace lobecast
