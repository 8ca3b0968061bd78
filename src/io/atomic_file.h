#pragma once
// Durable file output. Results are written to a temporary name in the same folder and renamed,
// so a crash or a kill never leaves a half-written result behind; journals append whole lines
// and flush them to disk, so a resumed run sees every line that was reported done.
#include <filesystem>
#include <functional>
#include <optional>
#include <string>
#include <string_view>

namespace lagsieve {

// Writes `content` to `path` atomically: temporary file beside it, fsync, rename over `path`.
// Creates missing parent folders. Throws InputError naming the path when the write fails.
void write_file_atomic(const std::filesystem::path& path, std::string_view content);

// The same for content too large to hold at once: `next_chunk` is called until it returns
// nullopt, each chunk written as it comes (e.g. one table of many series concatenated).
void write_file_atomic_chunks(const std::filesystem::path& path,
                              const std::function<std::optional<std::string>()>& next_chunk);

// Appends `line` plus '\n' to `path` (created when absent) and fsyncs before returning.
// Throws InputError naming the path when the write fails.
void append_line_durable(const std::filesystem::path& path, std::string_view line);

}  // namespace lagsieve
