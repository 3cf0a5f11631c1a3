#include "cli/progress_bar.h"

#include <algorithm>
#include <cstdio>
#include <future>
#include <string>

#include <unistd.h>

namespace lobecast::cli {

ProgressBar::ProgressBar(bool enabled)
    : enabled_(enabled && isatty(STDERR_FILENO) == 1), start_(std::chrono::steady_clock::now()) {}

ProgressBar::~ProgressBar() { Finish(); }

void ProgressBar::Update(double fraction) {
  if (!enabled_) return;
  const double elapsed =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
  if (!drawn_ && elapsed < 1.0) return;
  const int percent = static_cast<int>(fraction * 100.0);
  if (percent == last_percent_) return;
  last_percent_ = percent;
  constexpr int kWidth = 40;
  const int filled = percent * kWidth / 100;
  std::string bar(static_cast<std::size_t>(filled), '#');
  bar.append(static_cast<std::size_t>(kWidth - filled), '.');
  std::fprintf(stderr, "\r  computing [%s] %3d%%  %.1f s", bar.c_str(), percent, elapsed);
  std::fflush(stderr);
  drawn_ = true;
}

void ProgressBar::Finish() {
  if (drawn_) {
    std::fprintf(stderr, "\r%72s\r", "");
    std::fflush(stderr);
    drawn_ = false;
  }
}

void RunWithTimedProgress(double expected_seconds, bool enabled,
                          const std::function<void()>& work) {
  if (!enabled || !(expected_seconds > 0)) {
    work();
    return;
  }
  ProgressBar bar(true);
  const auto start = std::chrono::steady_clock::now();
  std::future<void> done = std::async(std::launch::async, work);
  while (done.wait_for(std::chrono::milliseconds(200)) != std::future_status::ready) {
    const double elapsed =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    bar.Update(std::min(0.99, elapsed / expected_seconds));
  }
  bar.Finish();
  done.get();
}

}  // namespace lobecast::cli
