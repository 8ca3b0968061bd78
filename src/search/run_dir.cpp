#include "search/run_dir.h"

#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstdio>
#include <cstring>
#include <ctime>
#include <fstream>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "core/error.h"
#include "io/atomic_file.h"
#include "search/run_folder.h"

namespace lagsieve {

namespace fs = std::filesystem;

namespace {

constexpr const char* kMarkerFormat = "lagsieve-run";
// Nested run folders of other commands that a replaced folder carries over.
const char* const kNested[] = {"backtest", "revalidation"};

std::string now_iso() {
  const std::time_t t = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm tm{};
  ::gmtime_r(&t, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

bool ends_with(const std::string& s, const std::string& tail) {
  return s.size() >= tail.size() && s.compare(s.size() - tail.size(), tail.size(), tail) == 0;
}

// Staging and fallback folders of `out`, siblings so that the swap is a rename.
fs::path sibling(const fs::path& out, const char* what) {
  return out.parent_path() / ("." + out.filename().string() + ".lagsieve-" + what);
}

int count_lines(const fs::path& file) {
  std::ifstream in(file);
  int n = 0;
  for (std::string line; std::getline(in, line);) n += line.empty() ? 0 : 1;
  return n;
}

std::string read_text(int fd) {
  std::string text(512, '\0');
  const ssize_t n = ::pread(fd, text.data(), text.size(), 0);
  text.resize(n > 0 ? static_cast<size_t>(n) : 0);
  return text;
}

// The pid recorded in a lock file's text ("pid 123\n..."), or 0.
long pid_in(const std::string& text) {
  long pid = 0;
  return std::sscanf(text.c_str(), "pid %ld", &pid) == 1 ? pid : 0;
}

// The command that wrote a folder: its marker, else inferred from the files of older versions.
std::string run_kind(const fs::path& dir) {
  const fs::path marker = dir / kRunMarkerFile;
  if (fs::is_regular_file(marker)) {
    try {
      std::ifstream in(marker);
      const auto j = nlohmann::json::parse(in);
      if (j.is_object() && j.value("format", "") == kMarkerFormat) return j.value("command", "");
    } catch (const std::exception&) {
      // an unreadable marker: infer from the files below
    }
  }
  const auto has = [&](const char* name) { return fs::exists(dir / name); };
  if (has(run_files::kRevalidation)) return "revalidate";
  if (has(run_files::kRankingJson) || has(run_files::kLegacyRankingJson) || has(run_files::kJournal) ||
      has(run_files::kFit))
    return "search";
  if (has(run_files::kBacktest) || has(run_files::kAccuracy)) return "backtest";
  return "";
}

// Holds an exclusive flock on `file` (created when absent) or throws naming the holder.
int take_lock(const fs::path& file, const fs::path& folder, const std::string& command,
              const std::string& option, std::vector<std::string>& notes) {
  for (int attempt = 0; attempt < 5; ++attempt) {
    const int fd = ::open(file.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0)
      throw InputError(
          fmt::format("cannot create the lock '{}': {}; choose a folder you can write "
                      "to for {}",
                      file.string(), std::strerror(errno), option));
    if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
      const int err = errno;
      const std::string held = read_text(fd);
      ::close(fd);
      if (err != EWOULDBLOCK)
        throw InputError(fmt::format("cannot lock '{}': {}", file.string(), std::strerror(err)));
      const long pid = pid_in(held);
      throw InputError(fmt::format(
          "the run folder '{}' is in use by another lagsieve run (pid {}); wait for it to finish, "
          "or choose another {}",
          folder.string(), pid > 0 ? std::to_string(pid) : std::string("unknown"), option));
    }
    // The file may have been removed (by a run that finished) between open and flock: then this
    // lock guards nothing and is taken again.
    struct stat held {
    }, now{};
    if (::fstat(fd, &held) != 0 || ::stat(file.c_str(), &now) != 0 || held.st_ino != now.st_ino ||
        held.st_dev != now.st_dev) {
      ::close(fd);
      continue;
    }
    const long old = pid_in(read_text(fd));
    if (old > 0 && old != ::getpid())
      notes.push_back(fmt::format("took over the lock of '{}' left by pid {}, which no longer runs",
                                  folder.string(), old));
    const std::string text =
        fmt::format("pid {}\ncommand {}\nstarted {}\n", ::getpid(), command, now_iso());
    if (::ftruncate(fd, 0) != 0 ||
        ::pwrite(fd, text.data(), text.size(), 0) != static_cast<ssize_t>(text.size())) {
      const int err = errno;
      ::close(fd);
      throw InputError(
          fmt::format("cannot write the lock '{}': {}", file.string(), std::strerror(err)));
    }
    return fd;
  }
  throw InputError(
      fmt::format("cannot lock '{}': it keeps being replaced; is another run "
                  "starting in the same folder?",
                  file.string()));
}

void remove_quietly(const fs::path& p) {
  std::error_code ec;
  fs::remove_all(p, ec);
}

}  // namespace

void check_run_dir_path(const fs::path& out, const std::string& option) {
  if (out.empty())
    throw InputError(
        fmt::format("{} '': the folder name is empty; name the folder the run is "
                    "written to",
                    option));
  const fs::path shown = out;
  fs::path p = fs::absolute(out).lexically_normal();
  if (!p.has_filename()) p = p.parent_path();
  if (p == p.root_path())
    throw InputError(
        fmt::format("{} '{}': a run folder cannot be the root folder; choose a "
                    "folder below it",
                    option, shown.string()));
  std::error_code ec;
  const auto st = fs::status(p, ec);
  if (fs::exists(st) && !fs::is_directory(st))
    throw InputError(
        fmt::format("{} '{}' is a file, not a folder; choose a folder path (the run "
                    "writes several files into it)",
                    option, shown.string()));
  // The first existing ancestor must be a folder the user can write in: the run creates the
  // folder (and its staging sibling) below it.
  for (fs::path a = p.parent_path();; a = a.parent_path()) {
    const auto sa = fs::status(a, ec);
    if (fs::exists(sa)) {
      if (!fs::is_directory(sa))
        throw InputError(
            fmt::format("{} '{}' is below '{}', which is a file, not a folder; "
                        "choose another path",
                        option, shown.string(), a.string()));
      if (::access(a.c_str(), W_OK | X_OK) != 0)
        throw InputError(
            fmt::format("{} '{}': cannot write in '{}' ({}); choose a folder you can "
                        "write to",
                        option, shown.string(), a.string(), std::strerror(errno)));
      break;
    }
    if (a == a.root_path() || a.empty()) break;
  }
  if (fs::is_directory(st) && ::access(p.c_str(), W_OK | X_OK) != 0)
    throw InputError(
        fmt::format("{} '{}': cannot write in the folder ({}); choose a folder you "
                    "can write to",
                    option, shown.string(), std::strerror(errno)));
}

bool is_run_entry(const std::string& name) {
  static const char* const exact[] = {run_files::kRankingCsv,
                                      run_files::kRankingJson,
                                      run_files::kLegacyRankingCsv,
                                      run_files::kLegacyRankingJson,
                                      run_files::kRevalidation,
                                      run_files::kReport,
                                      run_files::kCharts,
                                      run_files::kJournal,
                                      kRunLockFile,
                                      kRunMarkerFile,
                                      "refit_model.json",
                                      "challenger_model.json",
                                      // runs of many series (src/batch/)
                                      "series",
                                      "models",
                                      "forecasts.csv",
                                      "summary.csv",
                                      "summary.json",
                                      "shard.json"};
  for (const char* e : exact)
    if (name == e) return true;
  for (const char* n : kNested)
    if (name == n || name == std::string(".") + n + ".lagsieve-next") return true;
  if (name.find(".tmp.") != std::string::npos) return true;  // a write cut short
  // model.json / model_<series>.json and the per-series files (fit_<series>.json, ...).
  static const char* const per_series[] = {
      "model.json",         run_files::kFit,      run_files::kScreen,      run_files::kForecast,
      run_files::kBacktest, run_files::kAccuracy, run_files::kComparisons, run_files::kInputValue,
      run_files::kPast};
  for (const char* base : per_series) {
    const std::string b(base);
    const auto dot = b.rfind('.');
    const std::string stem = b.substr(0, dot), ext = b.substr(dot);
    if (name == b) return true;
    if (name.rfind(stem + "_", 0) == 0 && ends_with(name, ext) && name.size() > b.size())
      return true;
  }
  return false;
}

RunDir::RunDir(fs::path out, RunDirOptions options) : options_(std::move(options)) {
  check_run_dir_path(out, options_.option);
  out_ = fs::absolute(out).lexically_normal();
  if (!out_.has_filename()) out_ = out_.parent_path();
  const fs::path shown = out;

  std::error_code ec;
  created_out_ = !fs::exists(out_);
  fs::create_directories(out_, ec);
  if (ec)
    throw InputError(
        fmt::format("{} '{}': cannot create the folder: {}; choose a folder you can "
                    "write to",
                    options_.option, shown.string(), ec.message()));
  try {
    lock_fd_ = take_lock(out_ / kRunLockFile, shown, options_.command, options_.option, notes_);

    // What the folder holds must be a run of this command, or nothing.
    for (const auto& entry : fs::directory_iterator(out_)) {
      const std::string name = entry.path().filename().string();
      if (!is_run_entry(name))
        throw InputError(fmt::format(
            "{} '{}' holds '{}', which no lagsieve run writes; a run replaces its folder as a "
            "whole, so choose an empty or new folder (or one an earlier {} wrote)",
            options_.option, shown.string(), name, options_.command));
    }
    const std::string kind = run_kind(out_);
    if (!kind.empty() && kind != options_.command)
      throw InputError(fmt::format(
          "{} '{}' holds the results of a {} run; a {} does not replace them: choose another {}",
          options_.option, shown.string(), kind, options_.command, options_.option));

    staging_ = sibling(out_, "next");
    remove_quietly(sibling(out_, "old"));  // left by a swap cut short (see commit)
    const fs::path staged_journal = staging_ / run_files::kJournal;
    if (options_.resume && fs::is_regular_file(staged_journal)) {
      // An interrupted run: keep its journal, drop whatever else it had begun to write.
      reused_staging_ = true;
      for (const auto& entry : fs::directory_iterator(staging_))
        if (entry.path().filename() != run_files::kJournal) remove_quietly(entry.path());
      notes_.push_back(
          fmt::format("resuming the interrupted run staged in '{}'", staging_.string()));
    } else {
      remove_quietly(staging_);
      fs::create_directories(staging_, ec);
      if (ec)
        throw InputError(
            fmt::format("cannot create the staging folder '{}': {}; choose a folder "
                        "whose parent you can write to",
                        staging_.string(), ec.message()));
      if (options_.resume && fs::is_regular_file(out_ / run_files::kJournal)) {
        fs::copy_file(out_ / run_files::kJournal, staged_journal, ec);
        if (ec)
          throw InputError(fmt::format("cannot copy '{}' to '{}': {}",
                                       (out_ / run_files::kJournal).string(),
                                       staged_journal.string(), ec.message()));
        journal_lines_ = count_lines(staged_journal);
      } else {
        journal_lines_ = 1;  // the header a new journal starts with
      }
    }
    staging_lock_fd_ =
        take_lock(staging_ / kRunLockFile, staging_, options_.command, options_.option, notes_);
  } catch (...) {
    release();
    throw;
  }
}

RunDir::~RunDir() {
  if (!committed_) release();
}

void RunDir::release() {
  // Without a commit the folder stays as it was. The staging folder is kept only when it holds
  // journal rows this run (or an interrupted one) finished, so that --resume can go on.
  const auto unlock = [](int& fd, const fs::path& file) {
    if (fd < 0) return;
    ::unlink(file.c_str());
    ::close(fd);
    fd = -1;
  };
  if (!staging_.empty()) {
    const fs::path journal = staging_ / run_files::kJournal;
    const bool keep =
        reused_staging_ || (fs::is_regular_file(journal) && count_lines(journal) > journal_lines_);
    unlock(staging_lock_fd_, staging_ / kRunLockFile);
    if (!keep) remove_quietly(staging_);
  }
  unlock(lock_fd_, out_ / kRunLockFile);
  std::error_code ec;
  if (created_out_ && fs::is_empty(out_, ec)) fs::remove(out_, ec);
}

void RunDir::commit(const std::string& status) {
  const nlohmann::json marker = {{"format", kMarkerFormat},
                                 {"version", 1},
                                 {"command", options_.command},
                                 {"run", options_.fingerprint},
                                 {"status", status},
                                 {"completed", now_iso()},
                                 {"pid", ::getpid()}};
  write_file_atomic(staging_ / kRunMarkerFile, marker.dump(1) + "\n");
  std::error_code ec;
  for (const char* n : kNested)
    for (const std::string& name : {std::string(n), std::string(".") + n + ".lagsieve-next"})
      if (fs::exists(out_ / name) && !fs::exists(staging_ / name))
        fs::rename(out_ / name, staging_ / name, ec);

  // One atomic exchange where the file system offers it; otherwise two renames (a crash between
  // them leaves the old run in the `-old` sibling and the new one staged).
  if (::renameat2(AT_FDCWD, staging_.c_str(), AT_FDCWD, out_.c_str(), RENAME_EXCHANGE) == 0) {
    remove_quietly(staging_);  // now the previous contents
  } else {
    const fs::path old = sibling(out_, "old");
    remove_quietly(old);
    if (::rename(out_.c_str(), old.c_str()) != 0 || ::rename(staging_.c_str(), out_.c_str()) != 0)
      throw InputError(fmt::format("cannot move the finished run from '{}' into '{}': {}",
                                   staging_.string(), out_.string(), std::strerror(errno)));
    remove_quietly(old);
  }
  committed_ = true;
  // The staging lock is now the folder's; the old lock went with the old contents.
  ::unlink((out_ / kRunLockFile).c_str());
  if (staging_lock_fd_ >= 0) ::close(staging_lock_fd_);
  if (lock_fd_ >= 0) ::close(lock_fd_);
  staging_lock_fd_ = lock_fd_ = -1;
}

}  // namespace lagsieve
