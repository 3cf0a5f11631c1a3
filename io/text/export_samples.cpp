#include "io/text/export_samples.h"

#include <cmath>
#include <cstdio>

#include "engine/analysis/pattern_probe.h"
#include "engine/check.h"
#include "engine/constants.h"
#include "engine/error.h"
#include "engine/field/far_field.h"
#include "engine/grid.h"
#include "engine/intensity.h"
#include "engine/polarization.h"
#include "engine/rounding_floor.h"
#include "io/text/number_text.h"

namespace lobecast {
namespace {

constexpr double kSameAngleDeg = 1e-9;

std::string_view Trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// A whole, finite decimal number (locale-independent), blanks around it allowed.
std::optional<double> ParseNumber(std::string_view s) { return ParseFiniteNumber(Trim(s)); }

std::string Format(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

bool Fail(std::string* why, const std::string& message) {
  if (why) *why = message;
  return false;
}

bool CheckTheta(double theta_deg, std::string_view what, std::string* why) {
  if (theta_deg >= 0.0 && theta_deg <= 180.0) return true;
  return Fail(why, std::string(what) + " " + Format(theta_deg) +
                       " deg is outside 0..180 deg (theta is measured from +z)");
}

// Index of a stored angle equal to `deg` (or to deg mod 360 for phi), if any.
std::optional<std::size_t> FindAngle(const std::vector<double>& stored, double deg, bool periodic) {
  for (std::size_t i = 0; i < stored.size(); ++i) {
    if (std::abs(stored[i] - deg) <= kSameAngleDeg) return i;
  }
  if (periodic) {
    const double wrapped = deg - 360.0 * std::floor(deg / 360.0);
    for (std::size_t i = 0; i < stored.size(); ++i) {
      const double s = stored[i] - 360.0 * std::floor(stored[i] / 360.0);
      if (std::abs(s - wrapped) <= kSameAngleDeg) return i;
    }
  }
  return std::nullopt;
}

ExportSample GridSample(const StoredResult& stored, std::size_t it, std::size_t ip) {
  const PatternResult& r = stored.result;
  const std::size_t k = it * r.grid.phi_deg.size() + ip;
  const auto e = static_cast<Eigen::Index>(k);
  ExportSample s;
  s.theta_deg = r.grid.theta_deg[it];
  s.phi_deg = r.grid.phi_deg[ip];
  s.e_theta = r.field.e_theta[e];
  s.e_phi = r.field.e_phi[e];
  s.directivity = r.directivity[e];
  s.axial_ratio_db = r.axial_ratio_db[e];
  s.tilt_deg = r.tilt_deg[e];
  s.sense = r.sense[k];
  return s;
}

// Appends the half plane phi = phi_deg at the given thetas (stored ones), with
// cut_angle_deg = sign * theta: from the grid when phi_deg is a stored phi, else exact.
void HalfPlane(const StoredResult& stored, double phi_deg, const std::vector<double>& thetas,
               double sign, std::vector<ExportSample>& out) {
  const AngularGrid& g = stored.result.grid;
  std::vector<ExportSample> half;
  if (const auto ip = FindAngle(g.phi_deg, phi_deg, true)) {
    for (double t : thetas) {
      const auto it = FindAngle(g.theta_deg, t, false);
      LOBECAST_CHECK(it.has_value());  // the thetas are stored ones
      half.push_back(GridSample(stored, *it, *ip));
    }
  } else {
    std::vector<std::pair<double, double>> dirs;
    for (double t : thetas) dirs.emplace_back(t, phi_deg - 360.0 * std::floor(phi_deg / 360.0));
    half = ExactSamples(stored, dirs);
  }
  for (ExportSample& s : half) {
    s.cut_angle_deg = sign * s.theta_deg;
    out.push_back(s);
  }
}

}  // namespace

std::optional<CutSpec> ParseCutSpec(std::string_view text, std::string* why) {
  const std::string_view t = Trim(text);
  const std::string expected =
      "expected phi=DEG, theta=DEG or great-circle:THETA,PHI,HEADING (degrees)";
  CutSpec c;
  auto single = [&](std::string_view prefix, CutSpec::Kind kind) -> std::optional<CutSpec> {
    const auto v = ParseNumber(t.substr(prefix.size()));
    if (!v) {
      Fail(why, "cut '" + std::string(text) + "': not a number after '" + std::string(prefix) +
                    "'; " + expected);
      return std::nullopt;
    }
    c.kind = kind;
    c.value_deg = *v;
    if (kind == CutSpec::Kind::kTheta && !CheckTheta(*v, "cut theta", why)) return std::nullopt;
    return c;
  };
  if (t.starts_with("phi=")) return single("phi=", CutSpec::Kind::kPhi);
  if (t.starts_with("theta=")) return single("theta=", CutSpec::Kind::kTheta);
  constexpr std::string_view kGc = "great-circle:";
  if (t.starts_with(kGc)) {
    std::string_view rest = t.substr(kGc.size());
    double v[3];
    for (int k = 0; k < 3; ++k) {
      const std::size_t comma = k < 2 ? rest.find(',') : rest.size();
      const auto x =
          comma == std::string_view::npos ? std::nullopt : ParseNumber(rest.substr(0, comma));
      if (!x || (k == 2 && rest.find(',') != std::string_view::npos)) {
        Fail(why, "cut '" + std::string(text) + "': " + expected);
        return std::nullopt;
      }
      v[k] = *x;
      rest = comma < rest.size() ? rest.substr(comma + 1) : std::string_view();
    }
    if (!CheckTheta(v[0], "great-circle theta", why)) return std::nullopt;
    c.kind = CutSpec::Kind::kGreatCircle;
    c.through_theta_deg = v[0];
    c.through_phi_deg = v[1];
    c.heading_deg = v[2];
    return c;
  }
  Fail(why, "cut '" + std::string(text) + "': " + expected);
  return std::nullopt;
}

std::string DescribeCut(const CutSpec& c) {
  switch (c.kind) {
    case CutSpec::Kind::kPhi:
      return "phi = " + Format(c.value_deg) + " deg";
    case CutSpec::Kind::kTheta:
      return "theta = " + Format(c.value_deg) + " deg";
    case CutSpec::Kind::kGreatCircle:
      break;
  }
  return "great circle through theta " + Format(c.through_theta_deg) + " deg, phi " +
         Format(c.through_phi_deg) + " deg, heading " + Format(c.heading_deg) +
         " deg from theta_hat toward phi_hat";
}

std::vector<ExportSample> GridSamples(const StoredResult& stored) {
  const AngularGrid& g = stored.result.grid;
  std::vector<ExportSample> out;
  out.reserve(g.size());
  for (std::size_t it = 0; it < g.theta_deg.size(); ++it) {
    for (std::size_t ip = 0; ip < g.phi_deg.size(); ++ip) out.push_back(GridSample(stored, it, ip));
  }
  return out;
}

std::vector<ExportSample> ExactSamples(const StoredResult& stored,
                                       const std::vector<std::pair<double, double>>& dirs) {
  std::vector<double> theta(dirs.size()), phi(dirs.size());
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    std::string why;
    if (!std::isfinite(dirs[i].second)) {
      throw InvalidArgument("direction phi " + Format(dirs[i].second) + " is not finite");
    }
    if (!CheckTheta(dirs[i].first, "direction theta", &why)) throw InvalidArgument(why);
    theta[i] = dirs[i].first * kDegree;
    phi[i] = dirs[i].second * kDegree;
  }
  std::vector<ExportSample> out(dirs.size());
  if (dirs.empty()) return out;
  FieldOptions fo;
  fo.method = FieldMethod::kDirect;  // exact to rounding, whatever the array size
  const FieldPlan plan(stored.array, Directions::FromAngles(theta, phi), fo);
  const FarField f = plan.Execute(stored.currents);
  const double to_d = DirectivityPerIntensity(stored.result.radiated_power_w);
  for (std::size_t i = 0; i < dirs.size(); ++i) {
    const auto e = static_cast<Eigen::Index>(i);
    ExportSample& s = out[i];
    s.theta_deg = dirs[i].first;
    s.phi_deg = dirs[i].second;
    // Floored as the stored grid is (DeriveFromField, engine/pattern.h).
    const double floor_v = stored.result.field_floor_v;
    s.e_theta = Floored(f.e_theta[e], floor_v);
    s.e_phi = Floored(f.e_phi[e], floor_v);
    s.directivity = to_d * RadiationIntensity(s.e_theta, s.e_phi);
    const Polarization p = PolarizationOf(s.e_theta, s.e_phi, floor_v);
    s.axial_ratio_db = p.axial_ratio_db;
    s.tilt_deg = p.tilt_deg;
    s.sense = p.sense;
    s.exact = true;
  }
  return out;
}

std::vector<ExportSample> CutSamples(const StoredResult& stored, const CutSpec& cut,
                                     double step_deg) {
  const AngularGrid& g = stored.result.grid;
  std::vector<ExportSample> out;
  std::vector<std::pair<double, double>> dirs;
  switch (cut.kind) {
    case CutSpec::Kind::kPhi: {
      // The phi = P + 180 half first, at signed angle -theta (theta descending, poles
      // left to the phi = P half), then the phi = P half at +theta.
      const double back = cut.value_deg + 180.0;
      std::vector<double> thetas;
      for (auto t = g.theta_deg.rbegin(); t != g.theta_deg.rend(); ++t) {
        if (*t > kSameAngleDeg && *t < 180.0 - kSameAngleDeg) thetas.push_back(*t);
      }
      HalfPlane(stored, back, thetas, -1.0, out);
      HalfPlane(stored, cut.value_deg, g.theta_deg, 1.0, out);
      return out;
    }
    case CutSpec::Kind::kTheta:
      if (const auto it = FindAngle(g.theta_deg, cut.value_deg, false)) {
        for (std::size_t ip = 0; ip < g.phi_deg.size(); ++ip) {
          out.push_back(GridSample(stored, *it, ip));
        }
        return out;
      }
      for (double p : g.phi_deg) dirs.emplace_back(cut.value_deg, p);
      return ExactSamples(stored, dirs);
    case CutSpec::Kind::kGreatCircle:
      break;
  }
  if (!(step_deg > 0.0 && step_deg <= 90.0)) {
    throw InvalidArgument("great-circle step " + Format(step_deg) +
                          " deg: expected 0 < step <= 90 deg");
  }
  const double t0 = cut.through_theta_deg * kDegree, p0 = cut.through_phi_deg * kDegree;
  const double h = cut.heading_deg * kDegree;
  const Vec3 r0 = UnitVectorAt(t0, p0);
  const Vec3 tangent = std::cos(h) * ThetaHatAt(t0, p0) + std::sin(h) * PhiHatAt(p0);
  const auto n = static_cast<std::size_t>(std::ceil(360.0 / step_deg - 1e-9));
  std::vector<double> angle_deg;
  for (std::size_t k = 0; k < n; ++k) {
    const double s_deg = -180.0 + static_cast<double>(k) * step_deg;
    const double s = s_deg * kDegree;
    const Vec3 r = GreatCirclePoint(r0, tangent, s);
    const double rho = std::hypot(r.x(), r.y());
    double phi = std::atan2(r.y(), r.x());
    if (rho < 1e-12) {
      // On a pole phi is free: take the half plane the circle goes on into, so the
      // pole's theta and phi components match those of the next samples.
      const Vec3 along = GreatCirclePoint(tangent, -r0, s);
      phi = std::atan2(along.y(), along.x());
    }
    double phi_deg = phi / kDegree;
    if (phi_deg < 0) phi_deg += 360.0;
    if (phi_deg >= 360.0) phi_deg -= 360.0;
    dirs.emplace_back(std::atan2(rho, r.z()) / kDegree, phi_deg);
    angle_deg.push_back(s_deg);
  }
  out = ExactSamples(stored, dirs);
  for (std::size_t k = 0; k < out.size(); ++k) out[k].cut_angle_deg = angle_deg[k];
  return out;
}

}  // namespace lobecast
