// A one-line progress bar on stderr, drawn only when stderr is a terminal and the
// job has already run for about a second (short runs stay silent).
#pragma once

#include <chrono>

namespace lobecast::cli {

class ProgressBar {
 public:
  explicit ProgressBar(bool enabled);
  ~ProgressBar();
  // fraction in [0, 1]; cheap to call often.
  void Update(double fraction);
  // Erases the bar (if drawn).
  void Finish();

 private:
  bool enabled_;
  bool drawn_ = false;
  int last_percent_ = -1;
  std::chrono::steady_clock::time_point start_;
};

}  // namespace lobecast::cli
