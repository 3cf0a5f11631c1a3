// A one-line progress bar on stderr, drawn only when stderr is a terminal and the
// job has already run for about a second (short runs stay silent).
#pragma once

#include <chrono>
#include <functional>

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

// Runs `work` on a helper thread while a bar (when `enabled`) advances with the time
// elapsed over `expected_seconds`, held at 99% until it ends: for work that
// reports no progress of its own (check's O(N^2) power). Rethrows what `work` throws.
void RunWithTimedProgress(double expected_seconds, bool enabled, const std::function<void()>& work);

}  // namespace lobecast::cli
