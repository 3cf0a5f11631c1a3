// The schema (io/hdf5/schema.h): every field of a PatternAnalysis survives the
// HDF5 write and read with random values (a field the walk skipped would come back
// as its default), the report's JSON uses exactly the schema's names, and the
// analysis tables keep the column layout of schema version 1.
#include <cmath>
#include <filesystem>
#include <limits>
#include <random>
#include <regex>
#include <set>
#include <string>

#include <gtest/gtest.h>

#include "engine/analysis/analysis_types.h"
#include "engine/pattern.h"
#include "io/hdf5/analysis_reader.h"
#include "io/hdf5/analysis_writer.h"
#include "io/hdf5/result_reader.h"
#include "io/hdf5/result_writer.h"
#include "io/hdf5/schema.h"
#include "io/text/report_text.h"
#include "test_util.h"

namespace lobecast {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

class Random {
 public:
  explicit Random(unsigned seed) : engine_(seed) {}
  // Mostly ordinary numbers, sometimes the values the analysis stores for "none"
  // (+-inf, NaN), so that those round-trip too.
  double Number() {
    const int k = std::uniform_int_distribution<int>(0, 19)(engine_);
    if (k == 0) return kInf;
    if (k == 1) return -kInf;
    if (k == 2) return kNaN;
    return std::uniform_real_distribution<double>(-1e3, 1e3)(engine_);
  }
  bool Flag() { return std::uniform_int_distribution<int>(0, 1)(engine_) == 1; }
  int Int(int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(engine_); }
  DirectionDeg Direction() { return {Number(), Number()}; }

 private:
  std::mt19937 engine_;
};

// The fields a Lobe and a ProtectedDirectionField share.
template <typename T>
T RandomLevels(Random& r) {
  T l;
  l.direction = r.Direction();
  l.directivity = r.Number();
  l.directivity_dbi = r.Number();
  l.level_db = r.Number();
  return l;
}
Lobe RandomLobe(Random& r) { return RandomLevels<Lobe>(r); }

BeamCut RandomCut(Random& r) {
  BeamCut c;
  c.plane = static_cast<CutPlane>(r.Int(0, 5));
  c.plane_phi_deg = r.Number();
  c.half_power_found = r.Flag();
  c.half_power_width_deg = r.Number();
  c.half_power_lower_deg = r.Number();
  c.half_power_upper_deg = r.Number();
  c.first_nulls_found = r.Flag();
  c.first_null_width_deg = r.Number();
  c.first_null_lower_deg = r.Number();
  c.first_null_upper_deg = r.Number();
  c.clipped_by_ground = r.Flag();
  c.tangent = r.Direction();
  return c;
}

// Every field set by hand (not through the schema's walk, which is under test).
PatternAnalysis RandomAnalysis(Random& r, bool empty_lists) {
  PatternAnalysis a;
  a.peak.direction = r.Direction();
  a.peak.directivity = r.Number();
  a.peak.directivity_dbi = r.Number();
  a.peak.grid_direction = r.Direction();
  a.peak.grid_directivity = r.Number();
  a.peak.refined = r.Flag();
  a.elevation_cut = RandomCut(r);
  a.orthogonal_cut = RandomCut(r);
  a.front_to_back.ratio_db = r.Number();
  a.front_to_back.back_direction = r.Direction();
  a.front_to_back.same_elevation_ratio_db = r.Number();
  a.front_to_back.same_elevation_back_direction = r.Direction();
  const int lists = empty_lists ? 0 : 1;
  for (int i = r.Int(lists, 3 * lists); i > 0; --i) a.major_lobes.push_back(RandomLobe(r));
  if (!empty_lists) a.highest_side_lobe = RandomLobe(r);
  for (int i = r.Int(lists, 5 * lists); i > 0; --i) a.side_lobes.push_back(RandomLobe(r));
  a.side_lobes_truncated = r.Flag();
  for (int i = r.Int(lists, 5 * lists); i > 0; --i) {
    NullLocus n;
    n.cone = r.Flag();
    n.point = r.Flag();
    n.axis = r.Direction();
    n.half_angle_deg = r.Number();
    n.direction = r.Direction();
    n.theta_min_deg = r.Number();
    n.theta_max_deg = r.Number();
    n.phi_min_deg = r.Number();
    n.phi_max_deg = r.Number();
    n.directivity = r.Number();
    n.level_db = r.Number();
    n.exact = r.Flag();
    a.null_loci.push_back(n);
  }
  a.null_loci_truncated = r.Flag();
  for (int i = r.Int(lists, 5 * lists); i > 0; --i) {
    NullCrossing c;
    c.locus = r.Number();
    c.orthogonal_plane = r.Flag();
    c.offset_deg = r.Number();
    c.direction = r.Direction();
    c.directivity = r.Number();
    c.level_db = r.Number();
    c.exact = r.Flag();
    a.null_crossings.push_back(c);
  }
  for (int i = r.Int(lists, 4 * lists); i > 0; --i) {
    ProtectedDirectionField f = RandomLevels<ProtectedDirectionField>(r);
    f.co_polar_dbi = r.Number();
    f.cross_polar_dbi = r.Number();
    f.no_field = r.Flag();
    a.protected_directions.push_back(f);
  }
  PolarizationPurity& p = a.polarization;
  p.reference = static_cast<PolarizationReference>(r.Int(0, 5));
  p.co_polar_dbi_at_peak = r.Number();
  p.cross_polar_dbi_at_peak = r.Number();
  p.xpd_at_peak_db = r.Number();
  p.worst_xpd_in_beam_db = r.Number();
  p.worst_xpd_direction = r.Direction();
  p.axial_ratio_at_peak_db = r.Number();
  p.tilt_at_peak_deg = r.Number();
  p.sense_at_peak = r.Int(-1, 1);
  p.axial_ratio_limit_db = r.Number();
  p.axial_ratio_solid_angle_sr = r.Number();
  a.field_evaluations = static_cast<std::size_t>(r.Int(0, 1 << 30));
  a.seconds = r.Number();
  return a;
}

// Equal, or both NaN.
void Same(double found, double expected, const std::string& what) {
  if (std::isnan(expected)) {
    EXPECT_TRUE(std::isnan(found)) << what << ": found " << found << ", expected NaN";
  } else {
    EXPECT_EQ(found, expected) << what;
  }
}

void Same(const DirectionDeg& f, const DirectionDeg& e, const std::string& what) {
  Same(f.theta_deg, e.theta_deg, what + ".theta_deg");
  Same(f.phi_deg, e.phi_deg, what + ".phi_deg");
}

void Same(const Lobe& f, const Lobe& e, const std::string& what) {
  Same(f.direction, e.direction, what + ".direction");
  Same(f.directivity, e.directivity, what + ".directivity");
  Same(f.directivity_dbi, e.directivity_dbi, what + ".directivity_dbi");
  Same(f.level_db, e.level_db, what + ".level_db");
}

void Same(const BeamCut& f, const BeamCut& e, const std::string& what) {
  EXPECT_EQ(f.plane, e.plane) << what;
  Same(f.plane_phi_deg, e.plane_phi_deg, what + ".plane_phi_deg");
  EXPECT_EQ(f.half_power_found, e.half_power_found) << what;
  Same(f.half_power_width_deg, e.half_power_width_deg, what + ".half_power_width_deg");
  Same(f.half_power_lower_deg, e.half_power_lower_deg, what + ".half_power_lower_deg");
  Same(f.half_power_upper_deg, e.half_power_upper_deg, what + ".half_power_upper_deg");
  EXPECT_EQ(f.first_nulls_found, e.first_nulls_found) << what;
  Same(f.first_null_width_deg, e.first_null_width_deg, what + ".first_null_width_deg");
  Same(f.first_null_lower_deg, e.first_null_lower_deg, what + ".first_null_lower_deg");
  Same(f.first_null_upper_deg, e.first_null_upper_deg, what + ".first_null_upper_deg");
  EXPECT_EQ(f.clipped_by_ground, e.clipped_by_ground) << what;
  Same(f.tangent, e.tangent, what + ".tangent");
}

void Same(const PatternAnalysis& f, const PatternAnalysis& e) {
  Same(f.peak.direction, e.peak.direction, "peak.direction");
  Same(f.peak.directivity, e.peak.directivity, "peak.directivity");
  Same(f.peak.directivity_dbi, e.peak.directivity_dbi, "peak.directivity_dbi");
  Same(f.peak.grid_direction, e.peak.grid_direction, "peak.grid_direction");
  Same(f.peak.grid_directivity, e.peak.grid_directivity, "peak.grid_directivity");
  EXPECT_EQ(f.peak.refined, e.peak.refined);
  Same(f.elevation_cut, e.elevation_cut, "elevation_cut");
  Same(f.orthogonal_cut, e.orthogonal_cut, "orthogonal_cut");
  Same(f.front_to_back.ratio_db, e.front_to_back.ratio_db, "ratio_db");
  Same(f.front_to_back.back_direction, e.front_to_back.back_direction, "back_direction");
  Same(f.front_to_back.same_elevation_ratio_db, e.front_to_back.same_elevation_ratio_db,
       "same_elevation_ratio_db");
  Same(f.front_to_back.same_elevation_back_direction, e.front_to_back.same_elevation_back_direction,
       "same_elevation_back_direction");
  ASSERT_EQ(f.major_lobes.size(), e.major_lobes.size());
  for (std::size_t i = 0; i < e.major_lobes.size(); ++i) {
    Same(f.major_lobes[i], e.major_lobes[i], "major_lobes[" + std::to_string(i) + "]");
  }
  ASSERT_EQ(f.highest_side_lobe.has_value(), e.highest_side_lobe.has_value());
  if (e.highest_side_lobe) Same(*f.highest_side_lobe, *e.highest_side_lobe, "highest_side_lobe");
  ASSERT_EQ(f.side_lobes.size(), e.side_lobes.size());
  for (std::size_t i = 0; i < e.side_lobes.size(); ++i) {
    Same(f.side_lobes[i], e.side_lobes[i], "side_lobes[" + std::to_string(i) + "]");
  }
  EXPECT_EQ(f.side_lobes_truncated, e.side_lobes_truncated);
  ASSERT_EQ(f.null_loci.size(), e.null_loci.size());
  for (std::size_t i = 0; i < e.null_loci.size(); ++i) {
    const std::string w = "null_loci[" + std::to_string(i) + "]";
    const NullLocus &x = f.null_loci[i], &y = e.null_loci[i];
    EXPECT_EQ(x.cone, y.cone) << w;
    EXPECT_EQ(x.point, y.point) << w;
    Same(x.axis, y.axis, w + ".axis");
    Same(x.half_angle_deg, y.half_angle_deg, w + ".half_angle_deg");
    Same(x.direction, y.direction, w + ".direction");
    Same(x.theta_min_deg, y.theta_min_deg, w + ".theta_min_deg");
    Same(x.theta_max_deg, y.theta_max_deg, w + ".theta_max_deg");
    Same(x.phi_min_deg, y.phi_min_deg, w + ".phi_min_deg");
    Same(x.phi_max_deg, y.phi_max_deg, w + ".phi_max_deg");
    Same(x.directivity, y.directivity, w + ".directivity");
    Same(x.level_db, y.level_db, w + ".level_db");
    EXPECT_EQ(x.exact, y.exact) << w;
  }
  EXPECT_EQ(f.null_loci_truncated, e.null_loci_truncated);
  ASSERT_EQ(f.null_crossings.size(), e.null_crossings.size());
  for (std::size_t i = 0; i < e.null_crossings.size(); ++i) {
    const std::string w = "null_crossings[" + std::to_string(i) + "]";
    const NullCrossing &x = f.null_crossings[i], &y = e.null_crossings[i];
    Same(x.locus, y.locus, w + ".locus");
    EXPECT_EQ(x.orthogonal_plane, y.orthogonal_plane) << w;
    Same(x.offset_deg, y.offset_deg, w + ".offset_deg");
    Same(x.direction, y.direction, w + ".direction");
    Same(x.directivity, y.directivity, w + ".directivity");
    Same(x.level_db, y.level_db, w + ".level_db");
    EXPECT_EQ(x.exact, y.exact) << w;
  }
  ASSERT_EQ(f.protected_directions.size(), e.protected_directions.size());
  for (std::size_t i = 0; i < e.protected_directions.size(); ++i) {
    const std::string w = "protected_directions[" + std::to_string(i) + "]";
    const ProtectedDirectionField &pf = f.protected_directions[i], &pe = e.protected_directions[i];
    Same(pf.direction, pe.direction, w + ".direction");
    Same(pf.directivity, pe.directivity, w + ".directivity");
    Same(pf.directivity_dbi, pe.directivity_dbi, w + ".directivity_dbi");
    Same(pf.level_db, pe.level_db, w + ".level_db");
    Same(pf.co_polar_dbi, pe.co_polar_dbi, w + ".co_polar_dbi");
    Same(pf.cross_polar_dbi, pe.cross_polar_dbi, w + ".cross_polar_dbi");
    EXPECT_EQ(pf.no_field, pe.no_field) << w;
  }
  const PolarizationPurity &p = f.polarization, &q = e.polarization;
  EXPECT_EQ(p.reference, q.reference);
  Same(p.co_polar_dbi_at_peak, q.co_polar_dbi_at_peak, "co_polar_dbi_at_peak");
  Same(p.cross_polar_dbi_at_peak, q.cross_polar_dbi_at_peak, "cross_polar_dbi_at_peak");
  Same(p.xpd_at_peak_db, q.xpd_at_peak_db, "xpd_at_peak_db");
  Same(p.worst_xpd_in_beam_db, q.worst_xpd_in_beam_db, "worst_xpd_in_beam_db");
  Same(p.worst_xpd_direction, q.worst_xpd_direction, "worst_xpd_direction");
  Same(p.axial_ratio_at_peak_db, q.axial_ratio_at_peak_db, "axial_ratio_at_peak_db");
  Same(p.tilt_at_peak_deg, q.tilt_at_peak_deg, "tilt_at_peak_deg");
  EXPECT_EQ(p.sense_at_peak, q.sense_at_peak);
  Same(p.axial_ratio_limit_db, q.axial_ratio_limit_db, "axial_ratio_limit_db");
  Same(p.axial_ratio_solid_angle_sr, q.axial_ratio_solid_angle_sr, "axial_ratio_solid_angle_sr");
  EXPECT_EQ(f.field_evaluations, e.field_evaluations);
  Same(f.seconds, e.seconds, "seconds");
}

AnalysisOptions RandomOptions(Random& r, const PatternAnalysis& a) {
  AnalysisOptions o;
  o.reference = static_cast<PolarizationReference>(r.Int(0, 5));
  o.null_field = r.Flag() ? NullField::kCoPolar : NullField::kTotal;
  o.null_threshold_db = r.Number();
  o.side_lobe_threshold_db = r.Number();
  o.major_lobe_tolerance_db = r.Number();
  o.axial_ratio_limit_db = r.Number();
  for (const ProtectedDirectionField& f : a.protected_directions) {
    o.protected_directions_deg.emplace_back(f.direction.theta_deg, f.direction.phi_deg);
  }
  return o;
}

// A small real result to carry the analysis.
struct Carrier {
  testing::TestArray array;
  PatternResult result;
};
Carrier MakeCarrier() {
  testing::TestRng rng(5);
  Carrier c;
  c.array = testing::RandomArray(rng, 2, Ground::kNone);
  c.result = ComputePattern(c.array, c.array.currents,
                            AngularGrid::FromRanges({0, 180, 30}, {0, 330, 30}));
  return c;
}

TEST(Schema, EveryAnalysisFieldRoundTripsThroughTheFile) {
  const Carrier c = MakeCarrier();
  const std::string path =
      (std::filesystem::temp_directory_path() / "lobecast-schema-round-trip.h5").string();
  for (unsigned seed = 1; seed <= 12; ++seed) {
    SCOPED_TRACE("seed " + std::to_string(seed));
    Random r(seed);
    const PatternAnalysis a = RandomAnalysis(r, /*empty_lists=*/seed % 4 == 0);
    const AnalysisOptions o = RandomOptions(r, a);
    ResultWriteOptions w;
    w.before_finish = [&](PatternFileWriter& writer) { WriteAnalysis(writer, a, o); };
    WriteResult(path, c.array, c.array.currents, c.result, ResultMetadata{}, w);
    const std::optional<StoredAnalysis> back = ReadAnalysis(path);
    ASSERT_TRUE(back.has_value());
    Same(back->analysis, a);
    EXPECT_EQ(back->options.reference, o.reference);
    EXPECT_EQ(back->options.null_field, o.null_field);
    Same(back->options.null_threshold_db, o.null_threshold_db, "null_threshold_db");
    Same(back->options.side_lobe_threshold_db, o.side_lobe_threshold_db, "side_lobe_threshold_db");
    Same(back->options.major_lobe_tolerance_db, o.major_lobe_tolerance_db,
         "major_lobe_tolerance_db");
    Same(back->options.axial_ratio_limit_db, o.axial_ratio_limit_db, "axial_ratio_limit_db");
    ASSERT_EQ(back->options.protected_directions_deg.size(), o.protected_directions_deg.size());
    for (std::size_t i = 0; i < o.protected_directions_deg.size(); ++i) {
      Same(back->options.protected_directions_deg[i].first, o.protected_directions_deg[i].first,
           "protected theta");
      Same(back->options.protected_directions_deg[i].second, o.protected_directions_deg[i].second,
           "protected phi");
    }
  }
  std::filesystem::remove(path);
}

// The JSON keys the schema's walk gives (objects, directions, lists, infinity
// flags), leaving out the fields stored only in the file.
struct JsonKeys {
  std::set<std::string> keys;
  void Add(std::string_view k) { keys.emplace(k); }
  template <typename T>
  void Value(const schema::Field& f, const T&) {
    if (f.extra == schema::Extra::kFileOnly) return;
    if constexpr (std::is_same_v<T, DirectionDeg>) {
      Add(schema::DirectionKey(f.name));
      Add(schema::kThetaKey);
      Add(schema::kPhiKey);
    } else {
      Add(f.name);
    }
  }
  template <typename Body>
  void Object(const schema::ObjectSpec& o, Body&& body) {
    Add(o.json_name);
    body();
  }
  template <typename T, typename Body>
  void Optional(const schema::ObjectSpec& o, const std::optional<T>&, Body&& body) {
    Add(o.json_name);
    const T element{};
    body(element, *this);
  }
  template <typename T, typename Body>
  void List(const schema::ListSpec& l, const std::vector<T>&, const bool* truncated, Body&& body) {
    Add(l.name);
    if (truncated) Add(l.truncated);
    const T element{};
    body(element, *this);
  }
};

TEST(Schema, ReportJsonUsesExactlyTheSchemaNames) {
  Random r(99);
  const PatternAnalysis a = RandomAnalysis(r, /*empty_lists=*/false);
  const AnalysisOptions o = RandomOptions(r, a);
  const std::string json = text::ReportJson(text::ReportContext{}, a, o);
  std::set<std::string> found;
  const std::regex key("\"([A-Za-z0-9_]+)\": ");
  for (auto it = std::sregex_iterator(json.begin(), json.end(), key); it != std::sregex_iterator();
       ++it) {
    found.insert((*it)[1]);
  }
  JsonKeys expected;
  // The report's own members around the analysis (report_text.cpp).
  for (const char* k : {"format", "format_version", "result_path", "array_name", "frequency_hz",
                        "ground", "num_dipoles", "source", "null_means", "safety_note",
                        "field_floor_v", "power_significant_digits", "power_caution"}) {
    expected.Add(k);
  }
  expected.Object(schema::kRecordedOptions, [&] { schema::VisitRecordedOptions(o, expected); });
  schema::VisitAnalysis(a, expected);
  EXPECT_EQ(found, expected.keys);
  EXPECT_EQ(found.count("major_lobe_tolerance_db"), 0u) << "stored in the file only";
}

TEST(Schema, TablesKeepTheColumnsOfVersionOne) {
  // The layout schema version 1 files have always had (the former hand-written
  // column lists of io/hdf5/analysis_writer.cpp); readers such as scripts rely on it.
  const auto lobe = [](auto& l, auto& v) { schema::VisitLobe(l, v); };
  const auto null = [](auto& n, auto& v) { schema::VisitNullLocus(n, v); };
  const auto prot = [](auto& f, auto& v) { schema::VisitProtected(f, v); };
  const schema::Columns l = schema::ColumnsOf<Lobe>(lobe);
  const schema::Columns n = schema::ColumnsOf<NullLocus>(null);
  const schema::Columns p = schema::ColumnsOf<ProtectedDirectionField>(prot);
  EXPECT_EQ(schema::Columns::Joined(l.names),
            "theta_deg, phi_deg, directivity, directivity_dbi, level_db");
  EXPECT_EQ(schema::Columns::Joined(l.units), "deg, deg, 1, dBi, dB");
  // Version 2 replaced the point nulls by null loci.
  EXPECT_EQ(schema::Columns::Joined(n.names),
            "cone, point, axis_theta_deg, axis_phi_deg, half_angle_deg, theta_min_deg, "
            "theta_max_deg, phi_min_deg, phi_max_deg, theta_deg, phi_deg, directivity, "
            "level_db, exact");
  EXPECT_EQ(schema::Columns::Joined(n.units),
            "1, 1, deg, deg, deg, deg, deg, deg, deg, deg, deg, 1, dB, 1");
  EXPECT_EQ(schema::Columns::Joined(p.names),
            "theta_deg, phi_deg, directivity, directivity_dbi, level_db, co_polar_dbi, "
            "cross_polar_dbi, no_field");
  EXPECT_EQ(schema::Columns::Joined(p.units), "deg, deg, 1, dBi, dB, dBi, dBi, 1");
}

}  // namespace
}  // namespace lobecast
