// A CLI11 check for output file options: the file's folder must already exist,
// and the file, if it exists, must be a regular one (io/output_file.h).
// lobecast never creates folders for a result, table or image (a typo in a path
// should fail before any work, not leave a stray tree), and it says so up front.
#pragma once

#include <filesystem>
#include <string>

#include <CLI/CLI.hpp>

#include "io/output_file.h"

namespace lobecast::cli {

inline CLI::Validator OutputFileInExistingFolder() {
  return CLI::Validator(
      [](std::string& path) -> std::string {
        const std::string why = WhyNotReplaceable(path);
        if (!why.empty()) return "'" + path + "' " + why;
        const std::filesystem::path parent = std::filesystem::path(path).parent_path();
        if (parent.empty() || std::filesystem::is_directory(parent)) return "";
        return "the folder '" + parent.string() +
               "' does not exist (create it first; lobecast does not create folders for "
               "output files)";
      },
      "FILE", "OutputFileInExistingFolder");
}

}  // namespace lobecast::cli
