#pragma once
// The search journal: one JSON line per finished candidate, appended as it finishes, so a run
// that is interrupted (SIGINT, SIGKILL, a crash) resumes where it stopped. The first line names
// the run (a fingerprint of config and data); a journal of another run is refused on resume. A
// torn last line (the process killed mid-write) is ignored.
#include <filesystem>
#include <map>
#include <mutex>
#include <string>

#include <nlohmann/json.hpp>

namespace lagsieve {

class Journal {
 public:
  // resume = false: starts a new journal (replacing any old one). resume = true: loads the rows
  // of an existing journal of the same run (none if the file is absent) and appends after them.
  Journal(std::filesystem::path path, const std::string& run_fingerprint, bool resume);
  ~Journal();
  Journal(const Journal&) = delete;
  Journal& operator=(const Journal&) = delete;

  // The row recorded for (series, key), or nullptr.
  const nlohmann::json* find(const std::string& series, const std::string& key) const;
  // Appends one row (thread-safe); written with one write() so a kill leaves whole lines.
  void append(const nlohmann::json& row);

 private:
  std::filesystem::path path_;
  std::map<std::pair<std::string, std::string>, nlohmann::json> rows_;
  std::mutex mutex_;
  int fd_ = -1;
};

}  // namespace lagsieve
