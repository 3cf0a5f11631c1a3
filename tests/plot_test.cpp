// Plots: the colour scale, the beam figures read off a cut, every plot kind for
// every sample array in every format through the CLI, and pixel checks against
// the known pattern of a single z dipole (D = 1.5 sin^2 theta; Balanis,
// Antenna Theory, 4th ed., 2016, sec. 4.2, from memory) and of a turnstile
// (right-hand circular toward +z, left-hand toward -z, see its sample file).
//
// Every plot is also left in <build>/tests/plot-review/ for a person to look at.
#include <gtest/gtest.h>

#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <list>
#include <set>
#include <string>
#include <vector>

#include "cli_util.h"
#include "engine/analysis/pattern_analysis.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/canvas.h"
#include "io/plot/colormap.h"
#include "io/plot/cut_traces.h"
#include "io/plot/frame.h"
#include "io/plot/plot.h"
#include "pixel_util.h"

namespace lobecast::plot {
namespace {

namespace fs = std::filesystem;
using testing::ReadFile;

fs::path ReviewDir() {
  const fs::path d = fs::current_path() / "plot-review";
  fs::create_directories(d);
  return d;
}

fs::path WorkDir() {
  const fs::path d = fs::current_path() / "plot-test.work";
  fs::create_directories(d);
  return d;
}

// Runs the CLI; returns its exit code, with stderr in *err.
int RunCli(const std::string& args, std::string* err = nullptr) {
  const fs::path err_file = WorkDir() / ("stderr-" + std::to_string(::getpid()) + ".txt");
  const std::string cmd =
      std::string(LOBECAST_EXE) + " " + args + " >/dev/null 2>" + err_file.string();
  const int status = std::system(cmd.c_str());
  if (err) *err = ReadFile(err_file);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string Quote(const fs::path& p) {
  std::string q(1, '\'');
  q.append(p.string());
  q.push_back('\'');
  return q;
}

// Computes a sample once per test process (the result files are small).
fs::path ResultFor(const std::string& sample) {
  const fs::path out = WorkDir() / (sample + ".h5");
  const fs::path in = fs::path(LOBECAST_SAMPLES) / (sample + ".toml");
  if (!fs::exists(out) || fs::last_write_time(out) < fs::last_write_time(LOBECAST_EXE)) {
    std::string err;
    const int rc = RunCli("compute " + Quote(in) + " -o " + Quote(out) + " --quiet", &err);
    EXPECT_EQ(rc, 0) << err;
  }
  return out;
}

std::vector<std::string> Samples() {
  std::vector<std::string> names;
  for (const auto& e : fs::directory_iterator(LOBECAST_SAMPLES))
    if (e.path().extension() == ".toml" && !testing::IsRequirementsSample(e.path()))
      names.push_back(e.path().stem().string());
  std::sort(names.begin(), names.end());
  return names;
}

Colour FromRgb(const Rgb& c) { return {c.r, c.g, c.b, 1}; }

// ---------------------------------------------------------------------------
// Colour scale

TEST(PlotColormap, RampIsInGamutWithRisingLightnessAndEvenSteps) {
  double previous_l = -1;
  const int n = 200;
  std::vector<double> steps;
  Oklab prev{};
  for (int k = 0; k <= n; ++k) {
    const Oklab c = RampOklab(static_cast<double>(k) / n);
    bool in_gamut = false;
    OklabToSrgb(c, &in_gamut);
    EXPECT_TRUE(in_gamut) << "t = " << static_cast<double>(k) / n;
    EXPECT_GT(c.l, previous_l);
    previous_l = c.l;
    if (k > 0) steps.push_back(std::hypot(c.l - prev.l, c.a - prev.a, c.b - prev.b));
    prev = c;
  }
  const auto [lo, hi] = std::minmax_element(steps.begin(), steps.end());
  EXPECT_LT(*hi / *lo, 1.0 + 1e-9);  // constant chroma and linear L, h: equal steps
}

TEST(PlotColormap, OklabConversionsInvertEachOtherAndMapWhiteToL1) {
  // Ottosson (2020): sRGB white is L = 1, a = b = 0 (to the matrices' 1e-4 or so).
  const Oklab w = SrgbToOklab({1, 1, 1});
  EXPECT_NEAR(w.l, 1.0, 1e-4);
  EXPECT_NEAR(w.a, 0.0, 1e-4);
  EXPECT_NEAR(w.b, 0.0, 1e-4);
  for (const Rgb c : {Rgb{0.2, 0.5, 0.8}, Rgb{0.9, 0.1, 0.3}, Rgb{0.05, 0.95, 0.4}}) {
    const Rgb back = OklabToSrgb(SrgbToOklab(c));
    EXPECT_NEAR(back.r, c.r, 1e-6);
    EXPECT_NEAR(back.g, c.g, 1e-6);
    EXPECT_NEAR(back.b, c.b, 1e-6);
  }
  // Right, left and linear sense colours are in gamut and tell apart.
  for (int s : {-1, 0, 1}) {
    bool ok = false;
    const Oklab lab = SrgbToOklab(SenseColour(s));
    OklabToSrgb(lab, &ok);
    EXPECT_TRUE(ok);
  }
  const Oklab r = SrgbToOklab(SenseColour(1)), l = SrgbToOklab(SenseColour(-1));
  EXPECT_GT(std::hypot(r.a - l.a, r.b - l.b), 0.2);
}

// ---------------------------------------------------------------------------
// Every kind, every sample, every format

struct FileChecks {
  static void Png(const fs::path& p, int w, int h) {
    ASSERT_TRUE(fs::exists(p)) << p;
    const RasterImage img = ReadPng(p.string());
    EXPECT_EQ(img.width, w) << p;
    EXPECT_EQ(img.height, h) << p;
    // Not blank: a good share of non-white pixels, and many distinct colours.
    std::size_t non_white = 0;
    std::set<std::uint32_t> colours;
    for (std::uint32_t v : img.argb) {
      if ((v & 0xffffff) != 0xffffff) ++non_white;
      if (colours.size() < 5000) colours.insert(v);
    }
    const double share = static_cast<double>(non_white) / static_cast<double>(img.argb.size());
    EXPECT_GT(share, 0.03) << p;
    EXPECT_LT(share, 0.97) << p;
    EXPECT_GT(colours.size(), 30u) << p;
  }
  static void Svg(const fs::path& p) {
    ASSERT_TRUE(fs::exists(p)) << p;
    const std::string s = ReadFile(p);
    EXPECT_EQ(s.rfind("<?xml", 0), 0u) << p;
    EXPECT_NE(s.find("<svg"), std::string::npos) << p;
    EXPECT_NE(s.find("</svg>"), std::string::npos) << p;
    if (fs::exists("/usr/bin/python3")) {
      const std::string cmd =
          "/usr/bin/python3 -c \"import sys, xml.etree.ElementTree as E; "
          "E.parse(sys.argv[1])\" " +
          Quote(p) + " 2>/dev/null";
      EXPECT_EQ(std::system(cmd.c_str()), 0) << "not well-formed XML: " << p;
    }
  }
  static void Pdf(const fs::path& p) {
    ASSERT_TRUE(fs::exists(p)) << p;
    const std::string s = ReadFile(p);
    EXPECT_EQ(s.rfind("%PDF-", 0), 0u) << p;
    EXPECT_NE(s.find("%%EOF"), std::string::npos) << p;
  }
};

class PlotEverySample : public ::testing::TestWithParam<std::string> {};

TEST_P(PlotEverySample, EveryKindToEveryFormat) {
  const std::string sample = GetParam();
  const fs::path h5 = ResultFor(sample);
  const fs::path review = ReviewDir();
  struct Variant {
    std::string name, args;
  };
  const std::vector<Variant> variants = {
      {"polar-phi0", "--kind polar --cut phi=0"},
      {"cartesian-phi0", "--kind cartesian --cut phi=0"},
      {"map-theta-phi", "--kind map"},
      {"polarization-theta-phi", "--kind polarization"},
  };
  for (const Variant& v : variants) {
    for (const char* ext : {".png", ".svg", ".pdf"}) {
      const fs::path out =
          (std::string(ext) == ".png" ? review : WorkDir()) / (sample + "-" + v.name + ext);
      fs::remove(out);
      std::string err;
      ASSERT_EQ(RunCli("plot " + Quote(h5) + " " + v.args + " -o " + Quote(out), &err), 0)
          << v.args << " " << ext << ": " << err;
      if (std::string(ext) == ".png") FileChecks::Png(out, 800, 600);
      if (std::string(ext) == ".svg") FileChecks::Svg(out);
      if (std::string(ext) == ".pdf") FileChecks::Pdf(out);
    }
  }
  // More views for review, PNG only, some at other sizes.
  const std::vector<Variant> extra = {
      {"polar-phi90", "--kind polar --cut phi=90 --size 700x700"},
      {"polar-theta90",
       "--kind polar --cut theta=" + std::string(sample == "planar-4x4-ground" ? "60" : "90")},
      {"cartesian-phi90-normalized", "--kind cartesian --cut phi=90 --normalize"},
      {"map-uv", "--kind map --projection uv --contour-db 3"},
      {"map-az-el", "--kind map --projection az-el --size 1000x600"},
      {"polarization-uv", "--kind polarization --projection uv"},
  };
  for (const Variant& v : extra) {
    const fs::path out = review / (sample + "-" + v.name + ".png");
    fs::remove(out);
    std::string err;
    ASSERT_EQ(RunCli("plot " + Quote(h5) + " " + v.args + " -o " + Quote(out), &err), 0)
        << v.args << ": " << err;
    int w = 800, h = 600;
    if (v.args.find("700x700") != std::string::npos) w = h = 700;
    if (v.args.find("1000x600") != std::string::npos) w = 1000;
    FileChecks::Png(out, w, h);
  }
}

INSTANTIATE_TEST_SUITE_P(Samples, PlotEverySample, ::testing::ValuesIn(Samples()),
                         [](const auto& info) {
                           std::string n = info.param;
                           std::replace(n.begin(), n.end(), '-', '_');
                           return n;
                         });

// ---------------------------------------------------------------------------
// Pixel checks against known patterns

StoredResult ZDipole() { return ReadResult(ResultFor("single-dipole").string()); }

// The analysis compute stores with a result (default options, auto reference): the
// figures a plot draws.
const PatternAnalysis* AnalysisOf(const StoredResult& r) {
  static std::list<std::pair<std::string, PatternAnalysis>> cache;  // stable addresses
  const std::string key = r.metadata.name + "|" + std::to_string(r.result.grid.size()) + "|" +
                          std::to_string(r.result.radiated_power_w);
  for (const auto& [k, a] : cache)
    if (k == key) return &a;
  AnalysisOptions o;
  o.reference = AutoReference(r.result);
  cache.emplace_back(key, AnalyzePattern(r.array, r.currents, r.result, o));
  return &cache.back().second;
}

// The outermost pixel along a ray from (x0, y0) in direction (dx, dy) whose
// colour is within `tol` of `c`; -1 when none. Distance in px from (x0, y0).
double OutermostAlongRay(const RasterImage& img, double x0, double y0, double dx, double dy,
                         double max_r, const Colour& c, int tol = 12) {
  double found = -1;
  for (double r = 0; r <= max_r; r += 0.25) {
    const int x = static_cast<int>(std::floor(x0 + r * dx)),
              y = static_cast<int>(std::floor(y0 + r * dy));
    if (x < 0 || y < 0 || x >= img.width || y >= img.height) break;
    if (ChannelDistance(img.At(x, y), c) <= tol) found = r;
  }
  return found;
}

// True when a pixel within `radius` px of (x, y) has colour `c`.
bool ColourNear(const RasterImage& img, double x, double y, double radius, const Colour& c,
                int tol = 12) {
  for (int yy = static_cast<int>(y - radius); yy <= static_cast<int>(y + radius); ++yy)
    for (int xx = static_cast<int>(x - radius); xx <= static_cast<int>(x + radius); ++xx)
      if (xx >= 0 && yy >= 0 && xx < img.width && yy < img.height &&
          std::hypot(xx + 0.5 - x, yy + 0.5 - y) <= radius + 0.71 &&
          ChannelDistance(img.At(xx, yy), c) <= tol)
        return true;
  return false;
}

TEST(PlotPixels, PolarZDipoleTraceAt90DegLiesOnThe0dBRingAndTheAxisNullAtTheFloor) {
  const StoredResult r = ZDipole();
  for (bool normalized : {true, false}) {
    PlotOptions o;
    o.kind = PlotKind::kPolar;
    o.quantity = Quantity::kDirectivity;
    o.normalized = normalized;
    const fs::path out =
        ReviewDir() / (std::string("pixel-polar-") + (normalized ? "norm" : "dbi") + ".png");
    const PolarGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).polar;
    const RasterImage img = ReadPng(out.string());
    // theta = +90 deg on the phi = 0 half: straight right of the centre.
    const double peak = normalized ? 0.0 : 10 * std::log10(1.5);
    const double expected_r = g.RadiusOf(peak);
    if (normalized) {
      EXPECT_DOUBLE_EQ(expected_r, g.radius_px);  // the 0 dB ring is the outer one
    }
    const double found = OutermostAlongRay(img, g.centre_x_px, g.centre_y_px + 0.5, 1, 0,
                                           g.radius_px + 20, MainTraceColour());
    EXPECT_NEAR(found, expected_r, 2.0) << (normalized ? "normalized" : "dBi");
    // The null on the axis (theta = 0) is drawn at the floor, which is the centre.
    EXPECT_TRUE(ColourNear(img, g.centre_x_px, g.centre_y_px, 2.0, MainTraceColour()));
    double x, y;
    g.PointOf(0.0, -1e300, &x, &y);
    EXPECT_NEAR(x, g.centre_x_px, 1e-9);
    EXPECT_NEAR(y, g.centre_y_px, 1e-9);
    // ...and not at the top of the scale.
    EXPECT_FALSE(
        ColourNear(img, g.centre_x_px, g.centre_y_px - g.radius_px, 2.0, MainTraceColour()));
  }
}

TEST(PlotPixels, CartesianZDipoleTraceAt90DegOnThe0dBLineAndTheAxisNullOnTheFloor) {
  const StoredResult r = ZDipole();
  PlotOptions o;
  o.kind = PlotKind::kCartesian;
  o.quantity = Quantity::kDirectivity;
  o.normalized = true;
  const fs::path out = ReviewDir() / "pixel-cartesian-norm.png";
  const CartesianGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).cartesian;
  const RasterImage img = ReadPng(out.string());
  // Down the column at theta = 90 deg: the trace is at the 0 dB line.
  const double x90 = g.XOf(90.0);
  const double found =
      OutermostAlongRay(img, x90, g.top_px + g.height_px, 0, -1, g.height_px, MainTraceColour());
  EXPECT_NEAR(g.top_px + g.height_px - found, g.YOf(0.0), 2.0);
  EXPECT_NEAR(g.YOf(0.0), g.top_px, 1e-9);
  // At theta = 0 the null sits on the floor (the bottom edge).
  EXPECT_TRUE(ColourNear(img, g.XOf(0.0), g.YOf(g.db_floor), 2.0, MainTraceColour()));
  EXPECT_NEAR(g.YOf(-1e300), g.top_px + g.height_px, 1e-9);
  EXPECT_FALSE(ColourNear(img, g.XOf(0.0), g.YOf(-10.0), 2.0, MainTraceColour()));
}

TEST(PlotPixels, MapZDipoleColoursFollowSinSquaredAndTheNullsAreMarked) {
  const StoredResult r = ZDipole();
  for (MapProjection proj : {MapProjection::kThetaPhi, MapProjection::kAzEl, MapProjection::kUv}) {
    PlotOptions o;
    o.kind = PlotKind::kMap;
    o.projection = proj;
    o.normalized = true;
    o.floor_db = 20;
    const fs::path out = ReviewDir() / ("pixel-map-" + std::string(ToString(proj)) + ".png");
    const MapGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).map;
    const RasterImage img = ReadPng(out.string());
    ASSERT_EQ(g.panels.size(), 1u);
    const MapPanel& p = g.panels[0];
    // Directions clear of contour lines (-10 dB at theta = 18.4 deg) and markers.
    for (const auto& [theta, phi] : {std::pair{3.0, 150.0}, std::pair{40.0, 60.0},
                                     std::pair{70.0, 200.0}, std::pair{76.0, 100.0}}) {
      double x, y;
      ASSERT_TRUE(p.ToDevice(theta, phi, &x, &y));
      const double s = std::sin(theta * kPi / 180.0);
      const double db = std::max(10 * std::log10(s * s), -20.0);
      const Colour expected = FromRgb(Ramp((db + 20.0) / 20.0));
      EXPECT_LE(ChannelDistance(img.At(static_cast<int>(x), static_cast<int>(y)), expected), 6)
          << ToString(proj) << " theta " << theta << " phi " << phi;
    }
    // The zenith null is marked (and the nadir one too when it is on the map).
    bool zenith = false, nadir = false;
    for (const auto& [theta, phi] : g.nulls_deg) {
      zenith |= theta == 0.0;
      nadir |= theta == 180.0;
    }
    EXPECT_TRUE(zenith) << ToString(proj);
    EXPECT_EQ(nadir, proj != MapProjection::kUv) << ToString(proj);
    EXPECT_EQ(g.nulls_deg.size(), proj == MapProjection::kUv ? 1u : 2u) << ToString(proj);
  }
}

TEST(PlotPixels, PolarizationMapShowsLinearForTheDipoleAndRightHandAtTheTurnstileZenith) {
  {
    const StoredResult r = ZDipole();
    PlotOptions o;
    o.kind = PlotKind::kPolarization;
    o.floor_db = 10;  // weak field (white) within 18.4 deg of the axis
    const fs::path out = ReviewDir() / "pixel-polarization-dipole.png";
    const MapGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).map;
    const RasterImage img = ReadPng(out.string());
    ASSERT_EQ(g.panels.size(), 2u);
    double x, y;
    ASSERT_TRUE(g.panels[0].ToDevice(80.0, 100.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(Ramp(0.0))), 4);  // linear: dark end
    ASSERT_TRUE(g.panels[1].ToDevice(80.0, 100.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(SenseColour(0))), 4);
    ASSERT_TRUE(g.panels[0].ToDevice(9.0, 100.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(NoDataColour())), 4);
  }
  {
    const StoredResult r = ReadResult(ResultFor("turnstile").string());
    PlotOptions o;
    o.kind = PlotKind::kPolarization;
    const fs::path out = ReviewDir() / "pixel-polarization-turnstile.png";
    const MapGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).map;
    const RasterImage img = ReadPng(out.string());
    double x, y;
    // Near +z circular (AR ~ 0 dB: the light end) and right-hand; near -z left-hand.
    ASSERT_TRUE(g.panels[0].ToDevice(4.0, 130.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(Ramp(1.0))), 8);
    ASSERT_TRUE(g.panels[1].ToDevice(4.0, 130.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(SenseColour(+1))), 4);
    ASSERT_TRUE(g.panels[1].ToDevice(176.0, 130.0, &x, &y));
    EXPECT_LE(ChannelDistance(img.At(int(x), int(y)), FromRgb(SenseColour(-1))), 4);
  }
}

TEST(PlotPixels, CutWithNoFieldDrawsNoTraceAndSaysSo) {
  // planar-4x4-ground: horizontal dipoles over PEC, so the horizon (theta = 90) has a
  // field that is zero up to rounding (~1e-16 of the peak field, -310 dBi noise); the
  // theta = 60 cone has a real pattern.
  const StoredResult r = ReadResult(ResultFor("planar-4x4-ground").string());
  for (bool normalized : {false, true}) {
    PlotOptions o;
    o.kind = PlotKind::kPolar;
    o.cut = *CutSpecFromString("theta=90");
    o.normalized = normalized;
    const CutTraces t = MakeCutTraces(r, AnalysisOf(r), o);
    EXPECT_TRUE(t.no_field);
    const fs::path out =
        ReviewDir() / (std::string("pixel-polar-no-field") + (normalized ? "-norm" : "") + ".png");
    const PolarGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).polar;
    const RasterImage img = ReadPng(out.string());
    // No trace inside the plot circle (the legend swatch lies outside it).
    int trace_px = 0;
    for (int y = 0; y < img.height; ++y)
      for (int x = 0; x < img.width; ++x)
        if (std::hypot(x + 0.5 - g.centre_x_px, y + 0.5 - g.centre_y_px) < g.radius_px &&
            (ChannelDistance(img.At(x, y), MainTraceColour()) <= 12 ||
             ChannelDistance(img.At(x, y), CompanionTraceColour()) <= 12))
          ++trace_px;
    EXPECT_EQ(trace_px, 0) << out;
  }
  PlotOptions o;
  o.kind = PlotKind::kCartesian;
  o.cut = *CutSpecFromString("theta=60");
  EXPECT_FALSE(MakeCutTraces(r, AnalysisOf(r), o).no_field);
  o.cut = *CutSpecFromString("theta=90");
  WritePlot(r, AnalysisOf(r), o, (ReviewDir() / "pixel-cartesian-no-field.png").string());
}

TEST(PlotPixels, PolarRingLabelsSitOverTheTraces) {
  // planar-4x4-ground, theta = 60 cone: the co-pol trace crosses the ring-label ray
  // (phi = 75 deg on a theta cut) near the -30 dBi ring. The labels are drawn over the
  // traces on an opaque box, so no trace pixel shows at a label's centre (where "-" of
  // "-30 dBi" would otherwise be hidden).
  const StoredResult r = ReadResult(ResultFor("planar-4x4-ground").string());
  PlotOptions o;
  o.kind = PlotKind::kPolar;
  o.cut = *CutSpecFromString("theta=60");
  const fs::path out = ReviewDir() / "pixel-polar-ring-labels.png";
  const PolarGeometry g = WritePlot(r, AnalysisOf(r), o, out.string()).polar;
  const RasterImage img = ReadPng(out.string());
  const double step = DbLabelStep(g.db_top - g.db_floor);
  int rings = 0;
  for (double v = g.db_top; v > g.db_floor + 0.25 * step; v -= step, ++rings) {
    double x, y;
    g.PointOf(75.0, v, &x, &y);
    int trace_px = 0;
    for (int yy = static_cast<int>(y) - 3; yy <= static_cast<int>(y) + 3; ++yy)
      for (int xx = static_cast<int>(x) - 12; xx <= static_cast<int>(x) + 12; ++xx)
        if (ChannelDistance(img.At(xx, yy), MainTraceColour()) <= 40 ||
            ChannelDistance(img.At(xx, yy), CompanionTraceColour()) <= 40)
          ++trace_px;
    EXPECT_EQ(trace_px, 0) << "ring " << v << " dBi label at " << x << ", " << y;
  }
  EXPECT_GE(rings, 4);
}

TEST(PlotPixels, TitleBlockIsNotClippedAtTheRightEdge) {
  // The longest subtitles (a normalized co/cross cut, the u-v polarization map, the
  // samples with long names) at 800x600: the title band keeps a white right margin, so
  // no text runs off the canvas.
  for (const std::string& sample : Samples()) {
    const StoredResult r = ReadResult(ResultFor(sample).string());
    struct Case {
      std::string name;
      PlotOptions o;
    };
    std::vector<Case> cases;
    for (PlotKind k : {PlotKind::kCartesian, PlotKind::kPolar}) {
      PlotOptions o;
      o.kind = k;
      o.cut = *CutSpecFromString("phi=90");
      o.normalized = true;
      o.reference = ReferenceChoice{false, PolarizationReference::kLinearX};
      cases.push_back({std::string(ToString(k)) + "-normalized-co", o});
    }
    for (MapProjection p : {MapProjection::kUv, MapProjection::kThetaPhi, MapProjection::kAzEl}) {
      PlotOptions o;
      o.kind = PlotKind::kPolarization;
      o.projection = p;
      cases.push_back({"polarization-" + std::string(ToString(p)), o});
      o.kind = PlotKind::kMap;
      cases.push_back({"map-" + std::string(ToString(p)), o});
    }
    for (const Case& c : cases) {
      const fs::path out = WorkDir() / ("title-" + sample + "-" + c.name + ".png");
      WritePlot(r, AnalysisOf(r), c.o, out.string());
      const RasterImage img = ReadPng(out.string());
      const int margin = 6;  // px; the title starts 10 px from the left edge
      int ink = 0;
      for (int y = 0; y < 60; ++y)
        for (int x = img.width - margin; x < img.width; ++x)
          if (ChannelDistance(img.At(x, y), Colour{1, 1, 1, 1}) > 40) ++ink;
      EXPECT_EQ(ink, 0) << out;
    }
  }
}

// ---------------------------------------------------------------------------
// The command line

TEST(PlotCli, BadOptionsExitWith2AndWriteNothing) {
  const fs::path h5 = ResultFor("single-dipole");
  const fs::path out = WorkDir() / "rejected.png";
  struct Case {
    std::string args, expect_in_message;
  };
  const std::vector<Case> cases = {
      {"--kind pie", "--kind"},
      {"--cut phi=45", "phi = 45"},  // phi step 2: not on the grid? 45 is odd, so no
      {"--cut psi=3", "--cut"},
      {"--cut theta=200", "--cut"},
      {"--quantity power", "--quantity"},
      {"--reference z", "--reference"},
      {"--projection mercator", "--projection"},
      {"--size 10x10", "--size"},
      {"--size big", "--size"},
      {"--floor-db -3", "--floor-db"},
      {"--contour-db 0", "--contour-db"},
  };
  for (const Case& c : cases) {
    fs::remove(out);
    std::string err;
    EXPECT_EQ(RunCli("plot " + Quote(h5) + " " + c.args + " -o " + Quote(out), &err), 2) << c.args;
    EXPECT_NE(err.find(c.expect_in_message), std::string::npos) << c.args << ": " << err;
    EXPECT_FALSE(fs::exists(out)) << c.args;
  }
  std::string err;
  const fs::path gif = WorkDir() / "rejected.gif";
  EXPECT_EQ(RunCli("plot " + Quote(h5) + " -o " + Quote(gif), &err), 2);
  EXPECT_NE(err.find(".png, .svg or .pdf"), std::string::npos) << err;
  EXPECT_FALSE(fs::exists(gif));
  EXPECT_EQ(RunCli("plot " + Quote(WorkDir() / "missing.h5") + " -o " + Quote(out), &err), 2);
}

TEST(PlotLayout, CartesianCutIsCentredOnAnEndfireBeam) {
  // The endfire pair's beam is toward +x (phi = 0): on the theta = 90 cone (phi 0..360
  // on the grid) it would be split across both edges; it is drawn in the middle.
  const StoredResult r = ReadResult(ResultFor("endfire-pair").string());
  PlotOptions o;
  o.kind = PlotKind::kCartesian;
  o.cut = *CutSpecFromString("theta=90");
  const CartesianGeometry g =
      WritePlot(r, AnalysisOf(r), o, (ReviewDir() / "layout-endfire-centred.png").string())
          .cartesian;
  EXPECT_LT(g.angle_min_deg, -90.0);
  EXPECT_GT(g.angle_max_deg, 90.0);
  EXPECT_NEAR(g.XOf(0.0), g.left_px + 0.5 * g.width_px, 0.02 * g.width_px);
}

TEST(PlotLayout, GroundArraysDrawTheUpperHalfOfAVerticalPolarCut) {
  const StoredResult r = ReadResult(ResultFor("planar-4x4-ground").string());
  for (const char* cut : {"elevation", "phi=0"}) {
    PlotOptions o;
    o.kind = PlotKind::kPolar;
    o.cut = *CutSpecFromString(cut);
    const PolarGeometry g =
        WritePlot(r, AnalysisOf(r), o,
                  (ReviewDir() / ("layout-ground-" + o.cut.ShortName() + ".png")).string())
            .polar;
    EXPECT_TRUE(g.upper_half) << cut;
  }
}

TEST(PlotCli, ComputeWritesTheStandardSet) {
  const fs::path dir = WorkDir() / "standard-set";
  fs::remove_all(dir);
  fs::create_directories(dir);  // lobecast does not create folders (tests/unix_cli_test.cpp)
  const fs::path h5 = WorkDir() / "broadside-standard.h5";
  std::string err;
  ASSERT_EQ(RunCli("compute " + Quote(fs::path(LOBECAST_SAMPLES) / "broadside-line-8.toml") +
                       " -o " + Quote(h5) + " --quiet --plots " + Quote(dir),
                   &err),
            0)
      << err;
  // Cuts through the beam: the principal planes of the analysis, not fixed phi planes.
  for (const char* name : {"broadside-standard-polar-elevation.png",
                           "broadside-standard-polar-orthogonal.png", "broadside-standard-map.png"})
    FileChecks::Png(dir / name, 800, 600);
  EXPECT_FALSE(fs::exists(dir / "broadside-standard-polar-phi0.png"));
  // Without an analysis there are no principal planes: the grid's phi = 0 and 90 cuts.
  const fs::path bare = WorkDir() / "standard-set-bare";
  fs::remove_all(bare);
  fs::create_directories(bare);
  ASSERT_EQ(
      RunCli("compute " + Quote(fs::path(LOBECAST_SAMPLES) / "broadside-line-8.toml") + " -o " +
                 Quote(WorkDir() / "bare.h5") + " --quiet --no-analysis --plots " + Quote(bare),
             &err),
      0)
      << err;
  for (const char* name : {"bare-polar-phi0.png", "bare-polar-phi90.png", "bare-map.png"})
    FileChecks::Png(bare / name, 800, 600);
}

}  // namespace
}  // namespace lobecast::plot
