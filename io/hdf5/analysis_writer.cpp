#include "io/hdf5/analysis_writer.h"

#include <cstdint>
#include <string>
#include <vector>

namespace lobecast {
namespace {

const std::string kLobeColumns = "theta_deg, phi_deg, directivity, directivity_dbi, level_db";
const std::string kNullColumns = "theta_deg, phi_deg, directivity, level_db, exact";
const std::string kProtectedColumns =
    "theta_deg, phi_deg, directivity, directivity_dbi, level_db, co_polar_dbi, "
    "cross_polar_dbi, no_field";
// Per column, in the order of the columns (the `units` attribute of each table).
constexpr std::string_view kLobeUnits = "deg, deg, 1, dBi, dB";
constexpr std::string_view kNullUnits = "deg, deg, 1, dB, 1";
constexpr std::string_view kProtectedUnits = "deg, deg, 1, dBi, dB, dBi, dBi, 1";

class GroupWriter {
 public:
  GroupWriter(PatternFileWriter& w, std::string path) : w_(w), path_(std::move(path)) {}
  void Number(const std::string& name, double v) { w_.WriteAttribute(path_, name, v); }
  void Int(const std::string& name, std::int64_t v) { w_.WriteIntAttribute(path_, name, v); }
  void Flag(const std::string& name, bool v) { Int(name, v ? 1 : 0); }
  void Text(const std::string& name, std::string_view v) {
    w_.WriteStringAttribute(path_, name, v);
  }

 private:
  PatternFileWriter& w_;
  std::string path_;
};

void WriteCut(PatternFileWriter& w, const std::string& path, const BeamCut& c,
              std::string_view definition) {
  GroupWriter g(w, path);
  g.Flag("half_power_found", c.half_power_found);
  g.Number("half_power_width_deg", c.half_power_width_deg);
  g.Number("half_power_lower_deg", c.half_power_lower_deg);
  g.Number("half_power_upper_deg", c.half_power_upper_deg);
  g.Flag("first_nulls_found", c.first_nulls_found);
  g.Number("first_null_width_deg", c.first_null_width_deg);
  g.Number("first_null_lower_deg", c.first_null_lower_deg);
  g.Number("first_null_upper_deg", c.first_null_upper_deg);
  g.Flag("clipped_by_ground", c.clipped_by_ground);
  g.Text("definition", definition);
}

void AppendLobe(std::vector<double>& t, const Lobe& l) {
  t.insert(t.end(), {l.direction.theta_deg, l.direction.phi_deg, l.directivity, l.directivity_dbi,
                     l.level_db});
}

void WriteRowsIfAny(PatternFileWriter& w, const std::string& path, std::size_t rows,
                    std::size_t columns, const std::vector<double>& table, std::string_view units) {
  if (rows > 0) w.WriteTable(path, {rows, columns}, table.data(), units);
}

}  // namespace

void WriteAnalysis(PatternFileWriter& w, const PatternAnalysis& a, const AnalysisOptions& o) {
  const std::string root(kAnalysisGroup);
  GroupWriter g(w, root);
  g.Int("analysis_version", kAnalysisVersion);
  g.Text("reference", ToString(o.reference));
  g.Text("null_field", ToString(o.null_field));
  g.Number("null_threshold_db", o.null_threshold_db);
  g.Number("side_lobe_threshold_db", o.side_lobe_threshold_db);
  g.Number("major_lobe_tolerance_db", o.major_lobe_tolerance_db);
  g.Number("axial_ratio_limit_db", o.axial_ratio_limit_db);
  g.Int("field_evaluations", static_cast<std::int64_t>(a.field_evaluations));
  g.Number("seconds", a.seconds);
  g.Int("num_major_lobes", static_cast<std::int64_t>(a.major_lobes.size()));
  g.Int("num_side_lobes", static_cast<std::int64_t>(a.side_lobes.size()));
  g.Flag("side_lobes_truncated", a.side_lobes_truncated);
  g.Int("num_nulls", static_cast<std::int64_t>(a.nulls.size()));
  g.Flag("nulls_truncated", a.nulls_truncated);
  g.Int("num_protected_directions", static_cast<std::int64_t>(a.protected_directions.size()));
  g.Text("lobe_columns", kLobeColumns);
  g.Text("null_columns", kNullColumns);
  g.Text("protected_columns", kProtectedColumns);

  GroupWriter peak(w, root + "/peak");
  peak.Number("theta_deg", a.peak.direction.theta_deg);
  peak.Number("phi_deg", a.peak.direction.phi_deg);
  peak.Number("directivity", a.peak.directivity);
  peak.Number("directivity_dbi", a.peak.directivity_dbi);
  peak.Number("grid_theta_deg", a.peak.grid_direction.theta_deg);
  peak.Number("grid_phi_deg", a.peak.grid_direction.phi_deg);
  peak.Number("grid_directivity", a.peak.grid_directivity);
  peak.Flag("refined", a.peak.refined);

  WriteCut(w, root + "/elevation_cut", a.elevation_cut,
           "great circle through the peak and the z axis (constant phi); offsets from the "
           "peak in deg, positive toward theta_hat");
  WriteCut(w, root + "/orthogonal_cut", a.orthogonal_cut,
           "great circle through the peak perpendicular to the elevation cut; offsets from "
           "the peak in deg, positive toward phi_hat");

  GroupWriter fb(w, root + "/front_to_back");
  fb.Number("ratio_db", a.front_to_back.ratio_db);
  fb.Number("back_theta_deg", a.front_to_back.back_direction.theta_deg);
  fb.Number("back_phi_deg", a.front_to_back.back_direction.phi_deg);
  fb.Number("same_elevation_ratio_db", a.front_to_back.same_elevation_ratio_db);
  fb.Number("same_elevation_back_theta_deg",
            a.front_to_back.same_elevation_back_direction.theta_deg);
  fb.Number("same_elevation_back_phi_deg", a.front_to_back.same_elevation_back_direction.phi_deg);

  if (a.highest_side_lobe) {
    const Lobe& l = *a.highest_side_lobe;
    GroupWriter h(w, root + "/highest_side_lobe");
    h.Number("theta_deg", l.direction.theta_deg);
    h.Number("phi_deg", l.direction.phi_deg);
    h.Number("directivity", l.directivity);
    h.Number("directivity_dbi", l.directivity_dbi);
    h.Number("level_db", l.level_db);
  }

  const PolarizationPurity& p = a.polarization;
  GroupWriter pol(w, root + "/polarization");
  pol.Text("reference", ToString(p.reference));
  pol.Number("co_polar_dbi_at_peak", p.co_polar_dbi_at_peak);
  pol.Number("cross_polar_dbi_at_peak", p.cross_polar_dbi_at_peak);
  pol.Number("xpd_at_peak_db", p.xpd_at_peak_db);
  pol.Number("worst_xpd_in_beam_db", p.worst_xpd_in_beam_db);
  pol.Number("worst_xpd_theta_deg", p.worst_xpd_direction.theta_deg);
  pol.Number("worst_xpd_phi_deg", p.worst_xpd_direction.phi_deg);
  pol.Number("axial_ratio_at_peak_db", p.axial_ratio_at_peak_db);
  pol.Number("tilt_at_peak_deg", p.tilt_at_peak_deg);
  pol.Int("sense_at_peak", p.sense_at_peak);
  pol.Number("axial_ratio_limit_db", p.axial_ratio_limit_db);
  pol.Number("axial_ratio_solid_angle_sr", p.axial_ratio_solid_angle_sr);

  std::vector<double> t;
  for (const Lobe& l : a.major_lobes) AppendLobe(t, l);
  WriteRowsIfAny(w, root + "/major_lobes", a.major_lobes.size(), 5, t, kLobeUnits);
  t.clear();
  for (const Lobe& l : a.side_lobes) AppendLobe(t, l);
  WriteRowsIfAny(w, root + "/side_lobes", a.side_lobes.size(), 5, t, kLobeUnits);
  t.clear();
  for (const Null& n : a.nulls) {
    t.insert(t.end(), {n.direction.theta_deg, n.direction.phi_deg, n.directivity, n.level_db,
                       n.exact ? 1.0 : 0.0});
  }
  WriteRowsIfAny(w, root + "/nulls", a.nulls.size(), 5, t, kNullUnits);
  t.clear();
  for (const ProtectedDirectionField& f : a.protected_directions) {
    t.insert(t.end(), {f.direction.theta_deg, f.direction.phi_deg, f.directivity, f.directivity_dbi,
                       f.level_db, f.co_polar_dbi, f.cross_polar_dbi, f.no_field ? 1.0 : 0.0});
  }
  WriteRowsIfAny(w, root + "/protected_directions", a.protected_directions.size(), 8, t,
                 kProtectedUnits);
}

}  // namespace lobecast
