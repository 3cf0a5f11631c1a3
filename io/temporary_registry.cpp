#include "io/temporary_registry.h"

#include <signal.h>
#include <unistd.h>

#include <array>
#include <atomic>
#include <cerrno>
#include <climits>
#include <cstring>
#include <mutex>

namespace lobecast {
namespace {

// Fixed storage: the handler may not allocate. A run writes at most a handful of
// outputs at a time (synth: two; compute --plots: one at a time).
constexpr int kSlots = 32;
enum : int { kFree = 0, kFilling = 1, kReady = 2 };

struct Slot {
  std::atomic<int> state{kFree};
  char path[PATH_MAX];
};
std::array<Slot, kSlots> slots;

constexpr std::array<int, 3> kSignals = {SIGINT, SIGTERM, SIGHUP};

std::atomic<bool> interrupted{false};

void RemoveTemporariesAndReraise(int sig) {
  const int saved_errno = errno;
  interrupted.store(true);
  for (Slot& s : slots) {
    if (s.state.load(std::memory_order_acquire) == kReady) ::unlink(s.path);
  }
  struct sigaction dfl {};
  dfl.sa_handler = SIG_DFL;
  sigemptyset(&dfl.sa_mask);
  ::sigaction(sig, &dfl, nullptr);
  sigset_t unblock;
  sigemptyset(&unblock);
  sigaddset(&unblock, sig);
  ::sigprocmask(SIG_UNBLOCK, &unblock, nullptr);
  ::raise(sig);
  errno = saved_errno;  // only reached if the default action does not end the process
}

void InstallHandler() {
  for (int sig : kSignals) {
    struct sigaction old {};
    if (::sigaction(sig, nullptr, &old) != 0) continue;
    // Leave alone a signal the process ignores (nohup) or that someone else handles.
    if ((old.sa_flags & SA_SIGINFO) != 0 || old.sa_handler != SIG_DFL) continue;
    struct sigaction sa {};
    sa.sa_handler = RemoveTemporariesAndReraise;
    sigemptyset(&sa.sa_mask);
    for (int other : kSignals) sigaddset(&sa.sa_mask, other);
    ::sigaction(sig, &sa, nullptr);
  }
}

}  // namespace

int RegisterTemporary(const std::string& path) {
  static std::once_flag installed;
  std::call_once(installed, InstallHandler);
  if (path.size() >= PATH_MAX) return -1;
  for (int k = 0; k < kSlots; ++k) {
    int expected = kFree;
    if (slots[k].state.compare_exchange_strong(expected, kFilling, std::memory_order_acq_rel)) {
      std::memcpy(slots[k].path, path.c_str(), path.size() + 1);
      slots[k].state.store(kReady, std::memory_order_release);
      return k;
    }
  }
  return -1;
}

void AwaitSignalIfInterrupted() {
  while (interrupted.load()) ::pause();
}

void UnregisterTemporary(int slot) {
  if (slot >= 0 && slot < kSlots) slots[slot].state.store(kFree, std::memory_order_release);
}

}  // namespace lobecast
