// ComputePattern's method and power options: the fast field path and the streamed
// (matrix-free) power give the same answers as the direct sum and the closed-form
// matrix route, and a result without the resistance matrix round-trips through HDF5.
#include <filesystem>
#include <random>

#include <gtest/gtest.h>

#include "engine/error.h"
#include "engine/pattern.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "tests/test_util.h"

namespace lobecast {
namespace {

// A 12 x 12 lattice of random-current x dipoles over a PEC plane: big enough for
// the fast path, small enough to be quick.
testing::TestArray Panel() {
  testing::TestArray a;
  a.frequency_hz = 1e9;
  a.ground = Ground::kPec;
  const double lambda = a.wavelength_m();
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (int iy = 0; iy < 12; ++iy) {
    for (int ix = 0; ix < 12; ++ix) {
      Dipole d;
      d.position_m = Vec3(0.5 * lambda * ix, 0.5 * lambda * iy, 0.25 * lambda);
      d.orientation = Vec3::UnitX();
      d.length_m = 0.05 * lambda;
      a.Add(d, Complex(u(rng), u(rng)));
    }
  }
  return a;
}

TEST(PatternOptions, FastFieldMatchesDirectWithinTolerance) {
  const testing::TestArray a = Panel();
  const AngularGrid g = AngularGrid::FromRanges({0, 180, 1}, {0, 360, 2});
  PatternOptions direct, fast;
  direct.field.method = FieldMethod::kDirect;
  fast.field.method = FieldMethod::kFast;
  fast.field.tolerance_relative = 1e-9;
  const PatternResult rd = ComputePattern(a, a.currents, g, direct);
  const PatternResult rf = ComputePattern(a, a.currents, g, fast);
  EXPECT_EQ(rd.summary.field_method_used, FieldMethod::kDirect);
  EXPECT_EQ(rf.summary.field_method_used, FieldMethod::kFast);
  EXPECT_EQ(rf.summary.field_method_given, FieldMethod::kFast);
  EXPECT_TRUE(rd.summary.fast_transforms_used.empty());
  EXPECT_EQ(rf.summary.fast_transforms_used,
            std::vector<FastTransform>{FastTransform::kLattice});  // a 12 x 12 grid over ground
  const double peak =
      std::sqrt((rd.field.e_theta.cwiseAbs2() + rd.field.e_phi.cwiseAbs2()).maxCoeff());
  const double err = std::max((rf.field.e_theta - rd.field.e_theta).cwiseAbs().maxCoeff(),
                              (rf.field.e_phi - rd.field.e_phi).cwiseAbs().maxCoeff()) /
                     peak;
  EXPECT_LE(err, 1e-9) << "fast vs direct, relative to the peak |rE|";
  EXPECT_LE(err, rf.summary.field_error_bound_relative) << "the reported bound must hold";
}

TEST(PatternOptions, StreamedPowerMatchesMatrixAndStoresNoMatrix) {
  const testing::TestArray a = Panel();
  const AngularGrid g = AngularGrid::FromRanges({0, 90, 5}, {0, 360, 10});
  PatternOptions matrix, streamed;
  streamed.resistance_matrix_max_dipoles = 10;  // below N = 144
  const PatternResult rm = ComputePattern(a, a.currents, g, matrix);
  const PatternResult rs = ComputePattern(a, a.currents, g, streamed);
  EXPECT_EQ(rm.summary.power_route, PowerRoute::kMatrix);
  EXPECT_EQ(rs.summary.power_route, PowerRoute::kStreamed);
  EXPECT_EQ(rm.resistance_ohm.rows(), 144);
  EXPECT_EQ(rs.resistance_ohm.size(), 0);
  EXPECT_NEAR(rs.radiated_power_w, rm.radiated_power_w, 1e-12 * rm.radiated_power_w);
  for (Eigen::Index m = 0; m < 144; ++m) {
    EXPECT_NEAR(rs.active_resistance_ohm[m], rm.active_resistance_ohm[m],
                1e-10 * rm.active_resistance_ohm.cwiseAbs().maxCoeff());
  }
  // Asked for explicitly, the matrix is built even above the limit.
  streamed.store_resistance_matrix = true;
  EXPECT_EQ(ComputePattern(a, a.currents, g, streamed).resistance_ohm.rows(), 144);

  // A result without the matrix writes and reads back; the matrix stays absent.
  const std::string path =
      (std::filesystem::temp_directory_path() / "lobecast-streamed-power.h5").string();
  WriteResult(path, a, a.currents, rs, ResultMetadata{});
  const StoredResult back = ReadResult(path);
  EXPECT_EQ(back.result.resistance_ohm.size(), 0);
  EXPECT_DOUBLE_EQ(back.result.radiated_power_w, rs.radiated_power_w);
  EXPECT_EQ(back.result.summary.power_route, PowerRoute::kStreamed);
  std::filesystem::remove(path);
}

TEST(PatternOptions, BlocksOfThetaRowsGiveTheSameResult) {
  // Planning the grid in blocks only bounds memory: the direct sum per direction
  // is the same arithmetic, so blocked and unblocked agree to rounding, and the
  // fast path stays within its tolerance of the direct sum.
  const testing::TestArray a = Panel();
  const AngularGrid g = AngularGrid::FromRanges({0, 180, 5}, {0, 360, 5});
  PatternOptions whole, blocked, blocked_fast;
  whole.field.method = blocked.field.method = FieldMethod::kDirect;
  blocked.block_directions = 500;  // 73 phi values: 6 theta rows per block, 7 blocks
  blocked_fast.block_directions = 500;
  blocked_fast.field.method = FieldMethod::kFast;
  const PatternResult rw = ComputePattern(a, a.currents, g, whole);
  const PatternResult rb = ComputePattern(a, a.currents, g, blocked);
  const PatternResult rf = ComputePattern(a, a.currents, g, blocked_fast);
  const double peak =
      std::sqrt((rw.field.e_theta.cwiseAbs2() + rw.field.e_phi.cwiseAbs2()).maxCoeff());
  EXPECT_LE((rb.field.e_theta - rw.field.e_theta).cwiseAbs().maxCoeff(), 1e-13 * peak);
  EXPECT_LE((rb.field.e_phi - rw.field.e_phi).cwiseAbs().maxCoeff(), 1e-13 * peak);
  EXPECT_LE((rf.field.e_theta - rw.field.e_theta).cwiseAbs().maxCoeff(), 1e-9 * peak);
  EXPECT_LE((rf.field.e_phi - rw.field.e_phi).cwiseAbs().maxCoeff(), 1e-9 * peak);
  EXPECT_EQ(rf.summary.field_method_used, FieldMethod::kFast);
  EXPECT_EQ(rb.summary.num_directions, g.size());
  EXPECT_DOUBLE_EQ(rb.summary.peak_directivity, rw.summary.peak_directivity);
}

TEST(ComputeSummary, FastTransformNamesRoundTrip) {
  // The result file stores the transforms as one "+"-joined name; every list the
  // blocks can produce must read back as itself.
  using T = FastTransform;
  const std::vector<std::vector<T>> lists = {
      {}, {T::kLattice}, {T::kType3}, {T::kLattice, T::kType3}, {T::kType3, T::kLattice}};
  for (const std::vector<T>& list : lists) {
    const std::string name = FastTransformsToString(list);
    EXPECT_EQ(FastTransformsFromString(name), list) << name;
  }
  EXPECT_EQ(FastTransformsToString({}), "none");
  EXPECT_EQ(FastTransformsToString({T::kLattice, T::kType3}), "lattice+type-3");
  EXPECT_EQ(FastTransformsFromString("LATTICE"), std::vector<T>{T::kLattice});
  for (const char* bad : {"", "type-2", "lattice+", "+lattice", "none+lattice"}) {
    EXPECT_FALSE(FastTransformsFromString(bad).has_value()) << bad;
  }
  EXPECT_EQ(PowerRouteFromString("Streamed"), PowerRoute::kStreamed);
  EXPECT_FALSE(PowerRouteFromString("stream").has_value());
}

TEST(ComputeSummary, ReportsSayWhatWasAskedAndUsed) {
  const testing::TestArray a = Panel();
  const AngularGrid g = AngularGrid::FromRanges({0, 90, 5}, {0, 360, 10});
  PatternOptions o;
  o.field.method = FieldMethod::kFast;
  o.resistance_matrix_max_dipoles = 10;  // below N = 144: streamed
  const ComputeSummary s = ComputePattern(a, a.currents, g, o).summary;
  const std::string brief = s.BriefReport();
  EXPECT_EQ(brief.find('\n'), std::string::npos) << brief;
  EXPECT_EQ(brief.rfind("field fast (asked fast), lattice transform, error bound ", 0), 0) << brief;
  EXPECT_NE(brief.find("; power streamed (no resistance matrix stored)"), std::string::npos)
      << brief;
  EXPECT_NE(s.message.find("144 dipoles exceed 10"), std::string::npos) << s.message;
  const std::string full = s.FullReport();
  EXPECT_EQ(full.rfind(brief + "\n", 0), 0) << full;
  EXPECT_NE(full.find("144 dipoles, 288 sources, 703 directions"), std::string::npos) << full;
  EXPECT_NE(full.find("message      " + s.message), std::string::npos) << full;

  o.field.method = FieldMethod::kDirect;
  o.resistance_matrix_max_dipoles = 4096;
  const ComputeSummary d = ComputePattern(a, a.currents, g, o).summary;
  EXPECT_EQ(d.BriefReport(), "field direct (asked direct); power matrix (closed form)");
  EXPECT_TRUE(d.message.empty()) << d.message;
}

TEST(PatternOptions, InvalidToleranceIsRejected) {
  PatternOptions o;
  o.field.tolerance_relative = 0.5;
  const testing::TestArray a = Panel();
  EXPECT_THROW(ComputePattern(a, a.currents, AngularGrid::FromRanges({0, 90, 10}, {0, 360, 30}), o),
               InvalidArgument);
}

}  // namespace
}  // namespace lobecast
