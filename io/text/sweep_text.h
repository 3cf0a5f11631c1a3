// A frequency sweep as text (compute, report), JSON (report --json) and CSV
// (export --sweep): one row per frequency, the columns of the /sweep datasets
// (schema::VisitSweepColumns) plus the beam squint from the design frequency.
#pragma once

#include <string>

#include "io/hdf5/sweep_reader.h"
#include "io/text/json_writer.h"

namespace lobecast::text {

// The table for people: frequency, peak directivity, beam direction and squint,
// half-power beamwidths in the two principal planes, side-lobe level, and with a
// circuit the gain at the peak and the worst input match. The design row is marked.
std::string SweepTable(const StoredSweep& sweep);

// The member "sweep" of an open JSON object: design frequency, steering, and the
// points (every column by its dataset name, the planes and squint_deg).
void WriteSweepJson(JsonWriter& j, const StoredSweep& sweep);

// Comma-separated, a header with units in the names (the dataset names) then one row
// per frequency; shortest round-trip numbers, -inf/inf as such, NaN an empty cell
// (as export's tables).
std::string SweepCsv(const StoredSweep& sweep);

}  // namespace lobecast::text
