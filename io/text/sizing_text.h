// Text of `lobecast size` (CONVENTIONS §3, requirements files): the ranked table of
// candidates with predicted and computed figures side by side, its JSON, and each
// candidate as a design file that `synth` and `compute` accept (lengths in metres,
// so the file generates exactly the array the check computed).
#pragma once

#include <string>

#include "engine/sizing/sizing.h"
#include "io/input/requirements_reader.h"

namespace lobecast::text {

// "candidate-<rank>.toml", rank from 1.
std::string CandidateFileName(std::size_t rank);

// The design file of the candidate at `rank` (from 1) of `count`.
std::string CandidateDesign(const RequirementsFile& req, const SizingCandidate& c, std::size_t rank,
                            std::size_t count);

// The readable table: the requirements, the largest spacings, one block per
// candidate (predicted beside computed, what it misses), and what binds when none
// meets. folder: where the files went (named beside each candidate; empty: none).
std::string SizingTable(const RequirementsFile& req, const SizingResult& result,
                        const std::string& folder);

// The same as JSON (README "JSON numbers" for infinities).
std::string SizingJson(const RequirementsFile& req, const SizingResult& result,
                       const std::string& folder);

}  // namespace lobecast::text
