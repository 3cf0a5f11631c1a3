// Where a text output goes: standard output for an empty path or "-", otherwise a
// file written to a temporary name beside it and renamed into place when complete
// (CONVENTIONS §4: a failed run never leaves a half-written table or clobbers an
// existing one). Reports, JSON, exports and scan tables all go through here, so
// `-o -` and `-o FILE` give the same bytes.
#pragma once

#include <functional>
#include <ostream>
#include <string>

namespace lobecast::cli {

// True for "" and "-": the text goes to standard output.
bool IsStdout(const std::string& path);

// Calls `write` with the stream for `path`; `what` names the output in an IoError
// ("the export", "the report").
void WriteText(const std::string& path, const std::string& what,
               const std::function<void(std::ostream&)>& write);

// The two halves of WriteText for outputs that come in sets (an array description
// and its CSV element table): write every temporary first, then move each into
// place, so a failure leaves none of them half-written. WriteTemporaryText returns
// the temporary's name; the caller removes it if a later step fails.
std::string WriteTemporaryText(const std::string& path, const std::string& what,
                               const std::function<void(std::ostream&)>& write);
void MoveIntoPlace(const std::string& tmp, const std::string& path, const std::string& what);

}  // namespace lobecast::cli
