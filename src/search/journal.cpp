#include "search/journal.h"
#include "search/journal_rows.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <fmt/format.h>
#include <fstream>

#include "core/error.h"
#include "forecast/fitted_model.h"

namespace lagsieve {

namespace {

constexpr const char* kJournalFormat = "lagsieve-search-journal";

void write_all(int fd, const std::string& text, const std::filesystem::path& path) {
  size_t done = 0;
  while (done < text.size()) {
    const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      throw InputError(fmt::format("{}: cannot write the journal ({})", path.string(), std::strerror(errno)));
    }
    done += static_cast<size_t>(n);
  }
}

}  // namespace

std::string Journal::row_checksum(const std::string& run_fingerprint, const nlohmann::json& row) {
  nlohmann::json body = row;
  body.erase("check");
  return text_fingerprint(run_fingerprint + "\n" + body.dump());
}

std::vector<nlohmann::json> read_journal_rows(const std::filesystem::path& path,
                                              const std::string& run_fingerprint,
                                              std::vector<std::string>* notes,
                                              bool* has_header) {
  std::vector<nlohmann::json> rows;
  std::ifstream in(path);
  if (!in) return rows;
  std::string line;
  bool header = true;
  int line_no = 0, untrusted = 0;
  std::string first_untrusted;
  while (std::getline(in, line)) {
    ++line_no;
    nlohmann::json j;
    try {
      j = nlohmann::json::parse(line);
    } catch (const nlohmann::json::parse_error&) {
      continue;  // a torn line from a killed run
    }
    if (header) {
      header = false;
      if (!j.is_object() || j.value("format", "") != kJournalFormat ||
          j.value("run", "") != run_fingerprint)
        throw InputError(fmt::format(
            "{}: this journal belongs to another run (different config or data); remove it or "
            "choose another --out folder to start afresh",
            path.string()));
      continue;
    }
    if (!j.is_object() || !j.contains("series") || !j["series"].is_string() ||
        !j.contains("key") || !j["key"].is_string())
      continue;
    if (!j.contains("check") || !j["check"].is_string() ||
        j["check"].get<std::string>() != Journal::row_checksum(run_fingerprint, j)) {
      if (untrusted++ == 0)
        first_untrusted = fmt::format("line {} ({})", line_no, j["key"].get<std::string>());
      continue;
    }
    rows.push_back(std::move(j));
  }
  if (untrusted > 0 && notes)
    notes->push_back(fmt::format(
        "{}: {} row(s) fail their checksum (edited or damaged; the first at {}); those "
        "candidates are fitted again",
        path.string(), untrusted, first_untrusted));
  if (has_header) *has_header = !header;
  return rows;
}

Journal::Journal(std::filesystem::path path, const std::string& run_fingerprint, bool resume)
    : path_(std::move(path)), run_(run_fingerprint) {
  std::filesystem::create_directories(path_.parent_path().empty() ? "." : path_.parent_path());
  bool keep = false;
  if (resume && std::filesystem::exists(path_)) {
    for (auto& j : read_journal_rows(path_, run_fingerprint, &notes_, &keep)) {
      // The key first: the right side of an assignment is evaluated (moved from) before the left.
      std::pair<std::string, std::string> key{j["series"].get<std::string>(),
                                              j["key"].get<std::string>()};
      rows_[std::move(key)] = std::move(j);
    }
  }
  fd_ = ::open(path_.c_str(), O_WRONLY | O_CREAT | O_APPEND | (keep ? 0 : O_TRUNC), 0644);
  if (fd_ < 0)
    throw InputError(fmt::format("{}: cannot open the journal for writing ({})", path_.string(),
                                 std::strerror(errno)));
  if (!keep) {
    nlohmann::json head = {{"format", kJournalFormat}, {"version", 1}, {"run", run_fingerprint}};
    write_all(fd_, head.dump() + "\n", path_);
    ::fsync(fd_);
  } else {
    // A torn last line must not glue onto the next record.
    write_all(fd_, "\n", path_);
  }
}

Journal::~Journal() {
  if (fd_ >= 0) {
    ::fsync(fd_);
    ::close(fd_);
  }
}

const nlohmann::json* Journal::find(const std::string& series, const std::string& key) const {
  const auto it = rows_.find({series, key});
  return it == rows_.end() ? nullptr : &it->second;
}

void Journal::append(const nlohmann::json& row) {
  nlohmann::json checked = row;
  checked["check"] = row_checksum(run_, row);
  const std::string line = checked.dump() + "\n";
  std::lock_guard lock(mutex_);
  write_all(fd_, line, path_);
}

}  // namespace lagsieve
