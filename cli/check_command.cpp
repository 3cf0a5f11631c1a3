// `lobecast check ARRAY.toml`: validate and describe an array without computing.
#include <cmath>
#include <cstdio>
#include <memory>
#include <string>

#include "cli/commands.h"
#include "cli/option_checks.h"
#include "cli/progress_bar.h"
#include "cli/run_limits.h"
#include "engine/pattern.h"
#include "engine/power/power_cost.h"
#include "engine/power/power_large.h"
#include "engine/power/power_quadrature.h"
#include "engine/power/radiated_power.h"
#include "io/input/array_reader.h"
#include "io/input/solve_circuit.h"
#include "io/text/coupling_text.h"
#include "io/text/design_text.h"
#include "io/text/summary_text.h"

namespace lobecast::cli {

void AddCheckCommand(CLI::App& app) {
  auto input = std::make_shared<std::string>();
  auto quiet = std::make_shared<bool>(false);
  auto limits = std::make_shared<RunLimits>();
  CLI::App* cmd = app.add_subcommand(
      "check",
      "Read and validate an array description and describe it (frequency in Hz, "
      "wavelength in m, positions in m, currents in A peak and degrees) without computing. "
      "Exit code 0 when valid, 2 when rejected.");
  cmd->add_option("ARRAY", *input,
                  "Array description or design file (TOML; a design has a [lattice] table)")
      ->required()
      ->check(ExistingInput("an array description (TOML)"));
  cmd->add_flag("-q,--quiet", *quiet,
                "Print nothing but warnings and errors: the exit code alone says valid (0) or "
                "rejected (2)");
  AddRunLimitOptions(cmd, *limits);
  cmd->callback([input, quiet, limits] {
    ArrayDescription desc = ReadArrayDescription(*input);
    PrintWarnings(desc.warnings);
    RunSize size;  // the power alone: no pattern, the matrix streamed
    size.dipoles = desc.array.size();
    size.ground = desc.array.ground;
    PatternOptions power_only;  // auto, as below: the route check takes, priced
    power_only.resistance_matrix_max_dipoles = 0;
    const RunEstimate estimate = EstimateRun(size, PriceRoutes(desc.array, {}, power_only));
    CheckRunLimits(estimate, *limits, *input, *quiet);
    // Driven and loaded dipoles: the table shows the currents the circuit gives.
    const auto coupling = SolveArrayCircuit(desc, 0);
    // Closed-form power in O(N) memory: cheap next to a pattern, and it catches
    // currents that cancel or overflow before anyone waits for a compute; before
    // printing, so a rejected array prints nothing on stdout. Where the closed
    // form would take long (huge arrays), the band-limited quadrature, as compute's
    // --power-method auto.
    double power_w = 0, digits = 0;
    std::string how = "closed form";
    if (estimate.power_route == PowerRoute::kQuadrature) {
      const QuadraturePower q = RadiatedPowerByQuadrature(desc.array, desc.currents);
      power_w = q.radiated_power_w;
      digits = -std::log10(q.error_bound_relative);
      char b[96];
      std::snprintf(b, sizeof b, "band-limited quadrature, within %.2g of P",
                    q.error_bound_relative);
      how = b;
    } else {
      StreamedPower p;
      RunWithTimedProgress(estimate.seconds(), !*quiet,
                           [&] { p = RadiatedPowerStreamed(desc.array, desc.currents); });
      power_w = p.radiated_power_w;
      digits = PowerSignificantDigits(p.radiated_power_w, p.term_magnitudes_w);
    }
    CheckRadiatedPower(power_w);
    if (*quiet) {
      // The digits caution is a warning about the result: quiet keeps it (stderr).
      const std::string note = PowerDigitsNote(digits);
      if (!note.empty()) PrintWarnings({note});
      return;
    }
    std::fputs(text::DescribeArray(desc).c_str(), stdout);
    std::fputs(text::DescribeDesign(desc).c_str(), stdout);  // empty unless a design file
    if (coupling) std::fputs(text::DescribeCoupling(*coupling, desc.ports, 0.0).c_str(), stdout);
    std::fputs(text::PowerLine(desc, power_w, digits, how).c_str(), stdout);
    std::printf("ok           %s is a valid array description\n", input->c_str());
  });
}

}  // namespace lobecast::cli
