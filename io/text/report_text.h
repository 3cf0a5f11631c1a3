// What `report` prints (a table for people, or JSON for scripts) and the brief
// analysis lines `compute` adds to its summary. Units on every number.
//
// Definitions used in the report (see engine/analysis/analysis_types.h):
//   elevation plane   the great circle through the peak and the z axis (constant phi)
//   orthogonal plane  the great circle through the peak perpendicular to it
//   offsets along a plane are signed angles from the peak (deg), positive toward
//   theta_hat (elevation plane) or phi_hat (orthogonal plane) of the peak
//   HPBW  between the half-power (-3.01 dB) points of a plane
//   FNBW  between the first minima beyond the half-power points
//   F/B   peak directivity over that in the exactly opposite direction
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "engine/analysis/analysis_types.h"
#include "engine/coupling/coupling.h"
#include "engine/types.h"
#include "io/hdf5/sweep_reader.h"

namespace lobecast::text {

struct ReportContext {
  std::string result_path;
  std::string array_name;
  double frequency_hz = 0.0;
  Ground ground = Ground::kNone;
  std::size_t num_dipoles = 0;
  bool recomputed = false;  // false: read from the file's /summary/analysis
  // The numerical floor of the field, V (PatternResult::field_floor_v), and the digits
  // the radiated power keeps (ComputeSummary::power_significant_digits).
  double field_floor_v = 0.0;
  double power_significant_digits = 15.0;
  // A coupled array's circuit (io/hdf5/coupling_reader.h); both null otherwise.
  // The JSON then gains a "coupling" object named as the file's /coupling group.
  const CouplingResult* coupling = nullptr;
  const std::vector<Port>* ports = nullptr;
  // A frequency sweep (io/hdf5/sweep_reader.h); null otherwise. The JSON then gains a
  // "sweep" object (io/text/sweep_text.h).
  const StoredSweep* sweep = nullptr;
};

// Three lines for `compute`: beamwidths, highest side lobe, XPD and AR at the peak.
std::string AnalysisBrief(const PatternAnalysis& analysis);

std::string ReportText(const ReportContext& context, const PatternAnalysis& analysis,
                       const AnalysisOptions& options);

// The null loci and their principal-plane crossings (part of ReportText).
std::string NullLociText(const PatternAnalysis& analysis, const AnalysisOptions& options);

// One JSON object; infinities are the strings "inf" and "-inf" (an infinite F/B or
// XPD, an exact null's depth), an undefined number (a phi on the z axis, the tilt of
// a circular field) is null: README "JSON numbers".
std::string ReportJson(const ReportContext& context, const PatternAnalysis& analysis,
                       const AnalysisOptions& options);

}  // namespace lobecast::text
