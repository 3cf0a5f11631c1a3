#include "io/input/text_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <system_error>

namespace lobecast {

std::string SizeText(std::uint64_t bytes) {
  constexpr std::uint64_t kMiB = std::uint64_t{1} << 20;
  if (bytes % (kMiB * 1024) == 0) return std::to_string(bytes / (kMiB * 1024)) + " GiB";
  if (bytes % kMiB == 0) return std::to_string(bytes / kMiB) + " MiB";
  return std::to_string(bytes) + " bytes";
}

namespace {

// Closes a file descriptor on every path.
struct Descriptor {
  int fd;
  ~Descriptor() {
    if (fd >= 0) ::close(fd);
  }
};

}  // namespace

std::optional<std::string> ReadTextFile(const std::string& path, std::string* why,
                                        std::uint64_t max_bytes) {
  auto fail = [&](std::string reason) -> std::optional<std::string> {
    if (why) *why = std::move(reason);
    return std::nullopt;
  };
  std::error_code ec;
  const auto status = std::filesystem::status(path, ec);
  // Only a missing file is "no such file"; a permission or other error says itself.
  if (ec && ec != std::errc::no_such_file_or_directory) return fail(ec.message());
  if (!std::filesystem::exists(status)) return fail("no such file");
  if (std::filesystem::is_directory(status)) return fail("a directory");
  // O_NONBLOCK: opening a FIFO must not wait for a writer; what was opened is
  // checked on the descriptor (the name may have changed since the status above).
  Descriptor in{::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC)};
  if (in.fd < 0) return fail(std::string("cannot open (") + std::strerror(errno) + ")");
  struct stat st {};
  if (::fstat(in.fd, &st) != 0)
    return fail(std::string("cannot open (") + std::strerror(errno) + ")");
  if (S_ISDIR(st.st_mode)) return fail("a directory");
  if (!S_ISREG(st.st_mode)) {
    // /dev/zero or a pipe never ends: read only regular files.
    return fail("not a regular file (a device, pipe or socket)");
  }
  const auto too_large = [&](std::uint64_t size) {
    return fail("larger than " + SizeText(max_bytes) + " (" + std::to_string(size) +
                " bytes), the most lobecast reads from such a file");
  };
  if (static_cast<std::uint64_t>(st.st_size) > max_bytes)
    return too_large(static_cast<std::uint64_t>(st.st_size));
  const int flags = ::fcntl(in.fd, F_GETFL);
  if (flags >= 0) ::fcntl(in.fd, F_SETFL, flags & ~O_NONBLOCK);
  std::string text;
  text.reserve(static_cast<std::size_t>(st.st_size));
  char block[1 << 16];
  while (true) {
    const ssize_t got = ::read(in.fd, block, sizeof block);
    if (got < 0) {
      if (errno == EINTR) continue;
      return fail(std::string("read error (") + std::strerror(errno) + ")");
    }
    if (got == 0) break;
    // A file that grows while it is read (or a /proc file, whose size says 0).
    if (static_cast<std::uint64_t>(got) > max_bytes - text.size())
      return too_large(text.size() + static_cast<std::uint64_t>(got));
    text.append(block, static_cast<std::size_t>(got));
  }
  return text;
}

bool IsHdf5(std::string_view bytes) {
  return bytes.substr(0, 8) == std::string_view("\x89HDF\r\n\x1a\n", 8);
}

}  // namespace lobecast
