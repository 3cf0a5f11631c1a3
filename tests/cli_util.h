// Helpers for tests that run the `lobecast` executable (or Python) through the
// shell: the runner with its exit code, quoting, per-process work folders, the
// sample arrays and whole-file reads.
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

namespace lobecast::testing {

struct RunOutput {
  int exit_code = -1;  // -1: could not start, or did not exit normally
  std::string out;     // what the command wrote to stdout
  std::string err;     // stderr, when the caller captured it separately
};

// Runs `command` with /bin/sh, reading its stdout into `out` (redirect stderr in
// the command to capture it too).
inline RunOutput RunShell(const std::string& command) {
  RunOutput r;
  FILE* p = popen(command.c_str(), "r");
  if (!p) return r;
  std::array<char, 65536> buf;
  std::size_t n = 0;
  while ((n = std::fread(buf.data(), 1, buf.size(), p)) > 0) r.out.append(buf.data(), n);
  const int status = pclose(p);
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return r;
}

// `s` in single quotes for the shell (test paths hold no quote characters).
inline std::string Quote(const std::string& s) { return "'" + s + "'"; }

// <temp>/<prefix>-<pid>/<name>, created: each test process gets its own tree.
inline std::filesystem::path TempWorkDir(const std::string& prefix, const std::string& name) {
  std::filesystem::path d =
      std::filesystem::temp_directory_path() / (prefix + "-" + std::to_string(getpid())) / name;
  std::filesystem::create_directories(d);
  return d;
}

// Requirements files for `lobecast size` (requirements-*.toml) sit among the samples
// but are not arrays.
inline bool IsRequirementsSample(const std::filesystem::path& p) {
  return p.filename().string().rfind("requirements-", 0) == 0;
}

// The sample arrays (*.toml in LOBECAST_SAMPLES but requirements-*.toml), full paths in
// sorted order.
inline std::vector<std::string> SampleArrays() {
  std::vector<std::string> v;
  for (const auto& e : std::filesystem::directory_iterator(LOBECAST_SAMPLES)) {
    if (e.path().extension() == ".toml" && !IsRequirementsSample(e.path()))
      v.push_back(e.path().string());
  }
  std::sort(v.begin(), v.end());
  return v;
}

// The whole file (empty when it cannot be opened).
inline std::string ReadFile(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

}  // namespace lobecast::testing
