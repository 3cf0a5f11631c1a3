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

// RF-exposure estimates (`lobecast exposure`): what a far-field power density can and
// cannot say, in full wherever the figures go (table, CSV notes, JSON, map caption).
inline constexpr std::string_view kExposureNote =
    "This is a far-field estimate, S = EIRP / (4 pi r^2) toward each direction in free space "
    "for the power given. Closer to the array than its far-field distance the near field is "
    "not modelled, and reflections (the ground, walls, vehicles, nearby metal) add to the "
    "direct wave: both can raise exposure above these figures. The limit is the one you "
    "gave; lobecast holds no exposure limits. Compliance must be established under the "
    "applicable regulations by qualified persons.";

// The terminal's one stderr line for exposure runs.
inline constexpr std::string_view kExposureLine =
    "lobecast: note: far-field exposure estimate only: the near field and reflections (ground!) "
    "can raise exposure; compliance must be established under the applicable regulations by "
    "qualified persons";

}  // namespace lobecast
