// One voice for the command line: CLI11 checks whose messages say what was found
// and what was expected, with numbers printed as a person writes them (1e-14, not
// "0.000000"), the rule for output paths (`-` is standard output for text, refused
// for binary files; folders must exist), and the failure-message hook that turns
// CLI11's own errors into `lobecast: ...` lines (set on the app before the
// subcommands are added, so they inherit it).
#pragma once

#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace lobecast::cli {

// "1e-14", "0.01", "180": %g, the way the help text writes the bound.
std::string FormatBound(double v);

// A number within [lo, hi]; `unit` follows the bounds in the message ("deg", "").
CLI::Validator NumberIn(double lo, double hi, const std::string& unit);
// A finite number > lo (strictly); `unit` follows the bound in the message ("W", "m").
CLI::Validator NumberAbove(double lo, const std::string& unit);
// A whole number >= lo; `meaning` is appended in parentheses, e.g. "0 = all cores".
CLI::Validator WholeNumberAtLeast(long lo, const std::string& meaning);
// One of `names` (case-insensitive when ignore_case); the message lists them.
CLI::Validator OneOf(std::vector<std::string> names, bool ignore_case = false);
// An existing regular file; `what` names what it should be ("a result file (HDF5)").
CLI::Validator ExistingInput(const std::string& what);

// The standard-output name for text outputs.
inline constexpr const char* kStdout = "-";

// Empty when output files may be written at `path`: its folder exists and the file,
// if present, is a regular one (io/output_file.h). Otherwise "found ..., expected ...".
// lobecast never creates folders, for -o and --plots alike: a typo in a path fails
// before any work instead of leaving a stray tree.
std::string WhyNotWritableFile(const std::string& path);
// The same rule for a folder that files are written into (--plots DIR).
std::string WhyNotWritableFolder(const std::string& dir);

// -o for a text output: a file name, or `-` for standard output.
CLI::Validator TextOutput();
// -o for a binary output (`kind`: "an HDF5 result", "an image"): `-` is refused.
CLI::Validator BinaryOutput(const std::string& kind);
// A folder for several output files (--plots).
CLI::Validator OutputFolder();

// Refuses (BadOption) an output `option` naming the same file as the input `input`
// (`export r.h5 -o r.h5` would replace the result with its own table).
void RefuseInputAsOutput(const std::string& option, const std::string& output,
                         const std::string& input);

// Warnings (input warnings, skipped steps) on stderr, each one line "lobecast: ...".
void PrintWarnings(const std::vector<std::string>& warnings);

// The failure-message hook: `lobecast: COMMAND: what was found, expected what`,
// one line, for every CLI11 parse error (help and version are not failures).
std::string FailureMessage(const CLI::App* app, const CLI::Error& e);

// A bad option value, or an option that does not apply to what was asked:
// InputError (exit 2), "OPTION: found FOUND, expected EXPECTED".
[[noreturn]] void BadOption(const std::string& option, const std::string& why,
                            const std::string& remedy);

}  // namespace lobecast::cli
