// lobecast: far fields, directivity, polarization and radiation resistance of
// arrays of short dipoles. This file only wires the subcommands together and
// decides exit codes.
#include <cstdio>
#include <exception>
#include <new>
#include <string>

#include <CLI/CLI.hpp>

#include "cli/commands.h"
#include "engine/error.h"
#include "io/input_error.h"
#include "io/io_error.h"
#include "io/version.h"

namespace {

constexpr int kExitOk = 0;
constexpr int kExitFailure = 1;
constexpr int kExitBadInput = 2;

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{
      "lobecast " + std::string(lobecast::SoftwareVersion()) +
          ": exact far field, directivity, polarization and radiation resistance of arrays "
          "of short dipoles.\nAngles are degrees, lengths metres, frequencies hertz, "
          "currents amperes (complex peak).\nRun 'lobecast COMMAND --help' for the options of one "
          "command.",
      "lobecast"};
  app.set_version_flag("--version", "lobecast " + std::string(lobecast::SoftwareVersion()));
  app.require_subcommand(1);
  lobecast::cli::AddComputeCommand(app);
  lobecast::cli::AddCheckCommand(app);
  lobecast::cli::AddPlotCommand(app);
  lobecast::cli::AddReportCommand(app);
  lobecast::cli::AddExportCommand(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);  // prints help, version or the usage error
    return code == 0 ? kExitOk : kExitBadInput;
  } catch (const lobecast::InputError& e) {
    std::fprintf(stderr, "lobecast: %s\n", e.what());
    return kExitBadInput;
  } catch (const lobecast::InvalidArgument& e) {
    std::fprintf(stderr, "lobecast: invalid input: %s\n", e.what());
    return kExitBadInput;
  } catch (const lobecast::NotAResultError& e) {
    std::fprintf(stderr, "lobecast: %s\n", e.what());
    return kExitBadInput;
  } catch (const lobecast::IoError& e) {
    std::fprintf(stderr, "lobecast: %s\n", e.what());
    return kExitFailure;
  } catch (const std::bad_alloc&) {
    std::fprintf(stderr, "lobecast: out of memory (try a coarser grid or fewer directions)\n");
    return kExitFailure;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "lobecast: error: %s\n", e.what());
    return kExitFailure;
  }
  return kExitOk;
}
