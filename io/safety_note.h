// The safety note every lobecast output carries (terminal text, tables, JSON and
// result files; CONVENTIONS §5): far-field figures are not an exposure assessment.
#pragma once

#include <string_view>

namespace lobecast {

inline constexpr std::string_view kSafetyNote =
    "These are far-field figures for the currents given, not an RF-exposure or compliance "
    "assessment; the far-field model does not hold close to the array. Exposure limits near "
    "transmitting antennas are set by local regulation: follow them and licensed practice.";

}  // namespace lobecast
