#include "io/hdf5/analysis_reader.h"

#include <cstdint>
#include <string>
#include <vector>

#include "io/hdf5/analysis_writer.h"
#include "io/hdf5/hdf5_file.h"

namespace lobecast {
namespace {

using hdf5::Handle;

class GroupReader {
 public:
  GroupReader(const std::string& file_path, hid_t file, const std::string& group)
      : file_path_(file_path), name_(group), g_(hdf5::OpenGroup(file, group)) {}
  double Number(const std::string& name) const {
    Require(name);
    return hdf5::ReadDoubleAttribute(g_, name);
  }
  std::int64_t Int(const std::string& name) const {
    Require(name);
    return hdf5::ReadIntAttribute(g_, name);
  }
  bool Flag(const std::string& name) const { return Int(name) != 0; }
  std::string Text(const std::string& name) const {
    Require(name);
    return hdf5::ReadStringAttribute(g_, name);
  }
  DirectionDeg Direction(const std::string& theta, const std::string& phi) const {
    return {Number(theta), Number(phi)};
  }

 private:
  void Require(const std::string& name) const {
    if (!hdf5::HasAttribute(g_, name)) {
      throw IoError(file_path_, "group '" + name_ + "' lacks the attribute '" + name + "'");
    }
  }
  std::string file_path_;
  std::string name_;
  Handle g_;
};

// A (count, columns) table, or no rows when count is 0 (such tables are not written).
std::vector<double> ReadTable(const std::string& path, hid_t file, const std::string& name,
                              std::int64_t count, std::size_t columns) {
  if (count < 0) throw IoError(path, "negative row count for '" + name + "'");
  if (count == 0) return {};
  if (!hdf5::Exists(file, name)) {
    throw IoError(path,
                  "'" + name + "' is missing but " + std::to_string(count) + " rows are recorded");
  }
  std::vector<hsize_t> dims;
  std::vector<double> t = hdf5::ReadDoubles(file, name, &dims);
  if (dims != std::vector<hsize_t>{static_cast<hsize_t>(count), columns}) {
    throw IoError(path, "'" + name + "' does not have shape (" + std::to_string(count) + ", " +
                            std::to_string(columns) + ")");
  }
  return t;
}

Lobe LobeRow(const double* r) {
  Lobe l;
  l.direction = {r[0], r[1]};
  l.directivity = r[2];
  l.directivity_dbi = r[3];
  l.level_db = r[4];
  return l;
}

BeamCut ReadCut(const GroupReader& g) {
  BeamCut c;
  c.half_power_found = g.Flag("half_power_found");
  c.half_power_width_deg = g.Number("half_power_width_deg");
  c.half_power_lower_deg = g.Number("half_power_lower_deg");
  c.half_power_upper_deg = g.Number("half_power_upper_deg");
  c.first_nulls_found = g.Flag("first_nulls_found");
  c.first_null_width_deg = g.Number("first_null_width_deg");
  c.first_null_lower_deg = g.Number("first_null_lower_deg");
  c.first_null_upper_deg = g.Number("first_null_upper_deg");
  c.clipped_by_ground = g.Flag("clipped_by_ground");
  return c;
}

PolarizationReference ReferenceFrom(const std::string& path, const std::string& s) {
  const auto r = PolarizationReferenceFromString(s);
  if (!r) throw IoError(path, "unknown polarization reference \"" + s + "\" in the analysis");
  return *r;
}

}  // namespace

std::optional<StoredAnalysis> ReadAnalysis(const std::string& path) {
  hdf5::ErrorSilencer silencer;
  Handle file = hdf5::OpenFileReadOnly(path);
  const std::string root(kAnalysisGroup);
  if (!hdf5::Exists(file, root)) return std::nullopt;
  try {
    const GroupReader g(path, file, root);
    if (g.Int("analysis_version") > kAnalysisVersion) return std::nullopt;

    StoredAnalysis out;
    AnalysisOptions& o = out.options;
    o.reference = ReferenceFrom(path, g.Text("reference"));
    const std::string null_field = g.Text("null_field");
    const auto nf = NullFieldFromString(null_field);
    if (!nf) throw IoError(path, "unknown null_field \"" + null_field + "\" in the analysis");
    o.null_field = *nf;
    o.null_threshold_db = g.Number("null_threshold_db");
    o.side_lobe_threshold_db = g.Number("side_lobe_threshold_db");
    o.major_lobe_tolerance_db = g.Number("major_lobe_tolerance_db");
    o.axial_ratio_limit_db = g.Number("axial_ratio_limit_db");

    PatternAnalysis& a = out.analysis;
    a.field_evaluations = static_cast<std::size_t>(g.Int("field_evaluations"));
    a.seconds = g.Number("seconds");
    a.side_lobes_truncated = g.Flag("side_lobes_truncated");
    a.nulls_truncated = g.Flag("nulls_truncated");

    const GroupReader peak(path, file, root + "/peak");
    a.peak.direction = peak.Direction("theta_deg", "phi_deg");
    a.peak.directivity = peak.Number("directivity");
    a.peak.directivity_dbi = peak.Number("directivity_dbi");
    a.peak.grid_direction = peak.Direction("grid_theta_deg", "grid_phi_deg");
    a.peak.grid_directivity = peak.Number("grid_directivity");
    a.peak.refined = peak.Flag("refined");

    a.elevation_cut = ReadCut(GroupReader(path, file, root + "/elevation_cut"));
    a.orthogonal_cut = ReadCut(GroupReader(path, file, root + "/orthogonal_cut"));

    const GroupReader fb(path, file, root + "/front_to_back");
    a.front_to_back.ratio_db = fb.Number("ratio_db");
    a.front_to_back.back_direction = fb.Direction("back_theta_deg", "back_phi_deg");
    a.front_to_back.same_elevation_ratio_db = fb.Number("same_elevation_ratio_db");
    a.front_to_back.same_elevation_back_direction =
        fb.Direction("same_elevation_back_theta_deg", "same_elevation_back_phi_deg");

    if (hdf5::Exists(file, root + "/highest_side_lobe")) {
      const GroupReader h(path, file, root + "/highest_side_lobe");
      const double row[5] = {h.Number("theta_deg"), h.Number("phi_deg"), h.Number("directivity"),
                             h.Number("directivity_dbi"), h.Number("level_db")};
      a.highest_side_lobe = LobeRow(row);
    }

    const GroupReader pol(path, file, root + "/polarization");
    PolarizationPurity& p = a.polarization;
    p.reference = ReferenceFrom(path, pol.Text("reference"));
    p.co_polar_dbi_at_peak = pol.Number("co_polar_dbi_at_peak");
    p.cross_polar_dbi_at_peak = pol.Number("cross_polar_dbi_at_peak");
    p.xpd_at_peak_db = pol.Number("xpd_at_peak_db");
    p.worst_xpd_in_beam_db = pol.Number("worst_xpd_in_beam_db");
    p.worst_xpd_direction = pol.Direction("worst_xpd_theta_deg", "worst_xpd_phi_deg");
    p.axial_ratio_at_peak_db = pol.Number("axial_ratio_at_peak_db");
    p.tilt_at_peak_deg = pol.Number("tilt_at_peak_deg");
    p.sense_at_peak = static_cast<int>(pol.Int("sense_at_peak"));
    p.axial_ratio_limit_db = pol.Number("axial_ratio_limit_db");
    p.axial_ratio_solid_angle_sr = pol.Number("axial_ratio_solid_angle_sr");

    std::vector<double> t =
        ReadTable(path, file, root + "/major_lobes", g.Int("num_major_lobes"), 5);
    for (std::size_t i = 0; i < t.size(); i += 5) a.major_lobes.push_back(LobeRow(&t[i]));
    t = ReadTable(path, file, root + "/side_lobes", g.Int("num_side_lobes"), 5);
    for (std::size_t i = 0; i < t.size(); i += 5) a.side_lobes.push_back(LobeRow(&t[i]));
    t = ReadTable(path, file, root + "/nulls", g.Int("num_nulls"), 5);
    for (std::size_t i = 0; i < t.size(); i += 5) {
      Null n;
      n.direction = {t[i], t[i + 1]};
      n.directivity = t[i + 2];
      n.level_db = t[i + 3];
      n.exact = t[i + 4] != 0.0;
      a.nulls.push_back(n);
    }
    t = ReadTable(path, file, root + "/protected_directions", g.Int("num_protected_directions"), 8);
    for (std::size_t i = 0; i < t.size(); i += 8) {
      ProtectedDirectionField f;
      f.direction = {t[i], t[i + 1]};
      f.directivity = t[i + 2];
      f.directivity_dbi = t[i + 3];
      f.level_db = t[i + 4];
      f.co_polar_dbi = t[i + 5];
      f.cross_polar_dbi = t[i + 6];
      f.no_field = t[i + 7] != 0.0;
      a.protected_directions.push_back(f);
      o.protected_directions_deg.emplace_back(t[i], t[i + 1]);
    }
    return out;
  } catch (const IoError& e) {
    if (e.path() == path) throw;
    throw IoError(path, e.detail());
  }
}

}  // namespace lobecast
