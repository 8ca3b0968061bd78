#include "io/atomic_file.h"

#include <fcntl.h>
#include <unistd.h>

#include <fmt/format.h>
#include <atomic>
#include <cerrno>
#include <cstring>
#include <functional>
#include <optional>
#include <string>

#include "core/error.h"

namespace lagsieve {
namespace {

[[noreturn]] void fail(const std::filesystem::path& path, const char* action, int err) {
  throw InputError(
      fmt::format("cannot {} '{}': {}; check that the folder exists, is writable "
                  "and the disk is not full",
                  action, path.string(), std::strerror(err)));
}

// Writes all of `data`, retrying short writes and interrupted calls.
bool write_all(int fd, std::string_view data) {
  while (!data.empty()) {
    const ssize_t n = ::write(fd, data.data(), data.size());
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    data.remove_prefix(static_cast<size_t>(n));
  }
  return true;
}

void ensure_parent(const std::filesystem::path& path) {
  const auto parent = path.parent_path();
  if (parent.empty()) return;
  std::error_code ec;
  std::filesystem::create_directories(parent, ec);
  if (ec) fail(parent, "create folder", ec.value());
}

// Flushes the folder entry so the rename itself survives a power loss; best effort.
void sync_folder(const std::filesystem::path& path) {
  const auto parent = path.parent_path().empty() ? std::filesystem::path(".") : path.parent_path();
  const int fd = ::open(parent.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return;
  ::fsync(fd);
  ::close(fd);
}

// Temporary file beside `path`, filled by `body` (false: a write failed), fsync, rename.
void write_atomic_with(const std::filesystem::path& path, const std::function<bool(int)>& body) {
  ensure_parent(path);
  // Unique per process and call, so concurrent writers (threads or processes) never share it.
  static std::atomic<unsigned> counter{0};
  auto tmp = path;
  tmp += fmt::format(".tmp.{}.{}", ::getpid(), counter.fetch_add(1));
  const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) fail(tmp, "create", errno);
  bool ok = true;
  try {
    ok = body(fd);
  } catch (...) {
    ::close(fd);
    ::unlink(tmp.c_str());
    throw;
  }
  if (!ok || ::fsync(fd) != 0) {
    const int err = errno;
    ::close(fd);
    ::unlink(tmp.c_str());
    fail(tmp, "write", err);
  }
  if (::close(fd) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(tmp, "write", err);
  }
  if (::rename(tmp.c_str(), path.c_str()) != 0) {
    const int err = errno;
    ::unlink(tmp.c_str());
    fail(path, "replace", err);
  }
  sync_folder(path);
}

}  // namespace

void write_file_atomic(const std::filesystem::path& path, std::string_view content) {
  write_atomic_with(path, [&](int fd) { return write_all(fd, content); });
}

void write_file_atomic_chunks(const std::filesystem::path& path,
                              const std::function<std::optional<std::string>()>& next_chunk) {
  write_atomic_with(path, [&](int fd) {
    for (auto chunk = next_chunk(); chunk; chunk = next_chunk())
      if (!write_all(fd, *chunk)) return false;
    return true;
  });
}

void append_line_durable(const std::filesystem::path& path, std::string_view line) {
  ensure_parent(path);
  const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_APPEND | O_CLOEXEC, 0644);
  if (fd < 0) fail(path, "open", errno);
  // One write call per line: with O_APPEND the line lands whole, after any other writer's.
  std::string buffer(line);
  buffer.push_back('\n');
  if (!write_all(fd, buffer) || ::fsync(fd) != 0) {
    const int err = errno;
    ::close(fd);
    fail(path, "append to", err);
  }
  ::close(fd);
}

}  // namespace lagsieve
