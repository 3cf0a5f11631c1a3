#include "io/output_file.h"

#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/statvfs.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <optional>
#include <streambuf>
#include <system_error>
#include <vector>

#include "io/input_error.h"
#include "io/io_error.h"
#include "io/temporary_registry.h"

namespace lobecast {
namespace {

namespace fs = std::filesystem;

// LOBECAST_TEST_FAIL_WRITE_AFTER (see the header): the byte limit, if set.
std::optional<std::uint64_t> InjectedLimit() {
  const char* v = std::getenv("LOBECAST_TEST_FAIL_WRITE_AFTER");
  if (v == nullptr || *v == '\0') return std::nullopt;
  char* end = nullptr;
  const unsigned long long n = std::strtoull(v, &end, 10);
  if (end == nullptr || *end != '\0') return std::nullopt;
  return n;
}

// ".lobecast-<pid>-<n>.tmp" in the folder of `target`: short (NAME_MAX is no
// concern), hidden, and unique within the process.
std::string TemporaryBeside(const std::string& target) {
  static std::atomic<unsigned> counter{0};
  const std::string name = ".lobecast-" + std::to_string(static_cast<long>(::getpid())) + "-" +
                           std::to_string(counter.fetch_add(1)) + ".tmp";
  return (fs::path(target).parent_path() / name).string();
}

std::string FolderOf(const std::string& path) {
  const fs::path parent = fs::path(path).parent_path();
  return parent.empty() ? std::string(".") : parent.string();
}

// Best effort: the rename itself is durable only once the folder is synced.
void SyncFolder(const std::string& path) {
  const int fd = ::open(FolderOf(path).c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return;
  ::fsync(fd);
  ::close(fd);
}

// Creates and removes a probe temporary in `folder`; the reason when that fails.
std::string ProbeFolder(const std::string& folder) {
  const std::string probe = TemporaryBeside((fs::path(folder) / "x").string());
  const int slot = RegisterTemporary(probe);
  const int fd = ::open(probe.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0600);
  const int err = errno;
  if (fd >= 0) {
    ::close(fd);
    ::unlink(probe.c_str());
  }
  UnregisterTemporary(slot);
  return fd >= 0 ? std::string() : std::strerror(err);
}

}  // namespace

std::uint64_t AvailableBytesFor(const std::string& path) {
  const char* v = std::getenv("LOBECAST_TEST_FREE_BYTES");
  if (v != nullptr && *v != '\0') {
    char* end = nullptr;
    const unsigned long long n = std::strtoull(v, &end, 10);
    if (end != nullptr && *end == '\0') return n;
  }
  const std::string folder = FolderOf(ResolveOutputTarget(path));
  struct statvfs fs_info {};
  if (::statvfs(folder.c_str(), &fs_info) != 0) {
    throw IoError(path, "cannot read the free space of " + folder + ": " + std::strerror(errno));
  }
  return static_cast<std::uint64_t>(fs_info.f_bavail) *
         static_cast<std::uint64_t>(fs_info.f_frsize);
}

void CheckOutputFits(const std::string& path, double bytes, const std::string& what) {
  const std::uint64_t free = AvailableBytesFor(path);
  if (bytes <= static_cast<double>(free)) return;
  char text[160];
  std::snprintf(text, sizeof text,
                "%s would need up to %.3g GB, but the file system holding it "
                "has %.3g GB free",
                what.c_str(), bytes / 1e9, static_cast<double>(free) / 1e9);
  throw IoError(path, std::string(text) + " (free space, or use a coarser grid)");
}

void StopForTestAt(const std::string& stage) {
  const char* v = std::getenv("LOBECAST_TEST_STOP_AT");
  if (v != nullptr && stage == v) ::raise(SIGSTOP);
}

std::string WhyNotReplaceable(const std::string& path) {
  std::error_code ec;
  const auto status = fs::symlink_status(path, ec);
  if (ec || !fs::exists(status)) return "";
  if (fs::is_regular_file(status)) return "";
  if (fs::is_symlink(status)) {
    const auto target = fs::status(path, ec);
    if (!ec && (fs::is_regular_file(target) || !fs::exists(target))) return "";
  }
  return "exists and is not a regular file (a device, folder or pipe); lobecast writes "
         "output only to new or regular files";
}

void RequireReplaceable(const std::string& path) {
  const std::string why = WhyNotReplaceable(path);
  if (!why.empty()) throw InputError(SourceLocation{path}, why);
}

std::string ResolveOutputTarget(const std::string& path) {
  fs::path p = path;
  std::error_code ec;
  // Linux's own limit on links followed in one lookup (path_resolution(7)).
  for (int hops = 0; hops < 40; ++hops) {
    if (!fs::is_symlink(fs::symlink_status(p, ec)) || ec) return p.string();
    const fs::path next = fs::read_symlink(p, ec);
    if (ec) return p.string();
    p = next.is_absolute() ? next : p.parent_path() / next;
  }
  throw IoError(path, "too many levels of symbolic links");
}

void CheckOutputWritable(const std::string& path) {
  RequireReplaceable(path);
  const std::string target = ResolveOutputTarget(path);
  const std::string why = ProbeFolder(FolderOf(target));
  if (!why.empty()) {
    throw IoError(path, "cannot write in the folder " + FolderOf(target) + ": " + why);
  }
}

void CheckFolderWritable(const std::string& folder) {
  const std::string why = ProbeFolder(folder);
  if (!why.empty()) throw IoError(folder, "cannot write in this folder: " + why);
}

// --- OutputFile -------------------------------------------------------------------

namespace {

// The stream's buffer: bytes go to OutputFile::Write's file descriptor; a failure
// is remembered (errno) and later writes are dropped.
class FdBuffer : public std::streambuf {
 public:
  explicit FdBuffer(OutputFile& file) : file_(file), buffer_(1 << 16) {
    setp(buffer_.data(), buffer_.data() + buffer_.size());
  }
  bool Drain() {
    const std::size_t n = static_cast<std::size_t>(pptr() - pbase());
    setp(buffer_.data(), buffer_.data() + buffer_.size());
    if (n == 0 || file_.failed()) return !file_.failed();
    try {
      file_.Write(buffer_.data(), n);
    } catch (...) {
      return false;  // failed() now says so; Commit reports the reason
    }
    return true;
  }

 protected:
  int_type overflow(int_type ch) override {
    if (!Drain()) return traits_type::eof();
    if (!traits_type::eq_int_type(ch, traits_type::eof())) {
      *pptr() = traits_type::to_char_type(ch);
      pbump(1);
    }
    return traits_type::not_eof(ch);
  }
  int sync() override { return Drain() ? 0 : -1; }

 private:
  OutputFile& file_;
  std::vector<char> buffer_;
};

}  // namespace

struct OutputFile::Impl {
  std::string path;
  std::string target;
  std::string temporary;
  std::string what;
  int slot = -1;
  int fd = -1;
  bool exists = false;    // the temporary has been created
  bool complete = false;  // written, synced and closed
  bool committed = false;
  bool dead = false;  // failed: abandoned, every later call throws
  int error = 0;      // errno of the first failed write
  std::uint64_t written = 0;
  std::optional<std::uint64_t> limit = InjectedLimit();
  std::unique_ptr<FdBuffer> buffer;
  std::unique_ptr<std::ostream> stream;
};

OutputFile::OutputFile(const std::string& path, std::string what)
    : impl_(std::make_unique<Impl>()) {
  RequireReplaceable(path);
  impl_->path = path;
  impl_->target = ResolveOutputTarget(path);
  impl_->temporary = TemporaryBeside(impl_->target);
  impl_->what = std::move(what);
  impl_->slot = RegisterTemporary(impl_->temporary);
}

OutputFile::~OutputFile() { Abandon(); }

const std::string& OutputFile::path() const { return impl_->path; }
const std::string& OutputFile::temporary() const { return impl_->temporary; }
const std::string& OutputFile::what() const { return impl_->what; }
bool OutputFile::failed() const { return impl_->error != 0; }

void OutputFile::CreatedByLibrary() { impl_->exists = true; }

std::ostream& OutputFile::stream() {
  if (!impl_->stream) {
    impl_->buffer = std::make_unique<FdBuffer>(*this);
    impl_->stream = std::make_unique<std::ostream>(impl_->buffer.get());
  }
  return *impl_->stream;
}

void OutputFile::Write(const void* data, std::size_t size) {
  Impl& m = *impl_;
  if (m.dead || m.error != 0)
    Fail(m.error != 0 ? std::strerror(m.error) : "an earlier step failed");
  if (m.fd < 0) {
    m.fd = ::open(m.temporary.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
    if (m.fd < 0) {
      m.error = errno;
      Fail(std::strerror(m.error));
    }
    m.exists = true;
  }
  if (m.limit && m.written + size > *m.limit) {
    m.error = ENOSPC;
    Fail(std::strerror(m.error));
  }
  const char* p = static_cast<const char*>(data);
  while (size > 0) {
    const ssize_t n = ::write(m.fd, p, size);
    if (n < 0) {
      if (errno == EINTR) continue;
      m.error = errno;
      Fail(std::strerror(m.error));
    }
    p += n;
    size -= static_cast<std::size_t>(n);
    m.written += static_cast<std::uint64_t>(n);
  }
}

void OutputFile::Complete() {
  Impl& m = *impl_;
  if (m.dead) Fail(m.error != 0 ? std::strerror(m.error) : "an earlier step failed");
  if (m.complete || m.committed) return;
  if (m.stream) {
    m.stream->flush();
    m.buffer->Drain();
  }
  if (m.error != 0) Fail(std::strerror(m.error));
  if (!m.exists) Write("", 0);  // an empty output is still a file
  int fd = m.fd;
  if (fd < 0) {
    // Written by a library: the injected limit applies to the finished size.
    struct stat st {};
    if (::stat(m.temporary.c_str(), &st) != 0) Fail(std::strerror(errno));
    if (m.limit && static_cast<std::uint64_t>(st.st_size) > *m.limit) Fail(std::strerror(ENOSPC));
    fd = ::open(m.temporary.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) Fail(std::strerror(errno));
  }
  m.fd = -1;
  // Durable data before the name points at it; close() can report a late error.
  const bool synced = ::fsync(fd) == 0;
  const int sync_err = errno;
  const bool closed = ::close(fd) == 0;
  const int close_err = errno;
  if (!synced) Fail(std::strerror(sync_err));
  if (!closed) Fail(std::strerror(close_err));
  m.complete = true;
  StopForTestAt("commit");
}

void OutputFile::Commit() {
  Impl& m = *impl_;
  Complete();
  if (m.committed) return;
  if (::rename(m.temporary.c_str(), m.target.c_str()) != 0) Fail(std::strerror(errno));
  m.committed = true;
  UnregisterTemporary(m.slot);
  m.slot = -1;
  SyncFolder(m.target);
}

void OutputFile::Abandon() noexcept {
  if (!impl_ || impl_->committed) return;
  Impl& m = *impl_;
  if (m.fd >= 0) ::close(m.fd);
  m.fd = -1;
  if (m.exists) ::unlink(m.temporary.c_str());
  m.exists = false;
  UnregisterTemporary(m.slot);
  m.slot = -1;
}

void OutputFile::Fail(const std::string& reason) {
  AwaitSignalIfInterrupted();  // a signal removed the temporary: it ends the process
  Abandon();
  impl_->dead = true;
  throw IoError(impl_->path, "could not write " + impl_->what + ": " + reason);
}

}  // namespace lobecast
