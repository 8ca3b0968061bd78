#pragma once
// A spool for a run-level table of many series: series finish in any order, the table is written
// in key order. Each series' rows are appended to one scratch file as the series ends (its text
// is then released); the spool keeps only the offset and length of each series' rows, and
// writes the table at the end by reading them back in order. Memory: two numbers per series.
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <mutex>
#include <string>
#include <vector>

namespace lagsieve {

class TableSpool {
 public:
  // `scratch`: the scratch file (replaced); `count`: the series, indexed 0..count-1.
  TableSpool(std::filesystem::path scratch, size_t count);
  ~TableSpool();
  TableSpool(const TableSpool&) = delete;
  TableSpool& operator=(const TableSpool&) = delete;

  // Stores the rows of series `index` (thread-safe); a header seen first is kept for the table.
  void put(size_t index, const std::string& rows, const std::string& header = "");
  // Writes the table (header, then the rows of series 0, 1, ...) to `out` atomically, and removes
  // the scratch file. `header` is used when no series gave one.
  void write(const std::filesystem::path& out, const std::string& header = "");

 private:
  std::filesystem::path scratch_;
  std::vector<std::pair<std::uint64_t, std::uint64_t>> where_;  // offset, length per series
  std::string header_;
  std::uint64_t size_ = 0;
  std::FILE* file_ = nullptr;
  std::mutex mutex_;
};

}  // namespace lagsieve
