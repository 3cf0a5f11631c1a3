// The scan impedance plot (io/plot/scan_plot.h): a synthetic table with known
// |Gamma| read back from the pixels through the returned geometry, the choice of
// lines for a large array, the refusals, and `lobecast scan --plot` end to end on
// the steered sample (left in <build>/tests/plot-review/ for a person to look at).
#include <complex>
#include <filesystem>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "engine/constants.h"
#include "engine/coupling/scan.h"
#include "io/input_error.h"
#include "io/plot/canvas.h"
#include "io/plot/scan_plot.h"
#include "pixel_util.h"
#include "tests/cli_util.h"

namespace lobecast::plot {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::Not;

fs::path ReviewDir() {
  const fs::path d = fs::current_path() / "plot-review";
  fs::create_directories(d);
  return d;
}

// theta = 0, 10, ..., 60 deg in the plane phi = 0; element m has the constant
// |Gamma| magnitudes[m] (with a phase that varies, which the plot ignores).
ScanImpedanceTable ConstantTable(const std::vector<double>& magnitudes) {
  ScanImpedanceTable t;
  const Eigen::Index ns = 7, n = static_cast<Eigen::Index>(magnitudes.size());
  for (Eigen::Index i = 0; i < ns; ++i) {
    t.theta_rad.push_back(10.0 * static_cast<double>(i) * kDegree);
    t.phi_rad.push_back(0.0);
  }
  t.active_impedance_ohm = Eigen::MatrixXcd::Constant(ns, n, Complex(50, 0));
  t.reflection.resize(ns, n);
  for (Eigen::Index i = 0; i < ns; ++i)
    for (Eigen::Index m = 0; m < n; ++m)
      t.reflection(i, m) =
          std::polar(magnitudes[static_cast<std::size_t>(m)], 0.4 * static_cast<double>(i));
  t.accepted_w = Eigen::VectorXd::Ones(ns);
  return t;
}

ScanPlotLabels Labels() {
  ScanPlotLabels l;
  l.array_name = "synthetic line";
  l.frequency_hz = 2.45e9;
  l.reference = "50 ohm (reference_impedance)";
  return l;
}

TEST(ScanPlot, ConstantHalfReflectionIsDrawnAtItsHeightInItsColour) {
  const ScanImpedanceTable t = ConstantTable({0.1, 0.5, 0.9});
  const fs::path out = ReviewDir() / "scan-synthetic.png";
  const ScanPlotGeometry g = WriteScanPlot(t, Labels(), out.string());
  ASSERT_EQ(g.lines.size(), 3u);
  EXPECT_EQ(g.lines[1].element, 1);
  EXPECT_NEAR(g.YOf(0.0), g.top_px + g.height_px, 1e-9);
  EXPECT_NEAR(g.YOf(1.0), g.top_px, 1e-9);
  EXPECT_DOUBLE_EQ(g.gamma_top, 1.0);
  // Distinct colours: no two lines within 20 levels on every channel.
  for (std::size_t a = 0; a < g.lines.size(); ++a)
    for (std::size_t b = a + 1; b < g.lines.size(); ++b) {
      const Colour& ca = g.lines[a].colour;
      const Colour& cb = g.lines[b].colour;
      EXPECT_GT(std::max({std::abs(ca.r - cb.r), std::abs(ca.g - cb.g), std::abs(ca.b - cb.b)}),
                20.0 / 255)
          << a << " " << b;
    }
  const RasterImage img = ReadPng(out.string());
  // Between two samples (no dot there): the 2 px line covers the pixel holding
  // (theta, 0.5) entirely, so it has the line's colour.
  for (double theta : {15.0, 35.0, 55.0}) {
    const int x = static_cast<int>(g.XOf(theta)), y = static_cast<int>(g.YOf(0.5));
    EXPECT_LE(ChannelDistance(img.At(x, y), g.lines[1].colour), 4) << theta;
    // ...and not at 0.6 or 0.4, where nothing is drawn.
    for (double off : {-0.1, 0.1})
      EXPECT_GT(ChannelDistance(img.At(x, static_cast<int>(g.YOf(0.5 + off))), g.lines[1].colour),
                40)
          << theta << " " << off;
  }
}

TEST(ScanPlot, ReflectionAboveOneRaisesTheTopInsteadOfClipping) {
  const ScanImpedanceTable t = ConstantTable({0.2, 1.3});
  const ScanPlotGeometry g =
      WriteScanPlot(t, Labels(), (ReviewDir() / "scan-above-one.png").string());
  EXPECT_DOUBLE_EQ(g.gamma_top, 1.5);
  EXPECT_GT(g.YOf(1.3), g.top_px);
}

TEST(ScanPlot, ManyElementsDrawTheWorstTheMedianAndTheBestByMean) {
  // 20 elements with |Gamma|_m = 0.02 * (7 m mod 20): all different, worst m = 17
  // (19 * 0.02), best m = 0 (0), median (10th of 20 from the worst, value 10 * 0.02)
  // m = 10; a 21st element with no defined |Gamma| ranks nowhere.
  std::vector<double> mags;
  for (int m = 0; m < 20; ++m) mags.push_back(0.02 * ((7 * m) % 20));
  ScanImpedanceTable t = ConstantTable(mags);
  t.reflection.conservativeResize(Eigen::NoChange, 21);
  t.reflection.col(20).setConstant(Complex(std::nan(""), std::nan("")));
  EXPECT_THAT(ScanPlotElements(t), ::testing::ElementsAre(17, 10, 0));
  const ScanPlotGeometry g = WriteScanPlot(t, Labels(), (ReviewDir() / "scan-many.png").string());
  ASSERT_EQ(g.lines.size(), 3u);
  EXPECT_EQ(g.lines[0].label, "#17 worst");
  EXPECT_EQ(g.lines[2].label, "#0 best");
  // Up to 16 every element is drawn, in order.
  const ScanImpedanceTable sixteen = ConstantTable(std::vector<double>(16, 0.3));
  EXPECT_EQ(ScanPlotElements(sixteen).size(), 16u);
  EXPECT_EQ(ScanPlotElements(sixteen)[15], 15);
}

TEST(ScanPlot, BadExtensionIsRefusedAndWritesNothing) {
  const fs::path dir = testing::TempWorkDir("lobecast-scan-plot-test", "bad");
  const fs::path gif = dir / "scan.gif";
  EXPECT_THROW(WriteScanPlot(ConstantTable({0.5}), Labels(), gif.string()), InputError);
  EXPECT_TRUE(fs::is_empty(dir));
}

TEST(ScanPlotCli, SteeredSamplePlotAndRefusals) {
  const std::string sample = std::string(LOBECAST_SAMPLES) + "/steered-line-scan.toml";
  const fs::path png = ReviewDir() / "scan-steered-line-scan.png";
  fs::remove(png);
  const auto ok = testing::RunShell(std::string(LOBECAST_EXE) + " scan " + testing::Quote(sample) +
                                    " --theta-stop 60 --step 2 --plot " +
                                    testing::Quote(png.string()) + " 2>&1");
  ASSERT_EQ(ok.exit_code, 0) << ok.out;
  EXPECT_THAT(ok.out, HasSubstr("wrote        " + png.string()));
  const RasterImage img = ReadPng(png.string());
  EXPECT_EQ(img.width, 800);
  EXPECT_EQ(img.height, 600);
  for (const char* ext : {".svg", ".pdf"}) {
    const fs::path other =
        testing::TempWorkDir("lobecast-scan-plot-test", "cli") / (std::string("scan") + ext);
    const auto run =
        testing::RunShell(std::string(LOBECAST_EXE) + " scan " + testing::Quote(sample) +
                          " -q --plot " + testing::Quote(other.string()) + " 2>&1");
    EXPECT_EQ(run.exit_code, 0) << run.out;
    EXPECT_GT(fs::file_size(other), 1000u) << ext;
  }
  // A bad extension is refused before any work: exit 2, nothing written.
  const fs::path dir = testing::TempWorkDir("lobecast-scan-plot-test", "cli-bad");
  const auto bad =
      testing::RunShell(std::string(LOBECAST_EXE) + " scan " + testing::Quote(sample) + " --plot " +
                        testing::Quote((dir / "scan.gif").string()) + " 2>&1");
  EXPECT_EQ(bad.exit_code, 2) << bad.out;
  EXPECT_THAT(bad.out, HasSubstr(".png, .svg or .pdf"));
  EXPECT_THAT(bad.out, Not(HasSubstr("scan         active")));
  EXPECT_TRUE(fs::is_empty(dir));
}

}  // namespace
}  // namespace lobecast::plot
