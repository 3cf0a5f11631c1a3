#include "cli/option_checks.h"

#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <system_error>

#include "cli/enum_names.h"
#include "engine/text_case.h"
#include "io/input_error.h"
#include "io/output_file.h"
#include "io/text/number_text.h"

namespace lobecast::cli {
namespace {

std::string Quoted(const std::string& s) { return "'" + s + "'"; }

std::string Joined(const std::vector<std::string>& names, const std::string& sep) {
  std::string out;
  for (const std::string& n : names) out += (out.empty() ? "" : sep) + n;
  return out;
}

bool StartsWith(const std::string& s, const std::string& prefix) {
  return s.compare(0, prefix.size(), prefix) == 0;
}

// The command line as far as CLI11 parsed it: "lobecast compute".
std::string CommandOf(const CLI::App* app) {
  std::string cmd = "lobecast";
  for (const CLI::App* a = app; a != nullptr;) {
    const std::vector<CLI::App*> subs = a->get_subcommands();
    if (subs.empty()) break;
    cmd += " " + subs.front()->get_name();
    a = subs.front();
  }
  return cmd;
}

std::vector<std::string> SubcommandNames(const CLI::App* app) {
  std::vector<std::string> names;
  for (const CLI::App* s : app->get_subcommands({})) names.push_back(s->get_name());
  return names;
}

// CLI11's text for an error, reworded where it says less than it should.
std::string Reword(const CLI::App* app, const CLI::Error& e, const std::string& command) {
  const std::string what = e.what();
  const std::string name = e.get_name();
  const std::string help = "; see '" + command + " --help'";
  if (name == "RequiredError") {
    if (StartsWith(what, "A subcommand")) {
      const std::vector<std::string> extra = app->remaining(true);
      const std::string commands = JoinAlternatives(SubcommandNames(app));
      if (!extra.empty()) {
        return "found " + Quoted(extra.front()) + ", expected a command: " + commands +
               "; see 'lobecast --help'";
      }
      return "no command given, expected one of " + commands + "; see 'lobecast --help'";
    }
    const std::size_t at = what.find(" is required");
    if (at != std::string::npos) return "missing " + what.substr(0, at) + help;
    return what + help;
  }
  // CLI11 names a subcommand's ExtrasError after the subcommand: go by the text.
  if (name == "ExtrasError" || StartsWith(what, "The following argument")) {
    const std::size_t colon = what.find(": ");
    const std::string extras = colon == std::string::npos ? what : what.substr(colon + 2);
    if (command == "lobecast") {
      return "found " + Quoted(extras) +
             ", expected a command: " + JoinAlternatives(SubcommandNames(app)) +
             "; see 'lobecast --help'";
    }
    return "found " + Quoted(extras) + ", which is not an option or argument of " +
           Quoted(command) + help;
  }
  if (name == "ExcludesError") {
    const std::size_t at = what.find(" excludes ");
    if (at != std::string::npos) {
      return what.substr(0, at) + ": found together with " + what.substr(at + 10) +
             ", expected one of the two";
    }
  }
  if (name == "ArgumentMismatch") {
    // "--output: 1 required TEXT missing", "Expected exactly 1 arguments to --threads, got 0"
    std::string option = what.substr(0, what.find(':'));
    const std::size_t to = what.find(" arguments to ");
    if (to != std::string::npos) option = what.substr(to + 14, what.find(',', to) - to - 14);
    return option + ": found no value, expected one" + help;
  }
  if (name == "ConversionError") {
    // "Could not convert: --threads = abc", "The value abc is not an allowed value for --x"
    const std::string prefix = "Could not convert: ";
    if (StartsWith(what, prefix)) {
      const std::string rest = what.substr(prefix.size());
      const std::size_t eq = rest.find(" = ");
      if (eq != std::string::npos) {
        return rest.substr(0, eq) + ": found " + Quoted(rest.substr(eq + 3)) +
               ", expected a number";
      }
    }
  }
  return what;
}

}  // namespace

std::string FormatBound(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

CLI::Validator NumberIn(double lo, double hi, const std::string& unit) {
  const std::string range =
      FormatBound(lo) + " .. " + FormatBound(hi) + (unit.empty() ? "" : " " + unit);
  return CLI::Validator(
      [lo, hi, range](std::string& text) -> std::string {
        const auto v = ParseFiniteNumber(text);
        if (!v) return "found " + Quoted(text) + ", expected a number in " + range;
        if (!(*v >= lo && *v <= hi)) return "found " + text + ", expected a number in " + range;
        return "";
      },
      "[" + range + "]", "NumberIn");
}

CLI::Validator NumberAbove(double lo, const std::string& unit) {
  const std::string expected = "a number > " + FormatBound(lo) + (unit.empty() ? "" : " " + unit);
  return CLI::Validator(
      [lo, expected](std::string& text) -> std::string {
        const auto v = ParseFiniteNumber(text);
        if (!v) return "found " + Quoted(text) + ", expected " + expected;
        if (!(*v > lo)) return "found " + text + ", expected " + expected;
        return "";
      },
      "[> " + FormatBound(lo) + (unit.empty() ? "" : " " + unit) + "]", "NumberAbove");
}

CLI::Validator WholeNumberAtLeast(long lo, const std::string& meaning) {
  const std::string expected =
      "a whole number >= " + std::to_string(lo) + (meaning.empty() ? "" : " (" + meaning + ")");
  return CLI::Validator(
      [lo, expected](std::string& text) -> std::string {
        errno = 0;
        char* end = nullptr;
        const long v = std::strtol(text.c_str(), &end, 10);
        if (text.empty() || *end != '\0' || errno != 0) {
          return "found " + Quoted(text) + ", expected " + expected;
        }
        if (v < lo) return "found " + text + ", expected " + expected;
        return "";
      },
      "INT >= " + std::to_string(lo), "WholeNumberAtLeast");
}

CLI::Validator OneOf(std::vector<std::string> names, bool ignore_case) {
  const std::string expected = JoinAlternatives(names);
  return CLI::Validator(
      [names, ignore_case, expected](std::string& text) -> std::string {
        for (const std::string& n : names) {
          if (ignore_case ? Lower(text) == Lower(n) : text == n) {
            text = n;
            return "";
          }
        }
        return "found " + Quoted(text) + ", expected " + expected;
      },
      "{" + Joined(names, "|") + "}", "OneOf");
}

CLI::Validator ExistingInput(const std::string& what) {
  return CLI::Validator(
      [what](std::string& path) -> std::string {
        std::error_code ec;
        const auto status = std::filesystem::status(path, ec);
        if (path == kStdout) {
          return "found '-', expected the name of " + what +
                 " (lobecast does not read from standard input)";
        }
        if (!std::filesystem::exists(status)) {
          return "found " + Quoted(path) + ", which does not exist; expected " + what;
        }
        if (std::filesystem::is_directory(status)) {
          return "found " + Quoted(path) + ", a folder; expected " + what;
        }
        if (!std::filesystem::is_regular_file(status)) {  // /dev/zero, a pipe: never ends
          return "found " + Quoted(path) + ", not a regular file (a device, pipe or socket); " +
                 "expected " + what;
        }
        return "";
      },
      "FILE", "ExistingInput");
}

std::string WhyNotWritableFile(const std::string& path) {
  const std::string why = WhyNotReplaceable(path);
  if (!why.empty()) return "found " + Quoted(path) + ", which " + why;
  const std::filesystem::path parent = std::filesystem::path(path).parent_path();
  std::error_code ec;
  if (parent.empty() || std::filesystem::is_directory(parent, ec)) return "";
  return "found " + Quoted(path) + ", in a folder that does not exist; expected a file in an " +
         "existing folder (create " + Quoted(parent.string()) +
         " first: lobecast does not create folders)";
}

std::string WhyNotWritableFolder(const std::string& dir) {
  std::error_code ec;
  if (std::filesystem::is_directory(dir, ec)) return "";
  if (std::filesystem::exists(dir, ec)) {
    return "found " + Quoted(dir) + ", which is not a folder; expected an existing folder";
  }
  return "found " + Quoted(dir) + ", a folder that does not exist; expected an existing " +
         "folder (create it first: lobecast does not create folders)";
}

CLI::Validator TextOutput() {
  return CLI::Validator(
      [](std::string& path) -> std::string {
        if (path == kStdout) return "";
        return WhyNotWritableFile(path);
      },
      "FILE|-", "TextOutput");
}

CLI::Validator BinaryOutput(const std::string& kind) {
  return CLI::Validator(
      [kind](std::string& path) -> std::string {
        if (path == kStdout) {
          return "found '-' (standard output), expected a file name: " + kind +
                 " is binary and is not written to standard output";
        }
        return WhyNotWritableFile(path);
      },
      "FILE", "BinaryOutput");
}

CLI::Validator OutputFolder() {
  return CLI::Validator(
      [](std::string& dir) -> std::string {
        if (dir == kStdout) {
          return "found '-' (standard output), expected a folder: images are binary and are "
                 "not written to standard output";
        }
        return WhyNotWritableFolder(dir);
      },
      "DIR", "OutputFolder");
}

std::string FailureMessage(const CLI::App* app, const CLI::Error& e) {
  const std::string command = CommandOf(app);
  std::string text = Reword(app, e, command);
  for (char& c : text) {
    if (c == '\n') c = ' ';
  }
  return "lobecast: " + text + "\n";
}

void PrintWarnings(const std::vector<std::string>& warnings) {
  for (const std::string& w : warnings) std::fprintf(stderr, "lobecast: %s\n", w.c_str());
}

void RefuseInputAsOutput(const std::string& option, const std::string& output,
                         const std::string& input) {
  std::error_code ec;
  if (output.empty() || output == kStdout || !std::filesystem::equivalent(output, input, ec) ||
      ec) {
    return;
  }
  BadOption(option, Quoted(output) + ", the input file itself",
            "another file name (the input is never overwritten)");
}

void BadOption(const std::string& option, const std::string& found, const std::string& expected) {
  throw InputError(SourceLocation{option}, "found " + found + ", expected " + expected);
}

}  // namespace lobecast::cli
