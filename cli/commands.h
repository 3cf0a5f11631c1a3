// Each lobecast subcommand registers itself on the top-level CLI11 app. A
// command's callback throws on failure; main() alone maps errors to exit codes
// (CONVENTIONS §4: 2 bad input, 1 failure while running, 0 success).
#pragma once

#include <CLI/CLI.hpp>

namespace lobecast::cli {

void AddComputeCommand(CLI::App& app);
void AddCheckCommand(CLI::App& app);
void AddPlotCommand(CLI::App& app);
void AddReportCommand(CLI::App& app);
void AddExportCommand(CLI::App& app);
void AddScanCommand(CLI::App& app);
void AddSynthCommand(CLI::App& app);
// link budgets and RF-exposure distances (issue 17)
void AddLinkCommand(CLI::App& app);
void AddExposureCommand(CLI::App& app);
void AddSizeCommand(CLI::App& app);
void AddToleranceCommand(CLI::App& app);

}  // namespace lobecast::cli
