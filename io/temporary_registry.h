// The temporaries being written, so that SIGINT, SIGTERM and SIGHUP remove them:
// the handler unlinks every registered name with async-signal-safe calls only
// (unlink, sigaction, sigprocmask, raise), restores the default action and
// re-raises the signal, so the process still dies of it (exit status 128 + signal
// in a shell). A signal the process ignored (nohup) stays ignored. Used by
// io/output_file.h; nothing else registers names.
#pragma once

#include <string>

namespace lobecast {

// Registers `path` (installing the handler on first use); returns a slot for
// UnregisterTemporary, or -1 when every slot is taken (then the name is only
// removed on the ordinary failure paths). Thread-safe.
int RegisterTemporary(const std::string& path);
// Forgets a slot (after the rename or the removal). -1 is ignored.
void UnregisterTemporary(int slot);

// The handler may run on another thread (OpenMP's) while the main thread goes on
// for a moment: when a write fails because the handler removed its temporary, the
// writer calls this instead of reporting the failure, and waits (pause) for the
// re-raised signal to end the process. Returns at once when no signal came.
void AwaitSignalIfInterrupted();

}  // namespace lobecast
