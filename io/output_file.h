// Every file lobecast writes (results, scan files, CSV/TSV, reports, JSON, plots,
// array descriptions) goes through OutputFile: the bytes go to a temporary beside
// the target, which is synced and renamed onto the target only when complete, so
// a failed or interrupted run never leaves a half-written file or clobbers an
// existing one (CONVENTIONS §4).
//
//   - The temporary is a short hidden name in the target's folder
//     (".lobecast-<pid>-<n>.tmp"), so a target name of any valid length works.
//   - It is removed on every failure path, and on SIGINT, SIGTERM and SIGHUP by a
//     handler that unlinks the registered temporaries and re-raises the signal
//     (io/temporary_registry.h).
//   - `-o LINK` on a symbolic link follows the link: the file it points to is
//     replaced atomically in that file's folder; the link itself is kept.
//   - Errors are IoError (exit 1) naming the path given and the system's reason
//     ("No space left on device", "Permission denied").
//
// The output path must only ever name a new or regular file: a device
// (`-o /dev/null`), folder or pipe would be replaced by the rename (as root, that
// destroys the device), so it is refused as bad input instead.
//
// Test hook: when the environment variable LOBECAST_TEST_FAIL_WRITE_AFTER is a
// byte count B, a temporary fails with "No space left on device" as soon as it
// would hold more than B bytes (lobecast's own writes at once, files written by a
// library, such as HDF5, when they are committed). A second hook,
// LOBECAST_TEST_STOP_AT=STAGE, makes the process stop itself (SIGSTOP) at a named
// stage so a test can signal it there without timing: "commit" (an output
// complete in its temporary, before the rename) and "compute" (cli: the outputs
// checked, the work about to start). Only this file reads them.
#pragma once

#include <cstddef>
#include <cstdint>
#include <memory>
#include <ostream>
#include <string>

namespace lobecast {

// Empty when `path` does not exist or is a regular file (or a link to one);
// otherwise why not.
std::string WhyNotReplaceable(const std::string& path);

// Throws InputError (exit 2) naming the path unless WhyNotReplaceable is empty.
void RequireReplaceable(const std::string& path);

// The file an output to `path` really replaces: `path` itself, or for a symbolic
// link the file at the end of its chain of links (which need not exist yet).
std::string ResolveOutputTarget(const std::string& path);

// Checks, before any work starts, that an output can be written at `path`: it is
// replaceable (else InputError, exit 2), and a probe temporary can be created and
// removed in its folder (else IoError naming `path` with the system's reason).
void CheckOutputWritable(const std::string& path);
// The same for a folder that will receive several outputs (--plots).
void CheckFolderWritable(const std::string& folder);

// Streaming (large results): the bytes an unprivileged writer may still use on the
// file system that will hold the output at `path` (statvfs of the target's folder,
// f_bavail x f_frsize). Test hook LOBECAST_TEST_FREE_BYTES=B: B instead, so the
// refusal is testable without a small file system. IoError when statvfs fails.
std::uint64_t AvailableBytesFor(const std::string& path);
// Before the work: throws IoError (exit 1) naming `path` when an output estimated
// at `bytes` (an upper bound) would not fit in AvailableBytesFor(path); the message
// names both sizes.
void CheckOutputFits(const std::string& path, double bytes, const std::string& what);

// The LOBECAST_TEST_STOP_AT hook: stops the process when `stage` is the one named.
void StopForTestAt(const std::string& stage);

class OutputFile {
 public:
  // Refuses a path that is not replaceable (InputError); creates nothing yet.
  // `what` names the output in messages ("the export", "the result").
  OutputFile(const std::string& path, std::string what);
  // Removes the temporary unless committed.
  ~OutputFile();
  OutputFile(const OutputFile&) = delete;
  OutputFile& operator=(const OutputFile&) = delete;

  const std::string& path() const;       // as given: what messages name
  const std::string& temporary() const;  // the temporary's full name
  const std::string& what() const;

  // lobecast's own bytes: the temporary is created on first use. A failed write
  // is remembered and reported by Commit (streams) or thrown at once (Write).
  std::ostream& stream();
  void Write(const void* data, std::size_t size);
  // True when a write has failed (for callbacks that may not throw, e.g. cairo's).
  bool failed() const;

  // For a library that writes the temporary itself (HDF5): marks it as created.
  void CreatedByLibrary();

  // Completes the temporary: flushes, syncs and closes it (for outputs that come
  // in sets: every one complete before any is renamed). Throws like Commit.
  void Complete();
  // Completes the file if not yet done, renames it onto the target and syncs the
  // folder. Throws IoError naming path() with the reason; the temporary is then
  // removed and the target left as it was.
  void Commit();
  // Removes the temporary now; the target is left as it was.
  void Abandon() noexcept;
  // Abandons and throws IoError(path(), "could not write " + what() + ": " + reason).
  [[noreturn]] void Fail(const std::string& reason);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace lobecast
