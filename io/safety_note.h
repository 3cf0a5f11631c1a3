// The safety note every lobecast output carries (CONVENTIONS §5): far-field figures
// are not an exposure assessment. Files (result attribute, export notes, report
// text and JSON) carry kSafetyNote in full; the terminal gets kSafetyLine, one
// line on stderr, so standard output stays the data alone.
#pragma once

#include <string_view>

namespace lobecast {

inline constexpr std::string_view kSafetyNote =
    "These are far-field figures for the currents given, not an RF-exposure or compliance "
    "assessment; the far-field model does not hold close to the array. Exposure limits near "
    "transmitting antennas are set by local regulation: follow them and licensed practice.";

// The terminal's one line (stderr), pointing at the full note.
inline constexpr std::string_view kSafetyLine =
    "lobecast: note: far-field figures for the currents given, not an RF-exposure or "
    "compliance assessment; follow local regulation and licensed practice (full note: "
    "lobecast report)";

}  // namespace lobecast
