#include "io/text/report_text.h"

#include <cmath>
#include <cstdio>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "engine/constants.h"
#include "engine/decibels.h"
#include "engine/polarization.h"
#include "io/hdf5/schema.h"
#include "io/safety_note.h"
#include "io/text/json_writer.h"
#include "io/text/number_text.h"
#include "io/text/summary_text.h"
#include "io/text/sweep_text.h"
#include "io/text/text_format.h"

namespace lobecast::text {
namespace {

// dB with two decimals; "inf", "-inf"; "n/a" for NaN.
std::string Db(double db) {
  if (std::isnan(db)) return "n/a";
  if (std::isinf(db)) return db > 0 ? "inf" : "-inf";
  return Fixed2(db);
}

// NaN is an undefined angle (a phi on the z axis, the tilt of a circular field).
std::string Angle(double deg) { return std::isfinite(deg) ? Printf("%.4f", deg) : "undefined"; }

std::string Direction(const DirectionDeg& d) {
  if (std::isnan(d.phi_deg)) return "theta " + Angle(d.theta_deg) + " deg (z axis, phi undefined)";
  return "theta " + Angle(d.theta_deg) + " deg, phi " + Angle(d.phi_deg) + " deg";
}

// A level with what an infinity means: a zero field is below the numerical floor.
std::string DbBelowRounding(double db, const char* unit, const char* what) {
  if (std::isinf(db)) return Db(db) + " " + unit + " (" + what + " below rounding)";
  return Db(db) + " " + unit;
}

std::string HalfPower(const BeamCut& c) {
  if (!c.half_power_found) return "none (the plane never falls to half power)";
  return Angle(c.half_power_width_deg) + " deg  (offsets " + Angle(c.half_power_lower_deg) +
         " .. " + Angle(c.half_power_upper_deg) + " deg)";
}

std::string FirstNull(const BeamCut& c) {
  if (!c.first_nulls_found) {
    return c.clipped_by_ground ? "none (the beam reaches the ground plane)" : "none found";
  }
  return Angle(c.first_null_width_deg) + " deg  (offsets " + Angle(c.first_null_lower_deg) +
         " .. " + Angle(c.first_null_upper_deg) + " deg)" +
         (c.clipped_by_ground ? ", clipped by the ground plane" : "");
}

constexpr double kSphereSr = 4.0 * kPi;

// "elevation plane", "orthogonal plane", "E-plane", "H-plane", "xz plane", "yz plane":
// which plane a cut runs in (analysis_types.h).
std::string PlaneName(const BeamCut& c) {
  switch (c.plane) {
    case CutPlane::kElevation:
      return "elevation plane";
    case CutPlane::kOrthogonal:
      return "orthogonal plane";
    case CutPlane::kE:
      return "E-plane";
    case CutPlane::kH:
      return "H-plane";
    case CutPlane::kXZ:
      return "xz plane";
    case CutPlane::kYZ:
      return "yz plane";
  }
  return "?";
}

// "E-plane, phi 0.0000 deg": the plane and, when it contains the z axis, its phi.
std::string PlaneWithPhi(const BeamCut& c) {
  return std::isnan(c.plane_phi_deg) ? PlaneName(c)
                                     : PlaneName(c) + ", phi " + Angle(c.plane_phi_deg) + " deg";
}

// The F/B value and its direction, or why it is undefined.
std::string FrontToBackText(double ratio_db, const DirectionDeg& d) {
  if (std::isnan(ratio_db)) return "undefined (peak on the z axis: no direction behind it)";
  return DbBelowRounding(ratio_db, "dB", "back field zero or") + " toward " + Direction(d);
}

void Row(std::ostringstream& s, const std::string& label, const std::string& value) {
  s << Printf("  %-30s ", label.c_str()) << value << "\n";
}

// A null's depth: "exact" for a zero (its depth is rounding, not physics), else dB.
std::string Depth(bool exact, double level_db) { return exact ? "exact" : Db(level_db) + " dB"; }

// "12.5 .. 80.25" for a locus' theta or phi extent (phi min > max: through phi = 0).
std::string Range(double lo, double hi) { return Angle(lo) + " .. " + Angle(hi); }

}  // namespace

std::string NullLociText(const PatternAnalysis& a, const AnalysisOptions& o) {
  std::ostringstream s;
  s << "\nNull loci (" << ToString(o.null_field) << " field below " << Db(o.null_threshold_db)
    << " dB re peak; exact = a zero, the field below rounding)\n";
  s << "  " << a.null_loci.size() << (a.null_loci.size() == 1 ? " locus" : " loci")
    << (a.null_loci_truncated ? ", list truncated (--max-nulls)" : "") << "\n";
  for (std::size_t i = 0; i < a.null_loci.size(); ++i) {
    const NullLocus& n = a.null_loci[i];
    if (n.cone) {
      s << Printf("  %5zu  cone about (theta %s, phi %s) deg, half-angle %s deg, %s\n", i,
                  Angle(n.axis.theta_deg).c_str(), Angle(n.axis.phi_deg).c_str(),
                  Printf("%.6f", n.half_angle_deg).c_str(), Depth(n.exact, n.level_db).c_str());
    } else if (n.point) {
      s << Printf("  %5zu  point at %s, %s\n", i, Direction(n.direction).c_str(),
                  Depth(n.exact, n.level_db).c_str());
    } else {
      s << Printf("  %5zu  curve, deepest at %s, %s\n", i, Direction(n.direction).c_str(),
                  Depth(n.exact, n.level_db).c_str());
    }
    if (!n.point) {
      s << Printf("         theta %s deg, phi %s deg%s\n",
                  Range(n.theta_min_deg, n.theta_max_deg).c_str(),
                  Range(n.phi_min_deg, n.phi_max_deg).c_str(),
                  n.phi_min_deg > n.phi_max_deg ? " (through phi = 0)" : "");
    }
  }
  if (!a.null_crossings.empty()) {
    s << "  where they cross the principal planes (offset from the peak):\n";
    s << "      plane          offset (deg)   theta (deg)     phi (deg)         depth  locus\n";
    for (const NullCrossing& c : a.null_crossings) {
      s << Printf("      %-11s  %12s  %12s  %12s  %12s  %5s\n",
                  c.orthogonal_plane ? "orthogonal" : "elevation",
                  Printf("%.6f", c.offset_deg).c_str(), Angle(c.direction.theta_deg).c_str(),
                  Angle(c.direction.phi_deg).c_str(), Depth(c.exact, c.level_db).c_str(),
                  c.locus >= 0 ? Printf("%.0f", c.locus).c_str() : "-");
    }
  }
  return s.str();
}

namespace {

// The schema's visitor that writes the report's JSON: objects for groups and
// directions, arrays of objects for lists, null for a missing optional.
class JsonVisitor {
 public:
  explicit JsonVisitor(JsonWriter& j) : j_(j) {}

  void Value(const schema::Field& f, double v) {
    if (f.extra == schema::Extra::kFileOnly) return;
    // The safety note has always come just before the analysis' seconds.
    if (depth_ == 0 && f.name == schema::kSecondsKey) j_.Member("safety_note", kSafetyNote);
    j_.Member(f.name, f.unit == "deg" ? ReportedAngleDeg(v) : v);
  }
  void Value(const schema::Field& f, bool v) { j_.MemberBool(f.name, v); }
  void Value(const schema::Field& f, int v) { j_.MemberInt(f.name, v); }
  void Value(const schema::Field& f, std::size_t v) {
    j_.MemberInt(f.name, static_cast<long long>(v));
  }
  void Value(const schema::Field& f, const DirectionDeg& d) {
    j_.Key(schema::DirectionKey(f.name));
    j_.BeginObject();
    j_.Member(schema::kThetaKey, ReportedAngleDeg(d.theta_deg));
    j_.Member(schema::kPhiKey, ReportedAngleDeg(d.phi_deg));
    j_.EndObject();
  }
  void Value(const schema::Field& f, PolarizationReference v) { j_.Member(f.name, ToString(v)); }
  void Value(const schema::Field& f, NullField v) { j_.Member(f.name, ToString(v)); }
  void Value(const schema::Field& f, CutPlane v) { j_.Member(f.name, ToString(v)); }

  template <typename Body>
  void Object(const schema::ObjectSpec& o, Body&& body) {
    j_.Key(o.json_name);
    Nested([&] { body(); });
  }
  template <typename T, typename Body>
  void Optional(const schema::ObjectSpec& o, const std::optional<T>& v, Body&& body) {
    j_.Key(o.json_name);
    if (!v) return j_.Null();
    Nested([&] { body(*v, *this); });
  }
  template <typename T, typename Body>
  void List(const schema::ListSpec& l, const std::vector<T>& items, const bool* truncated,
            Body&& body) {
    j_.Key(l.name);
    j_.BeginArray();
    for (const T& e : items) Nested([&] { body(e, *this); });
    j_.EndArray();
    if (truncated) j_.MemberBool(l.truncated, *truncated);
  }

 private:
  template <typename Body>
  void Nested(Body&& body) {
    j_.BeginObject();
    ++depth_;
    body();
    --depth_;
    j_.EndObject();
  }

  JsonWriter& j_;
  int depth_ = 0;  // objects opened by the walk
};

}  // namespace

std::string AnalysisBrief(const PatternAnalysis& a) {
  std::ostringstream s;
  auto width = [](const BeamCut& c) {
    return c.half_power_found ? Angle(c.half_power_width_deg) + " deg" : std::string("none");
  };
  s << "beam         D = " << Db(a.peak.directivity_dbi) << " dBi at "
    << Direction(a.peak.direction) << " (refined); HPBW " << width(a.elevation_cut) << " ("
    << PlaneWithPhi(a.elevation_cut) << "), " << width(a.orthogonal_cut) << " ("
    << PlaneWithPhi(a.orthogonal_cut) << ")\n";
  if (a.highest_side_lobe) {
    s << "side lobe    highest " << Db(a.highest_side_lobe->level_db) << " dB re peak at "
      << Direction(a.highest_side_lobe->direction) << "\n";
  } else {
    s << "side lobe    none\n";
  }
  const PolarizationPurity& p = a.polarization;
  s << "purity       XPD at peak " << Db(p.xpd_at_peak_db) << " dB (reference "
    << ReferenceName(p.reference) << "), axial ratio " << Db(p.axial_ratio_at_peak_db) << " dB\n";
  return s.str();
}

std::string ReportText(const ReportContext& c, const PatternAnalysis& a, const AnalysisOptions& o) {
  std::ostringstream s;
  s << "lobecast report: " << c.result_path << "\n";
  s << "array   " << (c.array_name.empty() ? "(unnamed)" : "\"" + c.array_name + "\"") << ", "
    << c.num_dipoles << " dipole" << (c.num_dipoles == 1 ? "" : "s") << ", "
    << FormatFrequency(c.frequency_hz) << ", ground " << ToString(c.ground) << "\n";
  s << "source  "
    << (c.recomputed ? "recomputed now from the stored array and field"
                     : "stored by compute in /summary/analysis")
    << Printf("; %zu exact field evaluations, %.3f s\n", a.field_evaluations, a.seconds);
  s << "\nAngles in deg; levels in dB relative to the peak directivity unless marked dBi.\n";
  if (a.elevation_cut.plane == CutPlane::kElevation) {
    s << "Elevation plane: the great circle through the peak and the z axis (constant phi).\n"
         "Orthogonal plane: the great circle through the peak perpendicular to it.\n"
         "Offsets: signed angles from the peak along a plane, + toward theta_hat (elevation)\n"
         "or phi_hat (orthogonal).";
  } else {
    s << (a.elevation_cut.plane == CutPlane::kE
              ? "Peak on the z axis (its phi is arbitrary): the planes are the E-plane (through\n"
                "the major axis of the field at the peak) and the H-plane perpendicular to it.\n"
              : "Peak on the z axis (its phi is arbitrary) with a near-circular field (axial\n"
                "ratio below " +
                    Db(kEPlaneMinAxialRatioDb) +
                    " dB): the planes are xz (phi 0) and yz (phi 90).\n")
      << "Offsets: signed angles from the peak along a plane, + toward the plane's phi.";
  }
  s << (a.elevation_cut.plane == CutPlane::kElevation ? " " : "\n")
    << "HPBW between the half-power points, FNBW between the first\nminima beyond them; "
    << (c.ground == Ground::kPec
            ? "F/B = peak over the direction behind it at the same theta\n(phi + 180): the "
              "opposite direction is below the ground plane, where there is no field.\n"
            : "F/B = peak over the exactly opposite direction.\n");
  s << "On the z axis phi is undefined. A field below the numerical floor is rounding, an\n"
       "exact zero: -inf dB, and a ratio against it +-inf.\n";
  s << Printf("floor   %.3g V: 1e-13 of (w mu0 / 4 pi) sum |I Le| over the sources\n",
              c.field_floor_v);
  const std::string digits = PowerDigitsNote(c.power_significant_digits);
  if (!digits.empty()) s << "caution " << digits << "\n";

  s << "\nMain beam\n";
  Row(s, "peak directivity (dBi)",
      Db(a.peak.directivity_dbi) + Printf(" dBi (%.6g)", a.peak.directivity) + " at " +
          Direction(a.peak.direction) + (a.peak.refined ? "" : " (search did not converge)"));
  Row(s, "grid maximum (dBi)",
      Db(ToDb(a.peak.grid_directivity)) + " dBi at " + Direction(a.peak.grid_direction));
  for (const BeamCut* cut : {&a.elevation_cut, &a.orthogonal_cut})
    Row(s, "HPBW " + PlaneName(*cut) + " (deg)", HalfPower(*cut));
  for (const BeamCut* cut : {&a.elevation_cut, &a.orthogonal_cut})
    Row(s, "FNBW " + PlaneName(*cut) + " (deg)", FirstNull(*cut));
  for (const BeamCut* cut : {&a.elevation_cut, &a.orthogonal_cut}) {
    if (!std::isnan(cut->plane_phi_deg))
      Row(s, PlaneName(*cut) + " (deg)", "phi " + Angle(cut->plane_phi_deg) + " deg");
  }
  Row(s, "front-to-back (dB)",
      FrontToBackText(a.front_to_back.ratio_db, a.front_to_back.back_direction));
  // Over ground F/B is already taken behind the peak at the same theta.
  if (c.ground != Ground::kPec) {
    Row(s, "F/B at the same theta (dB)",
        FrontToBackText(a.front_to_back.same_elevation_ratio_db,
                        a.front_to_back.same_elevation_back_direction));
  }
  for (const Lobe& l : a.major_lobes) {
    Row(s, "another major lobe (dB)",
        Db(l.level_db) + " dB (" + Db(l.directivity_dbi) + " dBi) at " + Direction(l.direction));
  }

  s << "\nSide lobes\n";
  if (a.highest_side_lobe) {
    const Lobe& l = *a.highest_side_lobe;
    Row(s, "highest side lobe (dB re peak)",
        Db(l.level_db) + " dB (" + Db(l.directivity_dbi) + " dBi) at " + Direction(l.direction));
  } else {
    Row(s, "highest side lobe (dB re peak)", "none");
  }
  s << "  " << a.side_lobes.size() << " side lobe" << (a.side_lobes.size() == 1 ? "" : "s")
    << " at or above " << Db(o.side_lobe_threshold_db) << " dB"
    << (a.side_lobes_truncated ? " (list truncated)" : "") << "\n";
  if (!a.side_lobes.empty()) {
    s << "      #   theta (deg)     phi (deg)   level (dB)      D (dBi)\n";
    for (std::size_t i = 0; i < a.side_lobes.size(); ++i) {
      const Lobe& l = a.side_lobes[i];
      s << Printf("  %5zu  %12s  %12s  %11s  %11s\n", i, Angle(l.direction.theta_deg).c_str(),
                  Angle(l.direction.phi_deg).c_str(), Db(l.level_db).c_str(),
                  Db(l.directivity_dbi).c_str());
    }
  }

  s << NullLociText(a, o);

  if (!a.protected_directions.empty()) {
    s << "\nProtected directions (exact field; co/cross for reference "
      << ReferenceName(o.reference) << ")\n";
    s << "      #   theta (deg)     phi (deg)      D (dBi)   level (dB)     co (dBi)  cross "
         "(dBi)   (-inf: below rounding)\n";
    for (std::size_t i = 0; i < a.protected_directions.size(); ++i) {
      const ProtectedDirectionField& f = a.protected_directions[i];
      s << Printf("  %5zu  %12s  %12s  %11s  %11s  %11s  %11s%s\n", i,
                  Angle(f.direction.theta_deg).c_str(), Angle(f.direction.phi_deg).c_str(),
                  Db(f.directivity_dbi).c_str(), Db(f.level_db).c_str(), Db(f.co_polar_dbi).c_str(),
                  Db(f.cross_polar_dbi).c_str(), f.no_field ? "  below the ground plane" : "");
    }
  }

  const PolarizationPurity& p = a.polarization;
  s << "\nPolarization (reference " << ReferenceName(p.reference) << ")\n";
  Row(s, "co-polar at peak (dBi)", DbBelowRounding(p.co_polar_dbi_at_peak, "dBi", "co-polar"));
  Row(s, "cross-polar at peak (dBi)",
      DbBelowRounding(p.cross_polar_dbi_at_peak, "dBi", "cross-polar"));
  Row(s, "XPD at peak (dB)",
      DbBelowRounding(p.xpd_at_peak_db, "dB", p.xpd_at_peak_db > 0 ? "cross-polar" : "co-polar"));
  Row(s, "worst XPD in -3 dB beam (dB)",
      DbBelowRounding(p.worst_xpd_in_beam_db, "dB",
                      p.worst_xpd_in_beam_db > 0 ? "cross-polar" : "co-polar") +
          " at " + Direction(p.worst_xpd_direction));
  Row(s, "axial ratio at peak (dB)",
      Db(p.axial_ratio_at_peak_db) + " dB, " + SenseName(p.sense_at_peak) + ", tilt " +
          (std::isnan(p.tilt_at_peak_deg) ? std::string("undefined (circular)")
                                          : Angle(p.tilt_at_peak_deg) + " deg"));
  const std::string ar_label = "solid angle AR <= " + Db(p.axial_ratio_limit_db) + " dB (sr)";
  Row(s, ar_label.c_str(),
      Printf("%.6g sr (%.3g %% of the sphere)", p.axial_ratio_solid_angle_sr,
             100.0 * p.axial_ratio_solid_angle_sr / kSphereSr));
  return s.str();
}

namespace {

// Complex values as {"re": ..., "im": ...}.
void ComplexMember(JsonWriter& j, std::string_view key, Complex z) {
  j.Key(key);
  j.BeginObject();
  j.Member("re", z.real());
  j.Member("im", z.imag());
  j.EndObject();
}

// The circuit under the names of the file's /coupling group (io/hdf5/schema.h).
void WriteCouplingJson(JsonWriter& j, const CouplingResult& c, const std::vector<Port>& ports) {
  namespace s = schema;
  j.Key(s::kCouplingGroup.substr(1));
  j.BeginObject();
  s::VisitCouplingTotals(c, [&](std::string_view name, double value) { j.Member(name, value); });
  j.Key("elements");
  j.BeginArray();
  for (std::size_t m = 0; m < ports.size(); ++m) {
    const auto e = static_cast<Eigen::Index>(m);
    j.BeginObject();
    j.Member(s::kPortKind.name(), ToString(ports[m].kind));
    ComplexMember(j, s::kCurrent.name(), c.circuit.current_a[e]);
    ComplexMember(j, s::kInputImpedance.name(), c.circuit.input_impedance_ohm[e]);
    ComplexMember(j, s::kActiveImpedance.name(), c.active_impedance_ohm[e]);
    j.Member(s::kSelfReactance.name(), c.self_reactance_ohm[e]);
    j.Member(s::kLossResistance.name(), c.loss_resistance_ohm[e]);
    ComplexMember(j, s::kReflection.name(), c.reflection[e]);
    j.Member(s::kVswr.name(), c.vswr[e]);
    j.Member(s::kElementAccepted.name(), c.circuit.accepted_w[e]);
    j.Member(s::kElementSupplied.name(), c.circuit.supplied_w[e]);
    j.EndObject();
  }
  j.EndArray();
  j.EndObject();
}

}  // namespace

std::string ReportJson(const ReportContext& c, const PatternAnalysis& a, const AnalysisOptions& o) {
  JsonWriter j;
  j.BeginObject();
  j.Member("format", "lobecast.report");
  j.MemberInt("format_version", 1);
  j.Member("result_path", c.result_path);
  j.Member("array_name", c.array_name);
  j.Member("frequency_hz", c.frequency_hz);
  j.Member("ground", ToString(c.ground));
  j.MemberInt("num_dipoles", static_cast<long long>(c.num_dipoles));
  j.Member("source", c.recomputed ? "recomputed" : "stored");
  j.Member("field_floor_v", c.field_floor_v);
  j.Member("power_significant_digits", c.power_significant_digits);
  j.Member("power_caution", PowerDigitsNote(c.power_significant_digits));
  j.Member("null_means",
           "an undefined value (NaN); infinities are the strings \"inf\" and \"-inf\"");
  JsonVisitor v(j);
  v.Object(schema::kRecordedOptions, [&] { schema::VisitRecordedOptions(o, v); });
  schema::VisitAnalysis(a, v);
  if (c.coupling && c.ports) WriteCouplingJson(j, *c.coupling, *c.ports);
  if (c.sweep) WriteSweepJson(j, *c.sweep);
  j.EndObject();
  return j.text();
}

}  // namespace lobecast::text
