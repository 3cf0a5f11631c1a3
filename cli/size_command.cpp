// `lobecast size REQUIREMENTS.toml -o DIR [--json]`: from requirements (directivity
// or beamwidths, side lobes, scan range, ground, polarization, constraints) to a
// ranked list of candidate panels, each computed with the engine at broadside and at
// the scan edges, and written as DIR/candidate-1.toml, ... (design files).

#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>
#include <system_error>
#include <vector>

#include "cli/commands.h"
#include "cli/option_checks.h"
#include "cli/text_output.h"
#include "engine/sizing/sizing.h"
#include "io/input/requirements_reader.h"
#include "io/output_file.h"
#include "io/text/sizing_text.h"

namespace lobecast::cli {
namespace {

struct SizeArgs {
  std::string input;
  std::string folder;
  bool json = false;
  bool no_check = false;
  int threads = 0;
  bool quiet = false;
};

void RunSize(const SizeArgs& args) {
  const RequirementsFile req = ReadRequirements(args.input);
  const auto path_of = [&](std::size_t rank) {
    return (std::filesystem::path(args.folder) / text::CandidateFileName(rank)).string();
  };
  // Refuse a path that cannot be replaced before any work.
  for (std::size_t i = 1; i <= kMaxSizingCandidates; ++i) RequireReplaceable(path_of(i));
  CheckFolderWritable(args.folder);  // an unwritable folder is found before the work
  SizingOptions options;
  options.check = !args.no_check;
  options.threads = args.threads;
  const SizingResult result = SizeArray(req.requirements, options);
  const std::size_t count = result.candidates.size();

  // Every file complete (written and synced) before any is moved into place; a
  // failure abandons them all (OutputFile's destructor).
  std::vector<std::unique_ptr<OutputFile>> files;
  for (std::size_t i = 0; i < count; ++i) {
    files.push_back(std::make_unique<OutputFile>(path_of(i + 1), "the candidate design"));
    files.back()->stream() << text::CandidateDesign(req, result.candidates[i], i + 1, count);
    files.back()->Complete();
  }
  for (const auto& f : files) f->Commit();

  const std::string out = args.json ? text::SizingJson(req, result, args.folder)
                                    : text::SizingTable(req, result, args.folder);
  std::fputs(out.c_str(), stdout);
  std::error_code ec;
  if (std::filesystem::exists(path_of(count + 1), ec))
    PrintWarnings({"warning: " + path_of(count + 1) +
                   " is not from this run (fewer candidates now); it was left as it was"});
}

}  // namespace

void AddSizeCommand(CLI::App& app) {
  auto args = std::make_shared<SizeArgs>();
  CLI::App* cmd = app.add_subcommand(
      "size",
      "Size an array from requirements: for rectangular lattices with Taylor, "
      "Dolph-Chebyshev and circular Taylor tapers and triangular ones with circular Taylor, "
      "the largest spacing without grating lobes over the scan "
      "range, the taper for the side-lobe level and the element counts for the directivity "
      "or beamwidths; each candidate is computed with the engine at broadside and at the "
      "scan edges (principal planes), ranked (meeting everything first, then fewest elements, "
      "then grating-lobe margin) and written as DIR/candidate-1.toml, ... (design files for "
      "synth and compute). Prints a table (dBi, dB, deg, wavelengths, mm or m) or, with --json, "
      "the same as JSON.");
  cmd->add_option("REQUIREMENTS", args->input,
                  "Requirements file (TOML): frequency, directivity_dbi and/or beamwidth_deg, "
                  "sidelobe_db, scan_deg, ground, polarization, lattice, max_elements, "
                  "max_aperture, element_length, length_unit (README, Sizing an array)")
      ->required()
      ->check(ExistingInput("a requirements file (TOML)"));
  cmd->add_option("-o,--output", args->folder,
                  "Existing folder for candidate-1.toml, candidate-2.toml, ... (replaced if "
                  "present; lobecast never creates folders). Nothing is written when the "
                  "requirements are rejected.")
      ->required()
      ->check(CLI::Validator(
          [](std::string& dir) -> std::string {
            return dir == kStdout ? "found '-' (standard output), expected a folder: size "
                                    "writes one design file per candidate (--json puts the "
                                    "table on standard output)"
                                  : "";
          },
          "DIR", "NotStdout"))
      ->check(OutputFolder());
  cmd->add_flag("--json", args->json, "Print the table as JSON (for scripts)");
  cmd->add_flag("--no-check", args->no_check,
                "Predict only (array theory): skip computing the candidates with the engine");
  cmd->add_option("--threads", args->threads, "Threads for the check (0 = all cores)")
      ->check(WholeNumberAtLeast(0, "0 = all cores"));
  cmd->add_flag("-q,--quiet", args->quiet,
                "Print nothing but warnings and errors besides the table itself");
  cmd->callback([args] { RunSize(*args); });
}

}  // namespace lobecast::cli
