#pragma once
// The search journal: one JSON line per finished candidate, appended as it finishes, so a run
// that is interrupted (SIGINT, SIGKILL, a crash) resumes where it stopped. The first line names
// the run (a fingerprint of what determines the candidates' results); a journal of another run
// is refused on resume. A torn last line (the process killed mid-write) is ignored. Every row
// carries a checksum over the run fingerprint and its own content: a row edited by hand, damaged,
// or copied from another run's journal fails it, is not trusted, and its candidate is fitted again.
#include <filesystem>
#include <map>
#include <mutex>
#include <string>
#include <vector>

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
  // Appends one row (thread-safe) with its checksum; written with one write() so a kill leaves
  // whole lines.
  void append(const nlohmann::json& row);
  // What the load found worth telling (rows failing their checksum, fitted again).
  const std::vector<std::string>& notes() const { return notes_; }

  // The checksum `append` gives a row: over the run fingerprint and the row without "check".
  static std::string row_checksum(const std::string& run_fingerprint, const nlohmann::json& row);

 private:
  std::filesystem::path path_;
  std::string run_;
  std::vector<std::string> notes_;
  std::map<std::pair<std::string, std::string>, nlohmann::json> rows_;
  std::mutex mutex_;
  int fd_ = -1;
};

}  // namespace lagsieve
