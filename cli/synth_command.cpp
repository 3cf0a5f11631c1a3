// `lobecast synth DESIGN.toml -o ARRAY.toml`: generate a design's elements and
// currents and write them as an explicit, commented array description (a CSV
// element table beside it for large arrays), so every result stays reproducible.

#include <cstdio>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <system_error>

#include "cli/commands.h"
#include "cli/option_checks.h"
#include "cli/text_output.h"
#include "io/input/array_reader.h"
#include "io/input_error.h"
#include "io/io_error.h"
#include "io/output_file.h"
#include "io/text/design_text.h"

namespace lobecast::cli {
namespace {

struct SynthArgs {
  std::string input;
  std::string output;
  bool quiet = false;
};

void RunSynth(const SynthArgs& args) {
  CheckTextOutput(args.output);  // before the design is worked out
  const ArrayDescription desc = ReadArrayDescription(args.input);
  if (!desc.design) {
    throw InputError(SourceLocation{args.input, 1, 1}, "lattice", "no [lattice] table",
                     "a design file ([lattice], [element], optional [taper] and [steer]); an "
                     "array description is already explicit");
  }
  PrintWarnings(desc.warnings);

  const bool csv = text::WritesCsv(desc);
  if (csv && IsStdout(args.output)) {
    BadOption("-o", "'-' (standard output) for " + std::to_string(desc.array.size()) + " dipoles",
              "a file name: above " + std::to_string(text::kCsvThreshold) +
                  " dipoles the elements go to a CSV table beside the array description");
  }
  const std::filesystem::path out_path(args.output);
  const std::string csv_name = out_path.stem().string() + ".csv";
  const std::string csv_path = (out_path.parent_path() / csv_name).string();
  if (csv) RequireReplaceable(csv_path);
  const text::ArrayFileText files = text::ArrayFile(desc, csv ? csv_name : "");
  const auto put = [](const std::string& text) {
    return [&text](std::ostream& out) { out << text; };
  };
  if (IsStdout(args.output)) {
    WriteText(args.output, "the array description", put(files.toml));
    return;  // standard output carries the array; the summary would corrupt it
  }

  // Both files complete (written and synced) before either is moved into place; a
  // failure abandons both.
  OutputFile toml(args.output, "the array description");
  toml.stream() << files.toml;
  toml.Complete();
  std::optional<OutputFile> table;
  if (csv) {
    table.emplace(csv_path, "the element table");
    table->stream() << files.csv;
    table->Complete();
    table->Commit();
  }
  toml.Commit();

  if (!args.quiet) {
    std::fputs(text::DescribeDesign(desc).c_str(), stdout);
    std::printf("dipoles      %zu\n", desc.array.size());
    if (csv)
      std::printf("wrote        %s (dipoles in %s)\n", args.output.c_str(), csv_path.c_str());
    else
      std::printf("wrote        %s\n", args.output.c_str());
  }
}

}  // namespace

void AddSynthCommand(CLI::App& app) {
  auto args = std::make_shared<SynthArgs>();
  CLI::App* cmd = app.add_subcommand(
      "synth",
      "Generate a design file's elements and currents (lattice, element template, taper or "
      "objective, steering, nulls) and write them as an explicit, commented array "
      "description; print what was designed (taper efficiency, steering, grating lobes, "
      "null depths, directivity). Above " +
          std::to_string(text::kCsvThreshold) +
          " dipoles the elements go to a CSV table beside it (ARRAY's name with .csv).");
  cmd->add_option("DESIGN", args->input, "Design file (TOML with a [lattice] table)")
      ->required()
      ->check(ExistingInput("a design file (TOML)"));
  cmd->add_option("-o,--output", args->output,
                  "Array description to write (TOML; '-' for standard output when no CSV "
                  "table is needed). Written atomically: a rejected design writes nothing.")
      ->required()
      ->check(TextOutput());
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but warnings and errors");
  cmd->callback([args] { RunSynth(*args); });
}

}  // namespace lobecast::cli
