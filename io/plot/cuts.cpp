#include "io/plot/cuts.h"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>

#include <Eigen/Geometry>

#include "engine/analysis/pattern_probe.h"
#include "engine/ground.h"
#include "engine/text_case.h"
#include "io/input_error.h"

namespace lobecast::plot {
namespace {

std::string Number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

// Index of the sample equal to `deg` (within 1e-6 deg), comparing modulo 360
// when `periodic`; std::nullopt when absent.
std::optional<std::size_t> FindSample(const std::vector<double>& values, double deg,
                                      bool periodic) {
  for (std::size_t i = 0; i < values.size(); ++i) {
    double d = values[i] - deg;
    if (periodic) d = std::remainder(d, 360.0);
    if (std::fabs(d) < 1e-6) return i;
  }
  return std::nullopt;
}

[[noreturn]] void NotOnGrid(const char* name, double deg, const std::vector<double>& values) {
  std::string nearest;
  if (!values.empty()) {
    auto it = std::lower_bound(values.begin(), values.end(), deg);
    if (it != values.begin()) nearest += Number(*(it - 1));
    if (it != values.end()) nearest += (nearest.empty() ? "" : " or ") + Number(*it);
  }
  throw InputError(SourceLocation{"--cut"},
                   std::string("found ") + name + " = " + Number(deg) +
                       " deg, expected a value on the result's grid (" + name + " " +
                       Number(values.empty() ? 0 : values.front()) + " .. " +
                       Number(values.empty() ? 0 : values.back()) + " deg" +
                       (nearest.empty() ? "" : "; nearest " + nearest) + ")");
}

// Principal-plane samples every this many deg of offset.
constexpr double kPrincipalStep_deg = 0.25;

Vec3 UnitOf(const DirectionDeg& d) {
  return UnitVectorAt(d.theta_deg * kDegree, d.phi_deg * kDegree);
}

}  // namespace

double Cut::ScreenAngleOfOffset(double offset_deg) const {
  const Vec3 r = AlongGreatCircle(peak, tangent, offset_deg * kDegree);
  return std::atan2(r.dot(right), r.dot(up)) / kDegree;
}

namespace {

Cut PrincipalCut(const StoredResult& r, const CutSpec& spec, const PatternAnalysis* a) {
  const char* name = spec.plane == CutPlane::kElevation ? "elevation" : "orthogonal";
  if (!a)
    throw InputError(SourceLocation{"--cut"}, std::string("found ") + name +
                                                  ", expected a result with its pattern "
                                                  "analysis (computed without --no-analysis)");
  Cut cut;
  cut.spec = spec;
  cut.peak = UnitOf(a->peak.direction);
  const BeamCut& bc = spec.plane == CutPlane::kElevation ? a->elevation_cut : a->orthogonal_cut;
  cut.tangent = UnitOf(bc.tangent);
  const Vec3 normal = cut.peak.cross(cut.tangent).normalized();
  const Vec3 z_in = Vec3::UnitZ() - normal * normal.z();
  cut.up = z_in.norm() > 1e-6 ? z_in.normalized() : cut.peak;
  cut.right = cut.up.cross(normal);
  // The peak's side on the right (as on a phi cut); with the peak up, positive offsets.
  const double side = cut.right.dot(cut.peak);
  if (side < -1e-12 || (std::abs(side) <= 1e-12 && cut.right.dot(cut.tangent) < 0))
    cut.right = -cut.right;
  const int n = static_cast<int>(std::lround(360.0 / kPrincipalStep_deg));
  std::vector<Vec3> dirs;
  std::vector<double> offsets;
  for (int i = 0; i <= n; ++i) {
    const double s = -180.0 + kPrincipalStep_deg * i;
    const Vec3 d = AlongGreatCircle(cut.peak, cut.tangent, s * kDegree);
    if (BelowGround(r.array.ground, AnglesOf(d).theta_rad)) continue;
    dirs.push_back(d);
    offsets.push_back(s);
  }
  const PatternProbe probe(r.array, r.currents, r.result.radiated_power_w);
  const std::vector<ProbeSample> ps = probe.At(dirs);
  for (std::size_t k = 0; k < ps.size(); ++k) {
    cut.angle_deg.push_back(offsets[k]);
    cut.phi_deg.push_back(ps[k].phi_rad / kDegree);
    cut.samples.push_back({ps[k].e_theta, ps[k].e_phi, ps[k].directivity});
    cut.screen_deg.push_back(std::atan2(dirs[k].dot(cut.right), dirs[k].dot(cut.up)) / kDegree);
  }
  return cut;
}

}  // namespace

std::string CutSpec::Describe() const {
  if (plane == CutPlane::kElevation)
    return "elevation plane of the analysis (offset from the peak, + toward its tangent)";
  if (plane == CutPlane::kOrthogonal)
    return "orthogonal plane of the analysis (offset from the peak, + toward its tangent)";
  if (plane == CutPlane::kPhiConstant)
    return "phi = " + Number(value_deg) + " deg plane (signed theta; negative on the phi = " +
           Number(std::fmod(value_deg + 180.0, 360.0)) + " deg side)";
  return "theta = " + Number(value_deg) + " deg cone (phi from +x toward +y)";
}

std::string CutSpec::ShortName() const {
  if (plane == CutPlane::kElevation) return "elevation";
  if (plane == CutPlane::kOrthogonal) return "orthogonal";
  return (plane == CutPlane::kPhiConstant ? "phi" : "theta") + Number(value_deg);
}

std::optional<CutSpec> CutSpecFromString(std::string_view s) {
  const std::size_t eq = s.find('=');
  {
    CutSpec p;
    const std::string whole = Lower(s);
    if (whole == "elevation" || whole == "orthogonal") {
      p.plane = whole == "elevation" ? CutPlane::kElevation : CutPlane::kOrthogonal;
      return p;
    }
  }
  auto trim = [](std::string_view t) {
    while (!t.empty() && std::isspace(static_cast<unsigned char>(t.front()))) t.remove_prefix(1);
    while (!t.empty() && std::isspace(static_cast<unsigned char>(t.back()))) t.remove_suffix(1);
    return t;
  };
  if (eq == std::string_view::npos) return std::nullopt;
  const std::string name = Lower(trim(s.substr(0, eq)));
  const std::string_view value = trim(s.substr(eq + 1));
  CutSpec spec;
  if (name == "phi") {
    spec.plane = CutPlane::kPhiConstant;
  } else if (name == "theta") {
    spec.plane = CutPlane::kThetaConstant;
  } else {
    return std::nullopt;
  }
  const auto [p, ec] = std::from_chars(value.data(), value.data() + value.size(), spec.value_deg);
  if (ec != std::errc() || p != value.data() + value.size() || value.empty() ||
      !std::isfinite(spec.value_deg))
    return std::nullopt;
  if (spec.plane == CutPlane::kThetaConstant && (spec.value_deg < 0 || spec.value_deg > 180))
    return std::nullopt;
  return spec;
}

Cut ExtractCut(const StoredResult& r, const CutSpec& spec, const PatternAnalysis* analysis) {
  if (spec.principal()) return PrincipalCut(r, spec, analysis);
  const std::vector<double>& theta = r.result.grid.theta_deg;
  const std::vector<double>& phi = r.result.grid.phi_deg;
  const std::size_t np = phi.size();
  Cut cut;
  cut.spec = spec;
  if (spec.plane == CutPlane::kThetaConstant) {
    const auto i = FindSample(theta, spec.value_deg, false);
    if (!i) NotOnGrid("theta", spec.value_deg, theta);
    for (std::size_t j = 0; j < np; ++j) {
      cut.angle_deg.push_back(phi[j]);
      cut.grid_index.push_back(*i * np + j);
      cut.phi_deg.push_back(phi[j]);
    }
    return cut;
  }
  const auto j0 = FindSample(phi, spec.value_deg, true);
  if (!j0) NotOnGrid("phi", spec.value_deg, phi);
  const auto j1 = FindSample(phi, spec.value_deg + 180.0, true);
  // The far half first (theta descending as -theta ascends), then this half.
  if (j1) {
    for (std::size_t i = theta.size(); i-- > 0;) {
      if (theta[i] <= 0) continue;  // theta = 0 is the same direction on both halves
      if (BelowGround(r.array.ground, theta[i] * kDegree)) continue;
      cut.angle_deg.push_back(-theta[i]);
      cut.grid_index.push_back(i * np + *j1);
      cut.phi_deg.push_back(phi[*j1]);
    }
  }
  for (std::size_t i = 0; i < theta.size(); ++i) {
    if (BelowGround(r.array.ground, theta[i] * kDegree)) continue;
    cut.angle_deg.push_back(theta[i]);
    cut.grid_index.push_back(i * np + *j0);
    cut.phi_deg.push_back(phi[*j0]);
  }
  return cut;
}

std::vector<double> CutValues(const StoredResult& r, const Cut& cut, Quantity q,
                              PolarizationReference ref) {
  if (!cut.samples.empty()) {
    std::vector<double> v(cut.samples.size());
    for (std::size_t k = 0; k < v.size(); ++k) {
      const Cut::Sample& s = cut.samples[k];
      v[k] = QuantityOf(s.directivity, s.e_theta, s.e_phi, cut.phi_deg[k] * kDegree, q, ref,
                        r.result.field_floor_v);
    }
    return v;
  }
  std::vector<double> v(cut.grid_index.size());
  for (std::size_t k = 0; k < v.size(); ++k) v[k] = QuantityAt(r, cut.grid_index[k], q, ref);
  return v;
}

}  // namespace lobecast::plot
