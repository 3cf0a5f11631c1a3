// Pattern analysis: options, enum names and the whole analysis (pattern_analysis.h).
#include "engine/analysis/pattern_analysis.h"

#include <algorithm>
#include <array>
#include <chrono>
#include <cmath>
#include <sstream>

#include "engine/analysis/beam.h"
#include "engine/analysis/grid_neighbours.h"
#include "engine/analysis/nulls.h"
#include "engine/analysis/pattern_probe.h"
#include "engine/analysis/polarization_purity.h"
#include "engine/analysis/side_lobes.h"
#include "engine/check.h"
#include "engine/decibels.h"
#include "engine/error.h"
#include "engine/text_case.h"

namespace lobecast {
namespace {

// Sets *why to "field: found value, expected rule" and returns false.
template <typename T>
bool Fail(std::string* why, const char* field, T value, const char* rule) {
  if (why) {
    std::ostringstream s;
    s << "analysis options: " << field << " found " << value << ", expected " << rule;
    *why = s.str();
  }
  return false;
}

}  // namespace

std::string_view ToString(CutPlane p) {
  switch (p) {
    case CutPlane::kElevation:
      return "elevation";
    case CutPlane::kOrthogonal:
      return "orthogonal";
    case CutPlane::kE:
      return "E";
    case CutPlane::kH:
      return "H";
    case CutPlane::kXZ:
      return "xz";
    case CutPlane::kYZ:
      return "yz";
  }
  return "elevation";
}

std::optional<CutPlane> CutPlaneFromString(std::string_view s) {
  for (const CutPlane p : {CutPlane::kElevation, CutPlane::kOrthogonal, CutPlane::kE, CutPlane::kH,
                           CutPlane::kXZ, CutPlane::kYZ})
    if (EqualsIgnoreCase(s, ToString(p))) return p;
  return std::nullopt;
}

std::string_view ToString(NullField f) { return f == NullField::kCoPolar ? "co" : "total"; }

std::optional<NullField> NullFieldFromString(std::string_view s) {
  const std::string l = Lower(s);
  if (l == "total") return NullField::kTotal;
  if (l == "co") return NullField::kCoPolar;
  return std::nullopt;
}

bool AnalysisOptions::IsValid(std::string* why) const {
  if (!(std::isfinite(null_threshold_db) && null_threshold_db < 0))
    return Fail(why, "null_threshold_db", null_threshold_db, "a finite value < 0 dB");
  if (!(std::isfinite(side_lobe_threshold_db) && side_lobe_threshold_db < 0))
    return Fail(why, "side_lobe_threshold_db", side_lobe_threshold_db, "a finite value < 0 dB");
  if (!(major_lobe_tolerance_db >= 0 && major_lobe_tolerance_db < 3))
    return Fail(why, "major_lobe_tolerance_db", major_lobe_tolerance_db, "0 <= value < 3 dB");
  for (const auto& [t, p] : protected_directions_deg) {
    if (!(std::isfinite(t) && t >= 0 && t <= 180))
      return Fail(why, "protected_directions_deg theta", t, "0 <= theta <= 180 deg");
    if (!std::isfinite(p)) return Fail(why, "protected_directions_deg phi", p, "a finite angle");
  }
  if (!(refine_tolerance_deg >= 1e-12 && refine_tolerance_deg <= 0.1))
    return Fail(why, "refine_tolerance_deg", refine_tolerance_deg, "1e-12 <= value <= 0.1 deg");
  if (max_evaluations_per_search < 20)
    return Fail(why, "max_evaluations_per_search", max_evaluations_per_search, ">= 20");
  if (!(cut_step_deg >= 1e-6 && cut_step_deg <= 5))
    return Fail(why, "cut_step_deg", cut_step_deg, "1e-6 <= value <= 5 deg");
  if (!(axial_ratio_limit_db > 0 && std::isfinite(axial_ratio_limit_db)))
    return Fail(why, "axial_ratio_limit_db", axial_ratio_limit_db, "a finite value > 0 dB");
  if (axial_ratio_phi_planes < 4 || axial_ratio_phi_planes > 100000)
    return Fail(why, "axial_ratio_phi_planes", axial_ratio_phi_planes, "4 .. 100000");
  if (!(axial_ratio_theta_step_deg >= 1e-3 && axial_ratio_theta_step_deg <= 10))
    return Fail(why, "axial_ratio_theta_step_deg", axial_ratio_theta_step_deg,
                "1e-3 <= value <= 10 deg");
  if (beam_rays < 4 || beam_rays > 100000) return Fail(why, "beam_rays", beam_rays, "4 .. 100000");
  if (beam_ray_samples < 1 || beam_ray_samples > 100000)
    return Fail(why, "beam_ray_samples", beam_ray_samples, "1 .. 100000");
  return true;
}

PolarizationReference AutoReference(const PatternResult& r) {
  const Eigen::Index peak = PeakIndex(r.directivity);
  const std::size_t np = r.grid.phi_deg.size();
  const double theta = r.grid.theta_deg[static_cast<std::size_t>(peak) / np];
  const double phi = r.grid.phi_deg[static_cast<std::size_t>(peak) % np];
  using R = PolarizationReference;
  const bool near_horizon = theta >= 45.0 && theta <= 135.0;
  const std::array<R, 6> order =
      near_horizon ? std::array<R, 6>{R::kTheta,   R::kPhi,           R::kLinearX,
                                      R::kLinearY, R::kRightCircular, R::kLeftCircular}
                   : std::array<R, 6>{R::kLinearX,      R::kLinearY, R::kRightCircular,
                                      R::kLeftCircular, R::kTheta,   R::kPhi};
  R best = order[0];
  double best_co = -1.0;
  for (const R ref : order) {
    const double co = std::norm(
        CoCrossOf(r.field.e_theta[peak], r.field.e_phi[peak], phi * kDegree, ref, r.field_floor_v)
            .co);
    // The relative margin keeps ties (a 45 deg linear field) on the earlier candidate.
    if (co > best_co * (1.0 + 1e-9)) {
      best_co = co;
      best = ref;
    }
  }
  return best;
}

PatternAnalysis AnalyzePattern(const Array& array, const Eigen::VectorXcd& currents_a,
                               const PatternResult& grid_result, const AnalysisOptions& options) {
  const auto t0 = std::chrono::steady_clock::now();
  std::string why;
  if (!options.IsValid(&why)) throw InvalidArgument(why);
  Validate(array);
  ValidateCurrents(array, currents_a);
  const std::size_t n = grid_result.grid.size();
  // An empty grid can come from a file; values that do not fit the grid cannot
  // (ComputePattern makes one each per direction, ReadResult checks the shapes).
  if (n == 0) throw InvalidArgument("pattern analysis: found an empty grid, expected directions");
  LOBECAST_CHECK_EQ(static_cast<std::size_t>(grid_result.directivity.size()), n);
  LOBECAST_CHECK_EQ(grid_result.field.size(), n);
  if (!(grid_result.radiated_power_w > 0)) {
    std::ostringstream s;
    s << "pattern analysis: radiated power found " << grid_result.radiated_power_w
      << " W, expected > 0";
    throw InvalidArgument(s.str());
  }
  const PatternProbe probe(array, currents_a, grid_result.radiated_power_w);

  // The grid result must belong to this array: compare at its maximum.
  {
    Eigen::Index best = 0;
    const double grid_max = grid_result.directivity.maxCoeff(&best);
    const std::size_t np = grid_result.grid.phi_deg.size();
    const double d = probe.DirectivityAt(
        UnitVectorAt(grid_result.grid.theta_deg[static_cast<std::size_t>(best) / np] * kDegree,
                     grid_result.grid.phi_deg[static_cast<std::size_t>(best) % np] * kDegree));
    if (!(std::abs(d - grid_max) <= 1e-6 * grid_max)) {
      std::ostringstream s;
      s << "pattern analysis: the grid maximum directivity is " << grid_max
        << " but the array gives " << d << " there; expected the grid result of this array";
      throw InvalidArgument(s.str());
    }
  }

  PatternAnalysis out;
  Vec3 peak;
  out.peak = RefinePeak(probe, grid_result.grid, grid_result.directivity, options, &peak);
  const double dp = out.peak.directivity;
  const auto [first_plane, second_plane] = PrincipalPlanesAt(probe, peak, out.peak.direction);
  out.elevation_cut = AnalyzePlane(probe, peak, first_plane, dp, options);
  out.orthogonal_cut = AnalyzePlane(probe, peak, second_plane, dp, options);
  out.front_to_back =
      FrontToBackOf(probe, peak, out.peak.direction, dp, options.refine_tolerance_deg * kDegree);

  const GridNeighbours neighbours(grid_result.grid, array.ground);
  LobeSearch lobes = FindLobes(probe, neighbours, grid_result.directivity, peak, dp, options);
  out.major_lobes = std::move(lobes.major_lobes);
  out.highest_side_lobe = lobes.highest_side_lobe;
  out.side_lobes = std::move(lobes.side_lobes);
  out.side_lobes_truncated = lobes.truncated;

  const NullSearch nulls = FindNulls(probe, neighbours, grid_result, dp, options);
  out.null_loci = nulls.loci;
  out.null_loci_truncated = nulls.truncated;
  for (const bool orthogonal : {false, true}) {
    const std::vector<NullCrossing> c =
        FindNullCrossings(probe, nulls, peak, (orthogonal ? second_plane : first_plane).tangent,
                          orthogonal, dp, options);
    out.null_crossings.insert(out.null_crossings.end(), c.begin(), c.end());
  }

  std::vector<Vec3> prot;
  for (const auto& [t, p] : options.protected_directions_deg)
    prot.push_back(UnitVectorAt(t * kDegree, p * kDegree));
  const std::vector<ProbeSample> ps = probe.At(prot);
  for (std::size_t i = 0; i < ps.size(); ++i) {
    ProtectedDirectionField f;
    f.direction = {options.protected_directions_deg[i].first,
                   options.protected_directions_deg[i].second};
    f.directivity = ps[i].directivity;
    f.directivity_dbi = ToDb(ps[i].directivity);
    f.level_db = ToDb(ps[i].directivity / dp);
    const CoCross c = ps[i].CoCrossFor(options.reference);  // phi as evaluated (0 on a pole)
    f.co_polar_dbi = ToDb(probe.DirectivityOf(c.co));
    f.cross_polar_dbi = ToDb(probe.DirectivityOf(c.cross));
    f.no_field = ps[i].no_field;
    out.protected_directions.push_back(f);
  }

  out.polarization = AnalyzePolarization(probe, neighbours, grid_result, peak, out.peak.direction,
                                         first_plane.tangent, dp, options);
  out.field_evaluations = probe.evaluations();
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return out;
}

}  // namespace lobecast
