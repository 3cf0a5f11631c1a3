// The bad-input corpus, tests/data/bad/*.toml. Each file starts with
//   # expect: line=N key=K [file=F] [col=C] [text=substring to the end of the line]
// line is required; key may be absent for syntax errors; file defaults to the
// TOML itself (CSV cases name their CSV).
#pragma once

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

namespace lobecast::testing {

struct BadCase {
  std::string path;
  std::map<std::string, std::string> expect;

  std::string Get(const std::string& k) const {
    auto it = expect.find(k);
    return it == expect.end() ? std::string() : it->second;
  }
  // The file the message must name: `file=` or the TOML's own name.
  std::string MessageFile() const {
    return expect.count("file") ? expect.at("file")
                                : std::filesystem::path(path).filename().string();
  }
};

inline std::vector<BadCase> BadCases(const std::string& dir) {
  std::vector<BadCase> cases;
  for (const auto& entry : std::filesystem::directory_iterator(dir)) {
    if (entry.path().extension() != ".toml") continue;
    std::ifstream in(entry.path());
    std::string first;
    std::getline(in, first);
    BadCase c{entry.path().string(), {}};
    const std::string tag = "# expect:";
    if (first.rfind(tag, 0) == 0) {
      std::string rest = first.substr(tag.size());
      const std::size_t text_at = rest.find("text=");
      if (text_at != std::string::npos) {
        c.expect["text"] = rest.substr(text_at + 5);
        rest = rest.substr(0, text_at);
      }
      std::istringstream words(rest);
      std::string w;
      while (words >> w) {
        const std::size_t eq = w.find('=');
        if (eq != std::string::npos) c.expect[w.substr(0, eq)] = w.substr(eq + 1);
      }
    }
    cases.push_back(std::move(c));
  }
  std::sort(cases.begin(), cases.end(),
            [](const BadCase& a, const BadCase& b) { return a.path < b.path; });
  return cases;
}

// A gtest-safe name for a case: the file stem with non-alphanumerics as '_'.
inline std::string CaseName(const BadCase& c) {
  std::string name = std::filesystem::path(c.path).stem().string();
  for (char& ch : name) {
    if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
  }
  return name;
}

}  // namespace lobecast::testing
