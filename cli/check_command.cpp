// `lobecast check ARRAY.toml`: validate and describe an array without computing.
#include <cstdio>
#include <memory>
#include <string>

#include "cli/commands.h"
#include "engine/power/power_large.h"
#include "engine/power/radiated_power.h"
#include "io/input/array_reader.h"
#include "io/input/solve_circuit.h"
#include "io/text/coupling_text.h"
#include "io/text/summary_text.h"

namespace lobecast::cli {

void AddCheckCommand(CLI::App& app) {
  auto input = std::make_shared<std::string>();
  CLI::App* cmd = app.add_subcommand(
      "check",
      "Read and validate an array description and describe it (frequency in Hz, "
      "wavelength in m, positions in m, currents in A peak and degrees) without computing. "
      "Exit code 0 when valid, 2 when rejected.");
  cmd->add_option("ARRAY", *input,
                  "Array description or design file (TOML; a design has a [lattice] table)")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->callback([input] {
    ArrayDescription desc = ReadArrayDescription(*input);
    for (const std::string& w : desc.warnings) std::fprintf(stderr, "%s\n", w.c_str());
    // Driven and loaded dipoles: the table shows the currents the circuit gives.
    const auto coupling = SolveArrayCircuit(desc, 0);
    std::fputs(text::DescribeArray(desc).c_str(), stdout);
    if (coupling) std::fputs(text::DescribeCoupling(*coupling, desc.ports, 0.0).c_str(), stdout);
    // Closed-form power in O(N) memory: cheap next to a pattern, and it catches
    // currents that cancel or overflow before anyone waits for a compute.
    const StreamedPower p = RadiatedPowerStreamed(desc.array, desc.currents);
    CheckRadiatedPower(p.radiated_power_w);
    std::fputs(text::PowerLine(desc, p.radiated_power_w).c_str(), stdout);
    std::printf("ok           %s is a valid array description\n", input->c_str());
  });
}

}  // namespace lobecast::cli
