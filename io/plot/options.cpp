#include "io/plot/options.h"

#include <cmath>
#include <cstdio>

#include "engine/text_case.h"

namespace lobecast::plot {
namespace {

bool InRange(double v, double lo, double hi, const char* option, std::string* why) {
  if (std::isfinite(v) && v >= lo && v <= hi) return true;
  if (why) {
    char buf[160];
    std::snprintf(buf, sizeof buf, "%s = %g: expected %g .. %g dB", option, v, lo, hi);
    *why = buf;
  }
  return false;
}

}  // namespace

std::string_view ToString(PlotKind k) {
  switch (k) {
    case PlotKind::kPolar:
      return "polar";
    case PlotKind::kCartesian:
      return "cartesian";
    case PlotKind::kMap:
      return "map";
    case PlotKind::kPolarization:
      return "polarization";
  }
  return "?";
}

std::optional<PlotKind> PlotKindFromString(std::string_view s) {
  const std::string l = Lower(s);
  for (PlotKind k :
       {PlotKind::kPolar, PlotKind::kCartesian, PlotKind::kMap, PlotKind::kPolarization})
    if (l == ToString(k)) return k;
  return std::nullopt;
}

std::string_view ToString(MapProjection p) {
  switch (p) {
    case MapProjection::kThetaPhi:
      return "theta-phi";
    case MapProjection::kAzEl:
      return "az-el";
    case MapProjection::kUv:
      return "uv";
  }
  return "?";
}

std::optional<MapProjection> MapProjectionFromString(std::string_view s) {
  const std::string l = Lower(s);
  if (l == "theta-phi") return MapProjection::kThetaPhi;
  if (l == "az-el") return MapProjection::kAzEl;
  if (l == "uv" || l == "u-v") return MapProjection::kUv;
  return std::nullopt;
}

bool PlotOptions::IsValid(std::string* why) const {
  return InRange(floor_db, 1, 200, "floor_db", why) &&
         InRange(contour_step_db, 0.5, 50, "contour_step_db", why) &&
         InRange(axial_ratio_max_db, 1, 100, "axial_ratio_max_db", why) && size.IsValid(why);
}

}  // namespace lobecast::plot
