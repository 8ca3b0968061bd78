#include "batch/spool.h"

#include <fmt/format.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <optional>

#include "core/error.h"
#include "io/atomic_file.h"

namespace lagsieve {

TableSpool::TableSpool(std::filesystem::path scratch, size_t count)
    : scratch_(std::move(scratch)), where_(count, {0, 0}) {
  file_ = std::fopen(scratch_.c_str(), "w+b");
  if (!file_)
    throw InputError(fmt::format("{}: cannot write a scratch file of the run ({})",
                                 scratch_.string(), std::strerror(errno)));
}

TableSpool::~TableSpool() {
  if (file_) {
    std::fclose(file_);
    std::error_code ec;
    std::filesystem::remove(scratch_, ec);
  }
}

void TableSpool::put(size_t index, const std::string& rows, const std::string& header) {
  std::lock_guard lock(mutex_);
  if (header_.empty()) header_ = header;
  if (rows.empty() || index >= where_.size()) return;
  if (std::fseek(file_, 0, SEEK_END) != 0 ||
      std::fwrite(rows.data(), 1, rows.size(), file_) != rows.size())
    throw InputError(fmt::format("{}: cannot write a scratch file of the run ({})",
                                 scratch_.string(), std::strerror(errno)));
  where_[index] = {size_, rows.size()};
  size_ += rows.size();
}

void TableSpool::write(const std::filesystem::path& out, const std::string& header) {
  std::lock_guard lock(mutex_);
  std::fflush(file_);
  size_t next = 0;
  bool head = false;
  std::string chunk;
  write_file_atomic_chunks(out, [&]() -> std::optional<std::string> {
    if (!head) {
      head = true;
      return header_.empty() ? header : header_;
    }
    while (next < where_.size()) {
      const auto [offset, length] = where_[next++];
      if (length == 0) continue;
      chunk.resize(length);
      if (std::fseek(file_, static_cast<long>(offset), SEEK_SET) != 0 ||
          std::fread(chunk.data(), 1, length, file_) != length)
        throw InputError(fmt::format("{}: cannot read a scratch file of the run back",
                                     scratch_.string()));
      return chunk;
    }
    return std::nullopt;
  });
  std::fclose(file_);
  file_ = nullptr;
  std::error_code ec;
  std::filesystem::remove(scratch_, ec);
}

}  // namespace lagsieve
