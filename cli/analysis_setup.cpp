#include "cli/analysis_setup.h"

#ifdef __GLIBC__
#include <malloc.h>
#endif

#include <cmath>
#include <complex>
#include <string>

#include "cli/enum_names.h"
#include "cli/option_checks.h"
#include "engine/analysis/pattern_analysis.h"
#include "engine/constants.h"
#include "engine/error.h"
#include "engine/polarization.h"
#include "engine/text_case.h"
#include "io/text/number_text.h"

namespace lobecast::cli {

std::vector<std::string> PolarizationReferenceNames() {
  return NamesOf({PolarizationReference::kLinearX, PolarizationReference::kLinearY,
                  PolarizationReference::kRightCircular, PolarizationReference::kLeftCircular,
                  PolarizationReference::kTheta, PolarizationReference::kPhi});
}

std::vector<std::string> ReferenceNames() {
  std::vector<std::string> names = PolarizationReferenceNames();
  names.emplace_back("auto");
  return names;
}

std::optional<PolarizationReference> ParseReference(std::string_view text) {
  const std::string lower = Lower(text);
  if (lower == "auto") return std::nullopt;
  if (const auto r = PolarizationReferenceFromString(lower)) return r;
  BadOption("--reference", "'" + std::string(text) + "'", JoinAlternatives(ReferenceNames()));
}

std::pair<double, double> ParseAnglePair(std::string_view text, std::string_view option,
                                         std::string_view expected) {
  auto number = [](std::string_view s) -> std::optional<double> {
    while (!s.empty() && s.front() == ' ') s.remove_prefix(1);
    while (!s.empty() && s.back() == ' ') s.remove_suffix(1);
    return ParseFiniteNumber(s);
  };
  const std::size_t comma = text.find(',');
  const auto a = comma == std::string_view::npos ? std::nullopt : number(text.substr(0, comma));
  const auto b = comma == std::string_view::npos ? std::nullopt : number(text.substr(comma + 1));
  if (!a || !b) {
    BadOption(std::string(option), "'" + std::string(text) + "'", std::string(expected));
  }
  return {*a, *b};
}

std::optional<PatternAnalysis> AnalyzeOrWarn(const ArrayDescription& desc,
                                             const PatternResult& result,
                                             const AnalysisOptions& options) {
  std::optional<PatternAnalysis> analysis;
  try {
    analysis = AnalyzePattern(desc.array, desc.currents, result, options);
  } catch (const InvalidArgument& e) {
    PrintWarnings({std::string("pattern analysis skipped: ") + e.what()});
  }
  // The analysis' working memory (on a large array the searches' transform grid, some
  // hundred MB) is free again: hand it back to the system before the result file is
  // written beside the grid (a 10^6-dipole random array: peak 1399 -> 1139 MiB).
#ifdef __GLIBC__
  ::malloc_trim(0);
#endif
  return analysis;
}

ResultMetadata MetadataOf(const ArrayDescription& desc) {
  ResultMetadata meta;
  meta.name = desc.name;
  meta.description = desc.description;
  meta.input_text = desc.source_text;
  meta.input_path = desc.source_path;
  return meta;
}

}  // namespace lobecast::cli
