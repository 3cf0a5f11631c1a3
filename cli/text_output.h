// Where a text output goes: standard output for an empty path or "-", otherwise a
// file written atomically through io/output_file.h (a temporary beside it, synced
// and renamed into place when complete; CONVENTIONS §4: a failed run never leaves
// a half-written table or clobbers an existing one). Reports, JSON, exports and
// scan tables all go through here, so `-o -` and `-o FILE` give the same bytes.
#pragma once

#include <functional>
#include <ostream>
#include <string>

namespace lobecast::cli {

// True for "" and "-": the text goes to standard output.
bool IsStdout(const std::string& path);

// Calls `write` with the stream for `path`; `what` names the output in an IoError
// ("the export", "the report"), which carries the system's reason.
void WriteText(const std::string& path, const std::string& what,
               const std::function<void(std::ostream&)>& write);

// Before any work: a file output can be written (io's CheckOutputWritable);
// nothing to check for standard output or no output ("").
void CheckTextOutput(const std::string& path);

}  // namespace lobecast::cli
