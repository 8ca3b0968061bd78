#pragma once
// Durable file output. Results are written to a temporary name in the same folder and renamed,
// so a crash or a kill never leaves a half-written result behind; journals append whole lines
// and flush them to disk, so a resumed run sees every line that was reported done.
#include <filesystem>
#include <string_view>

namespace lagsieve {

// Writes `content` to `path` atomically: temporary file beside it, fsync, rename over `path`.
// Creates missing parent folders. Throws InputError naming the path when the write fails.
void write_file_atomic(const std::filesystem::path& path, std::string_view content);

// Appends `line` plus '\n' to `path` (created when absent) and fsyncs before returning.
// Throws InputError naming the path when the write fails.
void append_line_durable(const std::filesystem::path& path, std::string_view line);

}  // namespace lagsieve
