// The one schema of lobecast's files: every dataset path, attribute name, unit and
// table column of a result file (schema version 1, CONVENTIONS §3), of its
// /summary and of the pattern analysis under /summary/analysis, and the JSON keys
// of the report's analysis. The result writer and reader, the analysis writer and
// reader (io/hdf5/) and the report's JSON (io/text/report_text.cpp) all take their
// names from here; none spells one itself.
//
// The summary and the analysis are walked, not listed: VisitSummary and
// VisitAnalysis go through every field once and hand a visitor its name, unit and
// value. The HDF5 writer, the HDF5 reader and the JSON writer are three visitors of
// the same walk, so a field is stored, read back and reported together or not at
// all, and a table's columns and units are those its rows were built from.
//
// A visitor V of VisitAnalysis / VisitRecordedOptions provides:
//   void Value(const Field& f, T& v)  for T = double, bool, int, std::size_t,
//        DirectionDeg, PolarizationReference, NullField, CutPlane (const T when writing)
//   void Object(const ObjectSpec& o, Body&& body)           body() visits the members
//   void Optional(const ObjectSpec& o, std::optional<T>& v, Body&& body)
//   void List(const ListSpec& l, std::vector<T>& items, bool* truncated, Body&& body)
//        body(element, visitor) walks one element with any visitor (the table's
//        columns come from walking a default element with Columns); truncated is
//        null when the list has no flag.
// A visitor of VisitSummary provides Value for double, int, std::size_t,
// FieldMethod, PowerRoute and std::vector<FastTransform>.
#pragma once

#include <array>
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/pattern.h"

namespace lobecast::schema {

// ---- The result file ------------------------------------------------------------

inline constexpr std::string_view kFormat = "lobecast.pattern";
inline constexpr int kFormatVersion = 1;

// A schema name as the std::string the HDF5 layer takes.
inline std::string S(std::string_view name) { return std::string(name); }

// Root attributes.
inline constexpr std::string_view kFormatAttribute = "format";
inline constexpr std::string_view kFormatVersionAttribute = "format_version";
inline constexpr std::string_view kSoftwareVersionAttribute = "software_version";
inline constexpr std::string_view kTimeConventionAttribute = "time_convention";
inline constexpr std::string_view kTimeConvention = "exp(+jwt)";
inline constexpr std::string_view kSafetyNoteAttribute = "safety_note";
inline constexpr std::string_view kCreatedAttribute = "created";
inline constexpr std::string_view kInputAttribute = "input";
inline constexpr std::string_view kInputPathAttribute = "input_path";

// A dataset: its absolute path and the string of its `units` attribute.
struct Dataset {
  std::string_view path;
  std::string_view units;
  // The last path component (the name inside its group).
  constexpr std::string_view name() const { return path.substr(path.rfind('/') + 1); }
};

inline constexpr std::string_view kArrayGroup = "/array";
inline constexpr std::string_view kFrequencyAttribute = "frequency_hz";
inline constexpr std::string_view kWavelengthAttribute = "wavelength_m";
inline constexpr std::string_view kGroundAttribute = "ground";
inline constexpr std::string_view kNameAttribute = "name";
inline constexpr std::string_view kDescriptionAttribute = "description";
inline constexpr Dataset kPosition{"/array/position", "m"};        // (N, 3)
inline constexpr Dataset kOrientation{"/array/orientation", "1"};  // (N, 3)
inline constexpr Dataset kEffectiveLength{"/array/effective_length", "m"};
inline constexpr Dataset kLength{"/array/length_m", "m"};
inline constexpr Dataset kDistribution{"/array/distribution", "1"};  // strings
inline constexpr Dataset kCurrent{"/array/current", "A"};            // complex

inline constexpr std::string_view kGridGroup = "/grid";
inline constexpr Dataset kTheta{"/grid/theta_deg", "deg"};
inline constexpr Dataset kPhi{"/grid/phi_deg", "deg"};

// (Nt, Np), theta-major, chunked by theta rows.
inline constexpr std::string_view kFieldGroup = "/field";
inline constexpr std::string_view kPatternGroup = "/pattern";
inline constexpr std::string_view kPolarizationGroup = "/polarization";
inline constexpr Dataset kETheta{"/field/rE_theta", "V"};  // complex
inline constexpr Dataset kEPhi{"/field/rE_phi", "V"};      // complex
inline constexpr Dataset kIntensity{"/pattern/intensity", "W/sr"};
inline constexpr Dataset kDirectivity{"/pattern/directivity", "1"};
inline constexpr Dataset kAxialRatio{"/polarization/axial_ratio_db", "dB"};
inline constexpr Dataset kTilt{"/polarization/tilt_deg", "deg"};
inline constexpr Dataset kSense{"/polarization/sense", "1"};  // int8
inline constexpr std::string_view kSenseValuesAttribute = "values";
inline constexpr std::string_view kSenseValues =
    "+1 right-hand, -1 left-hand, 0 linear or no field (IEEE Std 145-2013)";

inline constexpr std::string_view kPowerGroup = "/power";
inline constexpr Dataset kRadiatedPower{"/power/radiated_w", "W"};     // scalar
inline constexpr Dataset kResistance{"/power/resistance_ohm", "ohm"};  // (N, N), optional
inline constexpr Dataset kActiveResistance{"/power/active_resistance_ohm", "ohm"};
inline constexpr std::string_view kResistanceOmittedAttribute = "resistance_ohm_omitted";

// A coupled array (driven or loaded dipoles, wires): io/hdf5/coupling_writer.h.
inline constexpr Dataset kImpedance{"/power/impedance_ohm", "ohm"};               // (N, N) complex
inline constexpr Dataset kActiveImpedance{"/power/active_impedance_ohm", "ohm"};  // complex
inline constexpr Dataset kRealizedGain{"/pattern/realized_gain", "1"};            // (Nt, Np)
inline constexpr Dataset kGain{"/pattern/gain", "1"};                             // (Nt, Np)
inline constexpr std::string_view kGainDefinitionAttribute = "gain_definition";
inline constexpr std::string_view kCouplingGroup = "/coupling";
// The /coupling attributes (and the report JSON's "coupling" members), in file
// order: f(name, value) for each total of a CouplingResult (const or not: the
// writers read the values, the reader fills them).
template <class Coupling, class F>
void VisitCouplingTotals(Coupling& c, F&& f) {
  f(std::string_view("reference_impedance_ohm"), c.reference_impedance_ohm);
  f(std::string_view("supplied_w"), c.supplied_w);
  f(std::string_view("accepted_w"), c.accepted_w);
  f(std::string_view("radiated_w"), c.radiated_w);
  f(std::string_view("ohmic_w"), c.ohmic_w);
  f(std::string_view("load_loss_w"), c.load_loss_w);
  f(std::string_view("source_loss_w"), c.source_loss_w);
  f(std::string_view("available_w"), c.available_w);
  f(std::string_view("efficiency"), c.efficiency);
}
inline constexpr Dataset kPortKind{"/coupling/port_kind", "1"};  // strings
inline constexpr Dataset kSourceVoltage{"/coupling/source_voltage_v", "V"};
inline constexpr Dataset kPortImpedance{"/coupling/port_impedance_ohm", "ohm"};
inline constexpr Dataset kTerminalVoltage{"/coupling/terminal_voltage_v", "V"};
inline constexpr Dataset kInputImpedance{"/coupling/input_impedance_ohm", "ohm"};  // V / I
inline constexpr Dataset kSelfReactance{"/coupling/self_reactance_ohm", "ohm"};
inline constexpr Dataset kLossResistance{"/coupling/loss_resistance_ohm", "ohm"};
inline constexpr Dataset kReflection{"/coupling/reflection", "1"};  // complex
inline constexpr Dataset kVswr{"/coupling/vswr", "1"};
inline constexpr Dataset kElementAccepted{"/coupling/accepted_w", "W"};
inline constexpr Dataset kElementSupplied{"/coupling/supplied_w", "W"};

// ---- /tolerance: a Monte Carlo tolerance study (io/hdf5/tolerance_writer.h) ------
// Per trial (K) and per protected direction (J); per direction of the grid (Nt, Np);
// percentiles (P) first. Attributes of the group: tolerance_writer.h.
inline constexpr std::string_view kToleranceGroup = "/tolerance";
inline constexpr Dataset kTolPercent{"/tolerance/percentile", "%"};                // (P)
inline constexpr Dataset kTolDirectivityMean{"/tolerance/directivity_mean", "1"};  // (Nt, Np)
inline constexpr Dataset kTolDirectivityPercentile{"/tolerance/directivity_percentile",
                                                   "1"};                          // (P, Nt, Np)
inline constexpr Dataset kTolIntensityMean{"/tolerance/intensity_mean", "W/sr"};  // (Nt, Np)
inline constexpr Dataset kTolMainBeam{"/tolerance/main_beam", "1"};  // (Nt, Np) 1 = in it, else 0
inline constexpr Dataset kTolProtectedTheta{"/tolerance/protected_theta_deg", "deg"};  // (J)
inline constexpr Dataset kTolProtectedPhi{"/tolerance/protected_phi_deg", "deg"};      // (J)
inline constexpr Dataset kTolProtectedIntensity{"/tolerance/protected_intensity_w_sr",
                                                "W/sr"};                     // (K, J)
inline constexpr Dataset kTolNullDepth{"/tolerance/null_depth_db", "dB"};    // (K, J)
inline constexpr Dataset kTolPeakTheta{"/tolerance/peak_theta_deg", "deg"};  // (K)
inline constexpr Dataset kTolPeakPhi{"/tolerance/peak_phi_deg", "deg"};      // (K)
inline constexpr Dataset kTolSummary{"/tolerance/summary", "1"};  // (S, 5 + P), units per row
inline constexpr Dataset kTolSummaryRows{"/tolerance/summary_rows", "1"};    // (S) strings
inline constexpr Dataset kTolSummaryUnits{"/tolerance/summary_units", "1"};  // (S) strings
// The per-trial scalars (K each), in table order: f(dataset, what, value of a trial).
// The baseline's value of each is the group attribute baseline_<name>.
template <class Figures, class F>
void VisitTrialScalars(F&& f) {
  f(Dataset{"/tolerance/beam_directivity", "1"}, "beam directivity (linear)",
    [](const Figures& t) { return t.beam_directivity; });
  f(Dataset{"/tolerance/directivity_loss_db", "dB"}, "directivity loss toward the beam",
    [](const Figures& t) { return t.directivity_loss_db; });
  f(Dataset{"/tolerance/peak_sidelobe_db", "dB"}, "peak side lobe re the trial's peak",
    [](const Figures& t) { return t.peak_sidelobe_db; });
  f(Dataset{"/tolerance/pointing_error_deg", "deg"}, "pointing error (refined peak)",
    [](const Figures& t) { return t.pointing_error_deg; });
  f(Dataset{"/tolerance/peak_directivity", "1"}, "peak directivity (linear, refined)",
    [](const Figures& t) { return t.peak_directivity; });
  f(Dataset{"/tolerance/radiated_w", "W"}, "radiated power",
    [](const Figures& t) { return t.radiated_w; });
  f(Dataset{"/tolerance/failed_elements", "1"}, "failed elements",
    [](const Figures& t) { return static_cast<double>(t.failed_elements); });
}

// ---- Fields of the walks ----------------------------------------------------------

enum class Extra {
  kNone,
  kFileOnly,  // stored in the file, not in the report's JSON
};

// One field: its name and unit ("1" when dimensionless). A DirectionDeg field's
// name is a prefix: the file stores <prefix>theta_deg and <prefix>phi_deg, the JSON
// an object <prefix>direction with theta_deg and phi_deg.
struct Field {
  std::string_view name;
  std::string_view unit;
  Extra extra = Extra::kNone;
};

// a + b (written out: GCC 12 warns falsely on operator+ of short strings).
inline std::string Concat(std::string_view a, std::string_view b) {
  std::string out;
  out.reserve(a.size() + b.size());
  out.append(a);
  out.append(b);
  return out;
}
inline std::string ThetaName(std::string_view prefix) { return Concat(prefix, "theta_deg"); }
inline std::string PhiName(std::string_view prefix) { return Concat(prefix, "phi_deg"); }
inline std::string DirectionKey(std::string_view prefix) { return Concat(prefix, "direction"); }
inline constexpr std::string_view kThetaKey = "theta_deg";
inline constexpr std::string_view kPhiKey = "phi_deg";

// ---- /summary: ComputeSummary -----------------------------------------------------

inline constexpr std::string_view kSummaryGroup = "/summary";
// Streaming (compute --stream): a streamed result's /summary says why it was
// streamed ("--stream", or the in-memory estimate above the memory limit) and
// its /summary/analysis what the analysis saw (a 1-in-m sub-grid, refined
// exactly). Absent from in-memory results.
inline constexpr std::string_view kStreamedAttribute = "streamed";
inline constexpr std::string_view kAnalysisGridAttribute = "analysis_grid";

// The timings come last but one group of seconds_* (they differ run to run).
template <typename Summary, typename V>  // Summary: ComputeSummary, const or not
void VisitSummary(Summary& s, V& v) {
  v.Value(Field{"method", "1"}, s.field_method_used);
  v.Value(Field{"method_requested", "1"}, s.field_method_given);
  v.Value(Field{"fast_transform", "1"}, s.fast_transforms_used);
  v.Value(Field{"power_method", "1"}, s.power_route);
  v.Value(Field{"field_error_bound_relative", "1"}, s.field_error_bound_relative);
  v.Value(Field{"threads_used", "1"}, s.threads_used);
  v.Value(Field{"num_dipoles", "1"}, s.num_dipoles);
  v.Value(Field{"num_sources", "1"}, s.num_sources);
  v.Value(Field{"num_directions", "1"}, s.num_directions);
  v.Value(Field{"pairs", "1"}, s.pairs);
  v.Value(Field{"seconds_plan", "s"}, s.seconds_plan);
  v.Value(Field{"seconds_field", "s"}, s.seconds_field);
  v.Value(Field{"seconds_power", "s"}, s.seconds_power);
  v.Value(Field{"seconds_polarization", "s"}, s.seconds_polarization);
  v.Value(Field{"radiated_power_w", "W"}, s.radiated_power_w);
  v.Value(Field{"power_significant_digits", "1"}, s.power_significant_digits);
  v.Value(Field{"peak_directivity", "1"}, s.peak_directivity);
  v.Value(Field{"peak_theta_deg", "deg"}, s.peak_theta_deg);
  v.Value(Field{"peak_phi_deg", "deg"}, s.peak_phi_deg);
}

// Written only when the power took the band-limited quadrature
// (PowerRoute::kQuadrature); read whenever present.
template <typename Summary, typename V>  // Summary: ComputeSummary, const or not
void VisitPowerQuadrature(Summary& s, V& v) {
  v.Value(Field{"power_error_bound_relative", "1"}, s.power_error_bound_relative);
  v.Value(Field{"power_quadrature_degree", "1"}, s.power_quadrature_degree);
  v.Value(Field{"power_quadrature_nodes", "1"}, s.power_quadrature_nodes);
}
// The /power attribute that says why active_resistance_ohm is NaN (quadrature).
inline constexpr std::string_view kActiveResistanceOmittedAttribute =
    "active_resistance_ohm_omitted";

// ---- /summary/analysis: PatternAnalysis ---------------------------------------------

inline constexpr int kAnalysisVersion = 2;  // 2: null loci and crossings, cut tangents
inline constexpr std::string_view kAnalysisGroup = "/summary/analysis";
inline constexpr std::string_view kAnalysisVersionAttribute = "analysis_version";
inline constexpr std::string_view kDefinitionAttribute = "definition";
// The list of a table's column names is the attribute "<layout>_columns" of the
// analysis group; its row count the attribute "num_<name>".
inline std::string ColumnsAttribute(std::string_view layout) { return Concat(layout, "_columns"); }
inline std::string CountAttribute(std::string_view list) { return Concat("num_", list); }
// The JSON report puts the safety note just before this field (kept for its layout).
inline constexpr std::string_view kSecondsKey = "seconds";

// A nested group: its name in the file (empty: its members sit in the parent
// group) and in the JSON; in the file, an optional `definition` attribute.
struct ObjectSpec {
  std::string_view file_name;
  std::string_view json_name;
  std::string_view definition = {};
};

// A list: an (n, columns) table in the file, written only when it has rows, with
// its count attribute; a JSON array of objects. `layout` names the column list
// (lists of the same element share it); `truncated` names the flag that says more
// were found, when the list has one.
struct ListSpec {
  std::string_view name;
  std::string_view layout;
  std::string_view truncated = {};
};

inline constexpr ObjectSpec kRecordedOptions{"", "options"};
inline constexpr ObjectSpec kPeak{"peak", "peak"};
// The names are those of a peak off the z axis; `plane` says which plane each cut is
// (analysis_types.h, PatternAnalysis).
inline constexpr ObjectSpec kElevationCut{
    "elevation_cut", "elevation_plane",
    "first principal plane (attribute plane): for a peak off the z axis the great circle "
    "through the peak and the z axis (constant phi, plane_phi_deg), offsets from the peak "
    "in deg positive toward theta_hat; for a peak on the axis the E-plane (through the "
    "major axis of E at the peak) or, nearer circular, the xz plane, offsets positive "
    "toward phi = plane_phi_deg"};
inline constexpr ObjectSpec kOrthogonalCut{
    "orthogonal_cut", "orthogonal_plane",
    "second principal plane (attribute plane): for a peak off the z axis the great circle "
    "through the peak perpendicular to the elevation plane, offsets from the peak in deg "
    "positive toward phi_hat; for a peak on the axis the H-plane or, nearer circular, the "
    "yz plane, offsets positive toward phi = plane_phi_deg"};
inline constexpr ObjectSpec kFrontToBack{"front_to_back", "front_to_back"};
inline constexpr ObjectSpec kHighestSideLobe{"highest_side_lobe", "highest_side_lobe"};
inline constexpr ObjectSpec kPolarization{"polarization", "polarization"};
inline constexpr ListSpec kMajorLobes{"major_lobes", "lobe"};
inline constexpr ListSpec kSideLobes{"side_lobes", "lobe", "side_lobes_truncated"};
inline constexpr ListSpec kNullLoci{"null_loci", "null_locus", "null_loci_truncated"};
inline constexpr ListSpec kNullCrossings{"null_crossings", "null_crossing"};
inline constexpr ListSpec kProtectedDirections{"protected_directions", "protected"};

// The options a stored analysis records, so that a reader knows what its lists mean.
template <typename Options, typename V>  // Options: AnalysisOptions, const or not
void VisitRecordedOptions(Options& o, V& v) {
  v.Value(Field{"reference", "1"}, o.reference);
  v.Value(Field{"null_field", "1"}, o.null_field);
  v.Value(Field{"null_threshold_db", "dB"}, o.null_threshold_db);
  v.Value(Field{"max_nulls", "1"}, o.max_nulls);
  v.Value(Field{"side_lobe_threshold_db", "dB"}, o.side_lobe_threshold_db);
  v.Value(Field{"major_lobe_tolerance_db", "dB", Extra::kFileOnly}, o.major_lobe_tolerance_db);
  v.Value(Field{"axial_ratio_limit_db", "dB"}, o.axial_ratio_limit_db);
}

// Also the first four fields of a ProtectedDirectionField, which has the same.
template <typename L, typename V>  // L: Lobe, const or not
void VisitLobe(L& l, V& v) {
  v.Value(Field{"", "deg"}, l.direction);
  v.Value(Field{"directivity", "1"}, l.directivity);
  v.Value(Field{"directivity_dbi", "dBi"}, l.directivity_dbi);
  v.Value(Field{"level_db", "dB"}, l.level_db);
}

// The columns a null locus and a null crossing end with: a direction and its depth.
template <typename N, typename V>  // N: NullLocus or NullCrossing, const or not
void VisitNullDepth(N& n, V& v) {
  v.Value(Field{"", "deg"}, n.direction);
  v.Value(Field{"directivity", "1"}, n.directivity);
  v.Value(Field{"level_db", "dB"}, n.level_db);
  v.Value(Field{"exact", "1"}, n.exact);
}

template <typename N, typename V>  // N: NullLocus, const or not
void VisitNullLocus(N& n, V& v) {
  v.Value(Field{"cone", "1"}, n.cone);
  v.Value(Field{"point", "1"}, n.point);
  v.Value(Field{"axis_", "deg"}, n.axis);
  v.Value(Field{"half_angle_deg", "deg"}, n.half_angle_deg);
  v.Value(Field{"theta_min_deg", "deg"}, n.theta_min_deg);
  v.Value(Field{"theta_max_deg", "deg"}, n.theta_max_deg);
  v.Value(Field{"phi_min_deg", "deg"}, n.phi_min_deg);
  v.Value(Field{"phi_max_deg", "deg"}, n.phi_max_deg);
  VisitNullDepth(n, v);
}

template <typename N, typename V>  // N: NullCrossing, const or not
void VisitNullCrossing(N& n, V& v) {
  v.Value(Field{"locus", "1"}, n.locus);
  v.Value(Field{"orthogonal_plane", "1"}, n.orthogonal_plane);
  v.Value(Field{"offset_deg", "deg"}, n.offset_deg);
  VisitNullDepth(n, v);
}

template <typename P, typename V>  // P: ProtectedDirectionField, const or not
void VisitProtected(P& f, V& v) {
  VisitLobe(f, v);  // direction, directivity, directivity_dbi, level_db
  v.Value(Field{"co_polar_dbi", "dBi"}, f.co_polar_dbi);
  v.Value(Field{"cross_polar_dbi", "dBi"}, f.cross_polar_dbi);
  v.Value(Field{"no_field", "1"}, f.no_field);
}

template <typename C, typename V>  // C: BeamCut, const or not
void VisitCut(C& c, V& v) {
  v.Value(Field{"plane", "1"}, c.plane);
  v.Value(Field{"plane_phi_deg", "deg"}, c.plane_phi_deg);
  v.Value(Field{"half_power_found", "1"}, c.half_power_found);
  v.Value(Field{"half_power_width_deg", "deg"}, c.half_power_width_deg);
  v.Value(Field{"half_power_lower_deg", "deg"}, c.half_power_lower_deg);
  v.Value(Field{"half_power_upper_deg", "deg"}, c.half_power_upper_deg);
  v.Value(Field{"first_nulls_found", "1"}, c.first_nulls_found);
  v.Value(Field{"first_null_width_deg", "deg"}, c.first_null_width_deg);
  v.Value(Field{"first_null_lower_deg", "deg"}, c.first_null_lower_deg);
  v.Value(Field{"first_null_upper_deg", "deg"}, c.first_null_upper_deg);
  v.Value(Field{"clipped_by_ground", "1"}, c.clipped_by_ground);
  v.Value(Field{"tangent_", "deg"}, c.tangent);
}

// Every field of a PatternAnalysis, in its declaration order (the JSON's order).
template <typename A, typename V>  // A: PatternAnalysis, const or not
void VisitAnalysis(A& a, V& v) {
  v.Object(kPeak, [&] {
    v.Value(Field{"", "deg"}, a.peak.direction);
    v.Value(Field{"directivity", "1"}, a.peak.directivity);
    v.Value(Field{"directivity_dbi", "dBi"}, a.peak.directivity_dbi);
    v.Value(Field{"grid_", "deg"}, a.peak.grid_direction);
    v.Value(Field{"grid_directivity", "1"}, a.peak.grid_directivity);
    v.Value(Field{"refined", "1"}, a.peak.refined);
  });
  v.Object(kElevationCut, [&] { VisitCut(a.elevation_cut, v); });
  v.Object(kOrthogonalCut, [&] { VisitCut(a.orthogonal_cut, v); });
  v.Object(kFrontToBack, [&] {
    auto& f = a.front_to_back;
    v.Value(Field{"ratio_db", "dB"}, f.ratio_db);
    v.Value(Field{"back_", "deg"}, f.back_direction);
    v.Value(Field{"same_elevation_ratio_db", "dB"}, f.same_elevation_ratio_db);
    v.Value(Field{"same_elevation_back_", "deg"}, f.same_elevation_back_direction);
  });
  const auto lobe = [](auto& l, auto& visitor) { VisitLobe(l, visitor); };
  v.List(kMajorLobes, a.major_lobes, nullptr, lobe);
  v.Optional(kHighestSideLobe, a.highest_side_lobe, lobe);
  v.List(kSideLobes, a.side_lobes, &a.side_lobes_truncated, lobe);
  v.List(kNullLoci, a.null_loci, &a.null_loci_truncated,
         [](auto& n, auto& visitor) { VisitNullLocus(n, visitor); });
  v.List(kNullCrossings, a.null_crossings, nullptr,
         [](auto& n, auto& visitor) { VisitNullCrossing(n, visitor); });
  v.List(kProtectedDirections, a.protected_directions, nullptr,
         [](auto& f, auto& visitor) { VisitProtected(f, visitor); });
  v.Object(kPolarization, [&] {
    auto& p = a.polarization;
    v.Value(Field{"reference", "1"}, p.reference);
    v.Value(Field{"co_polar_dbi_at_peak", "dBi"}, p.co_polar_dbi_at_peak);
    v.Value(Field{"cross_polar_dbi_at_peak", "dBi"}, p.cross_polar_dbi_at_peak);
    v.Value(Field{"xpd_at_peak_db", "dB"}, p.xpd_at_peak_db);
    v.Value(Field{"worst_xpd_in_beam_db", "dB"}, p.worst_xpd_in_beam_db);
    v.Value(Field{"worst_xpd_", "deg"}, p.worst_xpd_direction);
    v.Value(Field{"axial_ratio_at_peak_db", "dB"}, p.axial_ratio_at_peak_db);
    v.Value(Field{"tilt_at_peak_deg", "deg"}, p.tilt_at_peak_deg);
    v.Value(Field{"sense_at_peak", "1"}, p.sense_at_peak);
    v.Value(Field{"axial_ratio_limit_db", "dB"}, p.axial_ratio_limit_db);
    v.Value(Field{"axial_ratio_solid_angle_sr", "sr"}, p.axial_ratio_solid_angle_sr);
  });
  v.Value(Field{"field_evaluations", "1"}, a.field_evaluations);
  v.Value(Field{kSecondsKey, "s"}, a.seconds);
}

// The column names and units of a list's table: what its element walk visits
// (a direction is two columns), in order. A visitor of element walks only.
struct Columns {
  std::vector<std::string> names;
  std::vector<std::string> units;

  std::size_t size() const { return names.size(); }
  // "theta_deg, phi_deg, directivity" and "deg, deg, 1": the stored attributes.
  static std::string Joined(const std::vector<std::string>& parts) {
    std::string out;
    for (const std::string& p : parts) {
      if (!out.empty()) out += ", ";
      out += p;
    }
    return out;
  }

  void Value(const Field& f, const double&) { Add(std::string(f.name), f.unit); }
  void Value(const Field& f, const bool&) { Add(std::string(f.name), "1"); }
  void Value(const Field& f, const DirectionDeg&) {
    Add(ThetaName(f.name), f.unit);
    Add(PhiName(f.name), f.unit);
  }

 private:
  void Add(std::string name, std::string_view unit) {
    names.push_back(std::move(name));
    units.emplace_back(unit);
  }
};

// The columns of a list of T whose element walk is `body` (a List's body).
template <typename T, typename Body>
Columns ColumnsOf(Body& body) {
  Columns c;
  const T element{};
  body(element, c);
  return c;
}

// ---- /sweep: a frequency sweep (io/hdf5/sweep_writer.h) ---------------------------

inline constexpr std::string_view kSweepGroup = "/sweep";
inline constexpr std::string_view kSweepDesignFrequencyAttribute = "design_frequency_hz";
// "phase", "delay" (how the steered currents follow frequency) or "none" (fixed currents).
inline constexpr std::string_view kSweepSteeringAttribute = "steering";
// With a circuit: what the gain column is (the /pattern gain definition of coupling_writer.h).
inline constexpr std::string_view kSweepGainDefinitionAttribute = "gain_definition";
inline constexpr std::string_view kSweepGainRealizedAttribute = "gain_is_realized";
inline constexpr Dataset kSweepDirectivity{"/sweep/directivity", "1"};   // (F, Nt, Np) linear
inline constexpr Dataset kSweepFirstPlane{"/sweep/first_plane", "1"};    // (F) strings
inline constexpr Dataset kSweepSecondPlane{"/sweep/second_plane", "1"};  // (F) strings
inline constexpr std::string_view kSweepJsonKey = "sweep";

// The per-frequency columns of a sweep (FrequencyPoint, engine/sweep/frequency_sweep.h),
// each an (F) dataset under /sweep, a JSON key and a CSV column (name and unit), in
// this order; the circuit's columns only when the sweep has a circuit.
template <typename Point, typename F>  // Point: FrequencyPoint, const or not
void VisitSweepColumns(Point& p, bool coupled, F&& f) {
  f(Dataset{"/sweep/frequency_hz", "Hz"}, p.frequency_hz);
  f(Dataset{"/sweep/peak_directivity_dbi", "dBi"}, p.peak_directivity_dbi);
  f(Dataset{"/sweep/peak_theta_deg", "deg"}, p.peak_theta_deg);
  f(Dataset{"/sweep/peak_phi_deg", "deg"}, p.peak_phi_deg);
  f(Dataset{"/sweep/radiated_w", "W"}, p.radiated_w);
  f(Dataset{"/sweep/half_power_first_deg", "deg"}, p.half_power_first_deg);
  f(Dataset{"/sweep/half_power_second_deg", "deg"}, p.half_power_second_deg);
  f(Dataset{"/sweep/sidelobe_db", "dB"}, p.sidelobe_db);
  if (!coupled) return;
  f(Dataset{"/sweep/gain_dbi", "dBi"}, p.gain_dbi);
  f(Dataset{"/sweep/worst_reflection", "1"}, p.worst_reflection);
  f(Dataset{"/sweep/worst_vswr", "1"}, p.worst_vswr);
}

}  // namespace lobecast::schema
