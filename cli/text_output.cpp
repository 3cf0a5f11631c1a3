#include "cli/text_output.h"

#include <iostream>

#include "cli/option_checks.h"
#include "io/io_error.h"
#include "io/output_file.h"

namespace lobecast::cli {

bool IsStdout(const std::string& path) { return path.empty() || path == kStdout; }

void WriteText(const std::string& path, const std::string& what,
               const std::function<void(std::ostream&)>& write) {
  if (IsStdout(path)) {
    write(std::cout);
    std::cout.flush();
    if (!std::cout) throw IoError("standard output", "could not write " + what);
    return;
  }
  OutputFile file(path, what);
  write(file.stream());
  file.Commit();
}

void CheckTextOutput(const std::string& path) {
  if (!IsStdout(path)) CheckOutputWritable(path);
}

}  // namespace lobecast::cli
