// lobecast: far fields, directivity, polarization and radiation resistance of
// arrays of short dipoles. This file only wires the subcommands together and
// decides exit codes.
#include <cstdio>
#include <exception>
#include <string>

#include <CLI/CLI.hpp>

#include "cli/commands.h"
#include "cli/exit_code.h"
#include "cli/option_checks.h"
#include "io/version.h"
#ifdef LOBECAST_WITH_MPI
#include "cli/mpi/scale_out.h"  // -DLOBECAST_MPI=ON: an MPI run (rank 0 reports)
#endif

int main(int argc, char** argv) {
#ifdef LOBECAST_WITH_MPI
  // MPI only under a launcher (mpirun); commands that are not split run on rank 0 alone.
  const lobecast::mpi::Session mpi_session(&argc, &argv);
  if (lobecast::mpi::Rank() > 0 && !lobecast::mpi::SplitsCommand(argc, argv)) return 0;
#endif
  CLI::App app{
      "lobecast " + std::string(lobecast::SoftwareVersion()) +
          ": exact far field, directivity, polarization and radiation resistance of arrays "
          "of short dipoles.\nAngles are degrees, lengths metres, frequencies hertz, "
          "currents amperes (complex peak).\nRun 'lobecast COMMAND --help' for the options of one "
          "command.",
      "lobecast"};
  app.set_version_flag("--version", "lobecast " + std::string(lobecast::SoftwareVersion()));
  app.require_subcommand(1);
  // Before the subcommands: they copy the hook when they are created.
  app.failure_message(lobecast::cli::FailureMessage);
  lobecast::cli::AddComputeCommand(app);
  lobecast::cli::AddCheckCommand(app);
  lobecast::cli::AddPlotCommand(app);
  lobecast::cli::AddReportCommand(app);
  lobecast::cli::AddExportCommand(app);
  lobecast::cli::AddScanCommand(app);
  lobecast::cli::AddSynthCommand(app);
  lobecast::cli::AddLinkCommand(app);
  lobecast::cli::AddExposureCommand(app);
  lobecast::cli::AddSizeCommand(app);
  lobecast::cli::AddToleranceCommand(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
#ifdef LOBECAST_WITH_MPI
    if (lobecast::mpi::Rank() > 0)  // every rank parses the same line: rank 0 says it
      return e.get_exit_code() == 0 ? lobecast::cli::kExitOk : lobecast::cli::kExitBadInput;
#endif
    const int code = app.exit(e);  // help, version, or the usage error via FailureMessage
    return code == 0 ? lobecast::cli::kExitOk : lobecast::cli::kExitBadInput;
  } catch (...) {
#ifdef LOBECAST_WITH_MPI
    return lobecast::mpi::ExitAfterError(std::current_exception());
#endif
    const lobecast::cli::ExitReport r = lobecast::cli::ReportFor(std::current_exception());
    std::fprintf(stderr, "%s\n", r.message.c_str());
    return r.code;
  }
  return lobecast::cli::kExitOk;
}
