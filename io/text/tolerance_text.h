// The text of a tolerance study (engine/tolerance/tolerance.h) for the terminal:
// what was drawn, the error-free figures, and a summary table of every per-trial
// scalar (mean, standard deviation, extremes and percentiles over the trials).
#pragma once

#include <string>

#include "engine/tolerance/tolerance.h"
#include "io/input/array_description.h"

namespace lobecast::text {

// The study: array, trials, seed, the distributions in words, beam direction,
// the summary table (rows from schema::VisitTrialScalars, then the beam directivity
// in dBi and each protected direction's null depth), the output and the time.
std::string DescribeTolerance(const ArrayDescription& desc, const ToleranceResult& r,
                              const ToleranceOptions& o, const std::string& output_path,
                              double wall_seconds);

}  // namespace lobecast::text
