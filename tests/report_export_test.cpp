// End to end through the `lobecast` executable: `compute` stores the pattern
// analysis, `report` prints it (table and JSON) and `export` writes CSV/TSV tables
// of the grid, cuts and single directions. Checked against the HDF5 file and the
// engine run in-process: exported numbers must read back to the same doubles, and
// directions off the grid must equal the engine's exact sum.
#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <map>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "cli_util.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/constants.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/polarization.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/result_reader.h"
#include "io/plot/plot.h"
#include "io/text/number_text.h"

namespace fs = std::filesystem;
using ::testing::HasSubstr;

namespace lobecast {
namespace {

using testing::Quote;
using testing::ReadFile;
using testing::RunOutput;
using testing::SampleArrays;

fs::path WorkDir(const std::string& name) {
  return testing::TempWorkDir("lobecast-report-export-test", name);
}

// Runs `lobecast ARGS` (ARGS already quoted), stdout and stderr kept apart.
RunOutput Lobecast(std::string args, const std::string& stdin_text = "") {
  // These checks read exports back bit for bit, with their notes as '#' lines: the
  // round-trip form (the default is rounded, with a notes column, for spreadsheets).
  if (args.starts_with("export ")) {
    args.insert(7, args.find("--no-notes") == std::string::npos ? "--precision full --notes "
                                                                  "comments "
                                                                : "--precision full ");
  }
  static int counter = 0;
  const fs::path dir = WorkDir("io");
  const fs::path err = dir / ("stderr-" + std::to_string(counter++));
  std::string command = std::string(LOBECAST_EXE) + " " + args + " 2>" + Quote(err.string());
  if (!stdin_text.empty()) {
    const fs::path in = dir / ("stdin-" + std::to_string(counter++));
    std::ofstream(in) << stdin_text;
    command += " <" + Quote(in.string());
  }
  RunOutput r = testing::RunShell(command);
  r.err = ReadFile(err);
  return r;
}

bool HavePython() { return fs::exists(LOBECAST_PYTHON); }

// Feeds `json` to Python's json module and runs `expression` on it as `d`; returns
// what it prints (empty and a failed exit code when the JSON does not parse).
RunOutput PythonOnJson(const std::string& json, const std::string& expression) {
  const fs::path dir = WorkDir("py");
  static int counter = 0;
  const fs::path in = dir / ("in-" + std::to_string(counter++) + ".json");
  std::ofstream(in) << json;
  const std::string command = std::string(LOBECAST_PYTHON) +
                              " -c 'import json,sys; d = json.load(sys.stdin); print(" +
                              expression + ")' <" + Quote(in.string()) + " 2>&1";
  return testing::RunShell(command);
}

std::string Sample(const std::string& stem) {
  return std::string(LOBECAST_SAMPLES) + "/" + stem + ".toml";
}

// Computes a sample into the work folder; returns the result path.
std::string Compute(const std::string& input, const std::string& extra = "") {
  std::string tag = extra;
  for (char& c : tag) {
    if (!std::isalnum(static_cast<unsigned char>(c))) c = '_';
  }
  const fs::path out = WorkDir("results") / (fs::path(input).stem().string() + tag + ".h5");
  fs::remove(out);
  const RunOutput run =
      Lobecast("compute --quiet " + extra + " " + Quote(input) + " -o " + Quote(out.string()));
  EXPECT_EQ(run.exit_code, 0) << run.err;
  return out.string();
}

// A CSV/TSV export read back: '#' notes, the header row, and the rows as doubles
// (std::strtod in the C locale reads "-inf" and "inf" too; an empty cell is an
// undefined number, NaN).
struct Table {
  std::vector<std::string> notes;
  std::vector<std::string> columns;
  std::vector<std::vector<double>> rows;
  std::size_t column_count_mismatches = 0;
  std::size_t unparsed_cells = 0;

  std::size_t Col(const std::string& name) const {
    const auto it = std::find(columns.begin(), columns.end(), name);
    EXPECT_NE(it, columns.end()) << "no column " << name;
    return static_cast<std::size_t>(it - columns.begin());
  }
  double At(std::size_t row, const std::string& name) const { return rows.at(row).at(Col(name)); }
};

std::vector<std::string> Split(const std::string& line, char sep) {
  std::vector<std::string> cells;
  std::string cell;
  std::istringstream s(line);
  while (std::getline(s, cell, sep)) cells.push_back(cell);
  if (!line.empty() && line.back() == sep) cells.emplace_back();
  return cells;
}

Table ParseTable(const std::string& text, char sep) {
  Table t;
  std::istringstream s(text);
  std::string line;
  while (std::getline(s, line)) {
    if (t.columns.empty() && line.starts_with("#")) {
      t.notes.push_back(line);
      continue;
    }
    const std::vector<std::string> cells = Split(line, sep);
    if (t.columns.empty()) {
      t.columns = cells;
      continue;
    }
    if (cells.size() != t.columns.size()) ++t.column_count_mismatches;
    std::vector<double> row;
    for (const std::string& c : cells) {
      if (c.empty()) {
        row.push_back(std::numeric_limits<double>::quiet_NaN());
        continue;
      }
      char* end = nullptr;
      row.push_back(std::strtod(c.c_str(), &end));
      if (*end != '\0') ++t.unparsed_cells;
    }
    t.rows.push_back(row);
  }
  return t;
}

double Db(double x) { return x > 0 ? 10.0 * std::log10(x) : -HUGE_VAL; }
double FromDb(double db) { return std::pow(10.0, db / 10.0); }

// The engine's exact field and directivity toward (theta, phi) deg.
struct Exact {
  Complex e_theta, e_phi;
  double directivity;
};
Exact EngineAt(const StoredResult& s, double theta_deg, double phi_deg) {
  FieldOptions fo;
  fo.method = FieldMethod::kDirect;
  const FieldPlan plan(s.array, Directions::FromAngles({theta_deg * kDegree}, {phi_deg * kDegree}),
                       fo);
  const FarField f = plan.Execute(s.currents);
  const double u = (std::norm(f.e_theta[0]) + std::norm(f.e_phi[0])) / (2.0 * kEta0_ohm);
  return {f.e_theta[0], f.e_phi[0], 4.0 * kPi * u / s.result.radiated_power_w};
}

class SampleResult : public ::testing::TestWithParam<std::string> {};

TEST_P(SampleResult, ReportAndExportWork) {
  const std::string result = Compute(GetParam());
  const StoredResult stored = ReadResult(result);

  // compute stored the analysis; report shows it without recomputing.
  const std::optional<StoredAnalysis> saved = ReadAnalysis(result);
  ASSERT_TRUE(saved.has_value());
  const RunOutput report = Lobecast("report " + Quote(result));
  ASSERT_EQ(report.exit_code, 0) << report.err;
  for (const char* label :
       {"peak directivity (dBi)", "HPBW ", "FNBW ", "front-to-back (dB)",
        "highest side lobe (dB re peak)", "XPD at peak (dB)", "worst XPD in -3 dB beam (dB)",
        "axial ratio at peak (dB)", "stored by compute"}) {
    EXPECT_THAT(report.out, HasSubstr(label));
  }

  const RunOutput json = Lobecast("report --json " + Quote(result));
  ASSERT_EQ(json.exit_code, 0) << json.err;
  if (HavePython()) {
    const RunOutput py = PythonOnJson(
        json.out, "d[\"source\"], repr(d[\"peak\"][\"directivity\"]), len(d[\"null_loci\"])");
    ASSERT_EQ(py.exit_code, 0) << py.out << "\n" << json.out;
    std::ostringstream expected;
    char peak[32];
    std::snprintf(peak, sizeof peak, "%.17g", saved->analysis.peak.directivity);
    const double parsed = std::strtod(Split(py.out, ' ').at(1).c_str(), nullptr);
    EXPECT_EQ(parsed, saved->analysis.peak.directivity) << py.out << " vs " << peak;
    EXPECT_THAT(py.out, HasSubstr("stored"));
  }

  // The full grid: header row, then one row per grid direction, constant width,
  // every cell a number that reads back to the value in the file.
  const RunOutput csv = Lobecast("export " + Quote(result));
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const Table t = ParseTable(csv.out, ',');
  ASSERT_EQ(t.rows.size(), stored.result.grid.size());
  EXPECT_EQ(t.column_count_mismatches, 0u);
  EXPECT_EQ(t.unparsed_cells, 0u);
  EXPECT_EQ(t.columns.front(), "theta_deg");
  for (const char* c : {"directivity_dBi", "co_dBi", "cross_dBi", "axial_ratio_dB", "tilt_deg",
                        "sense", "phase_theta_deg", "phase_phi_deg"}) {
    EXPECT_NE(std::find(t.columns.begin(), t.columns.end(), c), t.columns.end()) << c;
  }
  const std::size_t np = stored.result.grid.phi_deg.size();
  std::size_t mismatches = 0;
  for (std::size_t k = 0; k < t.rows.size(); ++k) {
    const auto e = static_cast<Eigen::Index>(k);
    const bool same_nan = std::isnan(t.At(k, "tilt_deg")) && std::isnan(stored.result.tilt_deg[e]);
    if (t.At(k, "theta_deg") != stored.result.grid.theta_deg[k / np] ||
        t.At(k, "phi_deg") != stored.result.grid.phi_deg[k % np] ||
        t.At(k, "directivity_dBi") != Db(stored.result.directivity[e]) ||
        t.At(k, "rE_theta_V") != std::abs(stored.result.field.e_theta[e]) ||
        t.At(k, "phase_phi_deg") != std::arg(stored.result.field.e_phi[e]) / kDegree ||
        (!same_nan && t.At(k, "tilt_deg") != stored.result.tilt_deg[e]) ||
        t.At(k, "sense") != stored.result.sense[k]) {
      if (++mismatches < 5) ADD_FAILURE() << "row " << k << " differs from the file";
    }
  }
  EXPECT_EQ(mismatches, 0u);

  // TSV of a stored cut and a great circle also parse as tables.
  const RunOutput tsv = Lobecast("export --format tsv --cut theta=" +
                                 std::to_string(static_cast<int>(stored.result.grid.theta_deg[0])) +
                                 " " + Quote(result));
  ASSERT_EQ(tsv.exit_code, 0) << tsv.err;
  const Table tt = ParseTable(tsv.out, '\t');
  EXPECT_EQ(tt.rows.size(), np);
  EXPECT_EQ(tt.column_count_mismatches, 0u);
  const RunOutput gc =
      Lobecast("export --coords az-el --cut great-circle:60,10,30 --step 5 " + Quote(result));
  ASSERT_EQ(gc.exit_code, 0) << gc.err;
  const Table gt = ParseTable(gc.out, ',');
  EXPECT_EQ(gt.rows.size(), 72u);
  EXPECT_EQ(gt.column_count_mismatches, 0u);
  EXPECT_EQ(gt.unparsed_cells, 0u);
}

INSTANTIATE_TEST_SUITE_P(Samples, SampleResult, ::testing::ValuesIn(SampleArrays()),
                         [](const ::testing::TestParamInfo<std::string>& info) {
                           std::string n = fs::path(info.param).stem().string();
                           for (char& c : n) {
                             if (!std::isalnum(static_cast<unsigned char>(c))) c = '_';
                           }
                           return n;
                         });

TEST(Export, AtLookupEqualsTheEngine) {
  const std::string result = Compute(Sample("broadside-line-8"));
  const StoredResult stored = ReadResult(result);
  // Off the grid, in both coordinate systems (az 73.25 deg, el 12.5 deg is theta 77.5 deg).
  const Exact e = EngineAt(stored, 77.5, 73.25);
  for (const std::string& args :
       {std::string("--at 77.5,73.25"), std::string("--coords az-el --at 73.25,12.5")}) {
    const RunOutput run = Lobecast("export --no-notes " + args + " " + Quote(result));
    ASSERT_EQ(run.exit_code, 0) << run.err;
    const Table t = ParseTable(run.out, ',');
    ASSERT_EQ(t.rows.size(), 1u) << run.out;
    EXPECT_TRUE(t.notes.empty());
    EXPECT_NEAR(t.At(0, "directivity_dBi"), Db(e.directivity), 1e-12) << args;
    EXPECT_NEAR(t.At(0, "rE_theta_V"), std::abs(e.e_theta), 1e-12 * std::abs(e.e_theta));
    EXPECT_NEAR(t.At(0, "phase_theta_deg"), std::arg(e.e_theta) / kDegree, 1e-10);
    // The auto reference of a z-directed array with its beam on the horizon is theta
    // (AutoReference; was Ludwig-3 y, which mixes E_theta into the cross field off the
    // y axis): co = E_theta (CONVENTIONS §2).
    const CoCross cc =
        CoCrossOf(e.e_theta, e.e_phi, 73.25 * kDegree, PolarizationReference::kTheta);
    const double per_v2 = 4.0 * kPi / (2.0 * kEta0_ohm * stored.result.radiated_power_w);
    EXPECT_NEAR(t.At(0, "co_dBi"), Db(per_v2 * std::norm(cc.co)), 1e-12);
  }
  // On a grid point the lookup equals the stored value.
  const RunOutput on = Lobecast("export --at 90,90 " + Quote(result));
  ASSERT_EQ(on.exit_code, 0) << on.err;
  const Table t = ParseTable(on.out, ',');
  const std::size_t k = 90 * stored.result.grid.phi_deg.size() + 90;
  EXPECT_NEAR(t.At(0, "directivity_dBi"),
              Db(stored.result.directivity[static_cast<Eigen::Index>(k)]), 1e-12);
}

TEST(Export, CutsOffTheGridAreExactAndOnItAreStored) {
  const std::string result = Compute(Sample("planar-4x4-ground"));
  const StoredResult stored = ReadResult(result);
  const std::size_t nt = stored.result.grid.theta_deg.size();
  const std::size_t np = stored.result.grid.phi_deg.size();

  // phi = 0 is on the grid (step 2 deg): the whole plane, the phi = 180 half at
  // negative signed angles, poles once, values as stored.
  RunOutput run = Lobecast("export --cut phi=0 " + Quote(result));
  ASSERT_EQ(run.exit_code, 0) << run.err;
  Table t = ParseTable(run.out, ',');
  ASSERT_EQ(t.rows.size(), 2 * nt - 1);  // theta 0..90: 90 on the back half, 91 on the front
  EXPECT_EQ(t.columns.front(), "cut_angle_deg");
  for (std::size_t r = 1; r < t.rows.size(); ++r) {
    EXPECT_GT(t.At(r, "cut_angle_deg"), t.At(r - 1, "cut_angle_deg"));
  }
  const std::size_t front = nt - 1;  // first row of the phi = 0 half (theta = 0)
  EXPECT_EQ(t.At(front, "theta_deg"), 0.0);
  for (std::size_t i = 0; i < nt; ++i) {
    EXPECT_EQ(t.At(front + i, "directivity_dBi"),
              Db(stored.result.directivity[static_cast<Eigen::Index>(i * np)]));
  }

  // phi = 1 is not: computed exactly, not interpolated between phi = 0 and 2.
  run = Lobecast("export --cut phi=1 " + Quote(result));
  ASSERT_EQ(run.exit_code, 0) << run.err;
  t = ParseTable(run.out, ',');
  ASSERT_EQ(t.rows.size(), 2 * nt - 1);
  // Compared as directivity relative to the peak: where the field is rounding noise
  // (the horizon over the ground), its dB value depends on the batch it was summed in.
  const double peak = stored.result.directivity.maxCoeff();
  for (std::size_t r = 0; r < t.rows.size(); r += 7) {
    const Exact e = EngineAt(stored, t.At(r, "theta_deg"), t.At(r, "phi_deg"));
    EXPECT_NEAR(FromDb(t.At(r, "directivity_dBi")), e.directivity, 1e-12 * peak) << "row " << r;
  }
  EXPECT_THAT(run.out, HasSubstr("computed exactly"));

  // Great circle: every sample lies on the circle through (20, 0) heading 90 deg
  // (the orthogonal plane: normal = theta_hat at (20, 0)), at the stated angle.
  run = Lobecast("export --cut great-circle:20,0,90 --step 7.5 " + Quote(result));
  ASSERT_EQ(run.exit_code, 0) << run.err;
  t = ParseTable(run.out, ',');
  ASSERT_EQ(t.rows.size(), 48u);
  const double t0 = 20 * kDegree;
  const Vec3 r0(std::sin(t0), 0, std::cos(t0));
  const Vec3 normal(std::cos(t0), 0, -std::sin(t0));
  for (std::size_t r = 0; r < t.rows.size(); ++r) {
    const double th = t.At(r, "theta_deg") * kDegree, ph = t.At(r, "phi_deg") * kDegree;
    const Vec3 u(std::sin(th) * std::cos(ph), std::sin(th) * std::sin(ph), std::cos(th));
    EXPECT_NEAR(u.dot(normal), 0.0, 1e-12) << "row " << r;
    EXPECT_NEAR(std::acos(std::clamp(u.dot(r0), -1.0, 1.0)) / kDegree,
                std::abs(t.At(r, "cut_angle_deg")), 1e-9);
    EXPECT_EQ(t.At(r, "cut_angle_deg"), -180.0 + 7.5 * static_cast<double>(r));
  }
}

TEST(Export, OutputFileEqualsStdout) {
  const std::string result = Compute(Sample("single-dipole"));
  const fs::path file = WorkDir("out") / "cut.tsv";
  const RunOutput to_file = Lobecast("export --format tsv --cut theta=90 -o " +
                                     Quote(file.string()) + " " + Quote(result));
  ASSERT_EQ(to_file.exit_code, 0) << to_file.err;
  EXPECT_TRUE(to_file.out.empty());
  const RunOutput to_stdout = Lobecast("export --format tsv --cut theta=90 " + Quote(result));
  const std::string written = ReadFile(file);
  EXPECT_EQ(written, to_stdout.out);
  EXPECT_THAT(written, HasSubstr("\tdirectivity_dBi\t"));
}

TEST(Export, AzimuthElevationIsDefinedInTheHeader) {
  const std::string result = Compute(Sample("single-dipole"));
  const RunOutput run = Lobecast("export --coords az-el --cut phi=30 " + Quote(result));
  ASSERT_EQ(run.exit_code, 0) << run.err;
  EXPECT_THAT(run.out, HasSubstr("# coordinates: azimuth_deg: angle in the xy plane from +x "
                                 "toward +y"));
  const Table t = ParseTable(run.out, ',');
  for (std::size_t r = 0; r < t.rows.size(); ++r) {
    const double theta = std::abs(t.At(r, "cut_angle_deg"));
    EXPECT_NEAR(t.At(r, "elevation_deg"), 90.0 - theta, 1e-12);
  }
}

TEST(Report, HertzianDipoleBeamAndNulls) {
  // Hertzian (z) dipole: HPBW 90 deg in the elevation plane, no half-power points
  // in the azimuth plane, exact nulls on the axis (Balanis, Antenna Theory, 4th ed.,
  // sec. 4.2; the sin(theta) pattern).
  const std::string result = Compute(Sample("single-dipole"));
  const std::optional<StoredAnalysis> a = ReadAnalysis(result);
  ASSERT_TRUE(a.has_value());
  EXPECT_NEAR(a->analysis.elevation_cut.half_power_width_deg, 90.0, 1e-4);
  EXPECT_FALSE(a->analysis.orthogonal_cut.half_power_found);
  ASSERT_FALSE(a->analysis.null_loci.empty());
  EXPECT_TRUE(a->analysis.null_loci.front().exact);
  EXPECT_TRUE(std::isinf(a->analysis.null_loci.front().level_db));
  if (HavePython()) {
    const RunOutput json = Lobecast("report --json " + Quote(result));
    const RunOutput py = PythonOnJson(
        json.out,
        "d[\"elevation_plane\"][\"half_power_width_deg\"], "
        "d[\"orthogonal_plane\"][\"half_power_width_deg\"], d[\"null_loci\"][0][\"exact\"]");
    ASSERT_EQ(py.exit_code, 0) << py.out;
    EXPECT_THAT(py.out, HasSubstr("inf True"));  // an infinite width is the string "inf"
    EXPECT_NEAR(std::strtod(py.out.c_str(), nullptr), 90.0, 1e-4);
  }
}

// The figures a cut plot draws are the report's numbers: every label of the plots of
// both principal planes (what WritePlot says it drew) equals the field of `report
// --json` it names, bit for bit (Python's repr round-trips doubles).
TEST(Report, PlotLabelsAreTheReportsNumbers) {
  if (!HavePython()) GTEST_SKIP() << "no " << LOBECAST_PYTHON;
  for (const char* sample : {"broadside-line-8", "planar-4x4-ground", "endfire-pair"}) {
    const std::string result = Compute(Sample(sample));
    const RunOutput json = Lobecast("report --json " + Quote(result));
    ASSERT_EQ(json.exit_code, 0) << json.err;
    const StoredResult stored = ReadResult(result);
    const std::optional<StoredAnalysis> a = ReadAnalysis(result);
    ASSERT_TRUE(a.has_value());
    for (const plot::CutPlane plane : {plot::CutPlane::kElevation, plot::CutPlane::kOrthogonal}) {
      for (const plot::PlotKind kind : {plot::PlotKind::kPolar, plot::PlotKind::kCartesian}) {
        plot::PlotOptions o;
        o.kind = kind;
        o.cut.plane = plane;
        const fs::path out = WorkDir("labels") / (std::string(sample) + "-" + o.cut.ShortName() +
                                                  "-" + std::string(plot::ToString(kind)) + ".png");
        const std::vector<plot::CutLabel> labels =
            plot::WritePlot(stored, &a->analysis, o, out.string()).labels;
        ASSERT_FALSE(labels.empty());
        // The JSON field each label names, as a Python expression on d.
        std::string expr;
        int crossing = 0;
        const char* on_plane = plane == plot::CutPlane::kOrthogonal ? "True" : "False";
        for (const plot::CutLabel& l : labels) {
          std::string e;
          if (l.key == "null_crossings.offset_deg") {
            e = std::string(
                    "[c[\"offset_deg\"] for c in d[\"null_crossings\"] if "
                    "c[\"orthogonal_plane\"] == ") +
                on_plane + "][" + std::to_string(crossing++) + "]";
          } else if (l.key == "major_lobes.size") {
            e = "len(d[\"major_lobes\"])";
          } else {
            const std::size_t dot = l.key.find('.');
            ASSERT_NE(dot, std::string::npos) << l.key;
            e = "d[\"" + l.key.substr(0, dot) + "\"]";
            if (l.key.substr(0, dot) == "highest_side_lobe" && !std::isfinite(l.value)) {
              e = "None if " + e + " is None else 1";  // no side lobe: null in the JSON
            } else {
              e += "[\"" + l.key.substr(dot + 1) + "\"]";
            }
          }
          expr += (expr.empty() ? "" : ", ") + std::string("repr(") + e + ")";
        }
        const RunOutput py = PythonOnJson(json.out, expr);
        ASSERT_EQ(py.exit_code, 0) << py.out;
        std::istringstream tokens(py.out);
        for (const plot::CutLabel& l : labels) {
          std::string t;
          ASSERT_TRUE(tokens >> t) << l.key;
          if (t == "None") {
            EXPECT_FALSE(std::isfinite(l.value)) << sample << " " << l.key;  // JSON null
          } else {
            // Angles: the JSON gives them to kReportedAngle_deg (io/text/number_text.h).
            const bool angle = l.key.size() > 4 && l.key.substr(l.key.size() - 4) == "_deg";
            if (angle && std::isfinite(l.value)) {
              EXPECT_NEAR(std::strtod(t.c_str(), nullptr), l.value, 0.5 * kReportedAngle_deg)
                  << sample << " " << l.key;
            } else {
              EXPECT_EQ(std::strtod(t.c_str(), nullptr), l.value) << sample << " " << l.key;
            }
          }
          // A twin main beam is another major lobe, never a "side lobe 0.0 dB".
          EXPECT_EQ(l.text.find("side lobe 0.0"), std::string::npos) << l.text;
          EXPECT_EQ(l.text.find("side lobe -0.0"), std::string::npos) << l.text;
        }
      }
    }
  }
}

TEST(Report, StoredAnalysisMatchesTheEngineAndRecomputesWhenAbsent) {
  const std::string with = Compute(Sample("endfire-pair"));
  const std::string without = Compute(Sample("endfire-pair"), "--no-analysis");
  EXPECT_FALSE(ReadAnalysis(without).has_value());
  const std::optional<StoredAnalysis> saved = ReadAnalysis(with);
  ASSERT_TRUE(saved.has_value());

  // What the file holds is what the engine computes from the stored result.
  const StoredResult stored = ReadResult(with);
  const PatternAnalysis fresh =
      AnalyzePattern(stored.array, stored.currents, stored.result, saved->options);
  const PatternAnalysis& s = saved->analysis;
  EXPECT_EQ(s.peak.directivity, fresh.peak.directivity);
  EXPECT_EQ(s.peak.direction.theta_deg, fresh.peak.direction.theta_deg);
  EXPECT_EQ(s.elevation_cut.half_power_width_deg, fresh.elevation_cut.half_power_width_deg);
  EXPECT_EQ(s.orthogonal_cut.first_null_width_deg, fresh.orthogonal_cut.first_null_width_deg);
  EXPECT_EQ(s.front_to_back.ratio_db, fresh.front_to_back.ratio_db);
  EXPECT_EQ(s.null_loci.size(), fresh.null_loci.size());
  EXPECT_EQ(s.null_crossings.size(), fresh.null_crossings.size());
  EXPECT_EQ(s.polarization.xpd_at_peak_db, fresh.polarization.xpd_at_peak_db);
  EXPECT_EQ(s.polarization.axial_ratio_solid_angle_sr,
            fresh.polarization.axial_ratio_solid_angle_sr);
  // Endfire pair, lambda/4 and 90 deg: a null straight back, F/B infinite in exact
  // arithmetic (Kraus, Antennas, the two-isotropic-sources examples); rounding leaves
  // it above 100 dB.
  EXPECT_GT(s.front_to_back.ratio_db, 100.0);

  const RunOutput a = Lobecast("report " + Quote(with));
  const RunOutput b = Lobecast("report " + Quote(without));
  ASSERT_EQ(a.exit_code, 0) << a.err;
  ASSERT_EQ(b.exit_code, 0) << b.err;
  EXPECT_THAT(a.out, HasSubstr("stored by compute"));
  EXPECT_THAT(b.out, HasSubstr("recomputed"));
  auto line = [](const std::string& text, const std::string& label) {
    const std::size_t at = text.find(label);
    return at == std::string::npos ? std::string() : text.substr(at, text.find('\n', at) - at);
  };
  for (const char* label :
       {"peak directivity", "HPBW elevation", "FNBW orthogonal", "XPD at peak"}) {
    EXPECT_EQ(line(a.out, label), line(b.out, label)) << label;
    EXPECT_FALSE(line(a.out, label).empty()) << label;
  }
}

TEST(Report, TowardDirectionsAreExact) {
  const std::string result = Compute(Sample("broadside-line-8"));
  const StoredResult stored = ReadResult(result);
  const RunOutput run = Lobecast("report --json --toward 90,0 --toward 60,75.5 " + Quote(result));
  ASSERT_EQ(run.exit_code, 0) << run.err;
  if (!HavePython()) GTEST_SKIP() << "no Python to read the JSON";
  const RunOutput py =
      PythonOnJson(run.out,
                   "d[\"source\"], repr(d[\"protected_directions\"][1][\"directivity\"]), "
                   "len(d[\"protected_directions\"])");
  ASSERT_EQ(py.exit_code, 0) << py.out;
  EXPECT_THAT(py.out, HasSubstr("recomputed"));
  EXPECT_THAT(py.out, HasSubstr(" 2"));
  const Exact e = EngineAt(stored, 60, 75.5);
  EXPECT_NEAR(std::strtod(Split(py.out, ' ').at(1).c_str(), nullptr), e.directivity,
              1e-12 * e.directivity);
}

TEST(ReportExport, BadOptionsExitWithTwo) {
  const std::string result = Compute(Sample("single-dipole"));
  const std::string r = " " + Quote(result);
  for (const std::string& args :
       {"export --format xlsx" + r, "export --coords polar" + r, "export --cut phi=north" + r,
        "export --cut theta=200" + r, "export --cut great-circle:10,20" + r,
        "export --cut great-circle:10,20,30 --step 0" + r, "export --at 10" + r,
        "export --at 190,0" + r, "export --coords az-el --at 0,95" + r,
        "export --at 10,20 --cut phi=0" + r, "export --reference z" + r,
        "export --no-such-option" + r, "export " + Quote(result + ".missing"),
        "report --reference v" + r, "report --toward 10" + r, "report --toward -5,0" + r,
        "report --null-field cross" + r, "report --side-lobe-threshold abc" + r,
        "compute --reference q " + Quote(Sample("single-dipole"))}) {
    const RunOutput run = Lobecast(args);
    EXPECT_EQ(run.exit_code, 2) << args << "\n" << run.err;
    EXPECT_FALSE(run.err.empty()) << args;
    EXPECT_TRUE(run.out.empty() || run.out.find("Usage") != std::string::npos) << args;
  }
}

// Enum options list the names they accept, the ones the engine's ToString gives
// (cli/enum_names.h), in the order the help text documents them.
TEST(ReportExport, BadEnumNamesListTheAcceptedOnes) {
  const std::string result = Compute(Sample("single-dipole"));
  const std::string r = " " + Quote(result);
  const std::string plot = "plot -o " + Quote((WorkDir("io") / "names.png").string());
  const std::pair<std::string, std::string> cases[] = {
      {"export --reference z" + r, "expected x, y, rhcp, lhcp, theta, phi or auto"},
      {"export --format xlsx" + r, "expected csv or tsv"},
      {"export --coords polar" + r, "expected theta-phi or az-el"},
      {"report --null-field cross" + r, "expected total or co"},
      {"compute --method Fast " + Quote(Sample("single-dipole")), "expected direct, fast or auto"},
      {"compute --reference q " + Quote(Sample("single-dipole")),
       "expected x, y, rhcp, lhcp, theta, phi or auto"},
      {plot + " --kind pie" + r, "expected polar, cartesian, map or polarization"},
      {plot + " --quantity x" + r, "expected directivity, co, cross, theta, phi or realized-gain"},
      {plot + " --reference q" + r, "expected auto, x, y, rhcp, lhcp, theta or phi"},
      {plot + " --kind map --projection merc" + r, "expected theta-phi, az-el or uv"}};
  for (const auto& [args, names] : cases) {
    const RunOutput run = Lobecast(args);
    EXPECT_EQ(run.exit_code, 2) << args;
    EXPECT_NE(run.err.find(names), std::string::npos) << args << "\n" << run.err;
  }
}

TEST(ReportExport, NumbersAreLocaleIndependent) {
  // A locale with a decimal comma must not change the output (the program never
  // reads the environment's numeric locale; std::to_chars ignores it anyway).
  const std::string result = Compute(Sample("single-dipole"));
  const RunOutput plain = Lobecast("export --at 33.3,12.1 " + Quote(result));
  const std::string saved = std::getenv("LC_ALL") ? std::getenv("LC_ALL") : "";
  setenv("LC_ALL", "de_DE.UTF-8", 1);
  const RunOutput german = Lobecast("export --at 33.3,12.1 " + Quote(result));
  if (saved.empty()) {
    unsetenv("LC_ALL");
  } else {
    setenv("LC_ALL", saved.c_str(), 1);
  }
  ASSERT_EQ(german.exit_code, 0) << german.err;
  EXPECT_EQ(plain.out, german.out);
  const Table t = ParseTable(plain.out, ',');
  EXPECT_EQ(t.unparsed_cells, 0u);
}

}  // namespace
}  // namespace lobecast
