#pragma once
// A run folder that belongs to one run. A command that writes a run folder (search, backtest,
// revalidate) opens it through RunDir, which
//   - refuses a path that cannot be a folder (empty, a file, below a file, not writable) before
//     anything is written;
//   - takes the folder's lock (`lagsieve.lock`, an flock held for the whole run and holding the
//     owner's pid): a second run into a folder in use is refused naming that pid; the lock of a
//     process that died is free again (the kernel drops flocks) and is taken over;
//   - stages every file of the run in a sibling folder `.<name>.lagsieve-next`, and on commit()
//     swaps it with the folder as a whole (one atomic exchange where the file system has one), so
//     the folder holds the files of exactly one run: nothing of an earlier run survives beside
//     them, and a kill before the swap leaves the earlier run intact;
//   - writes the completion marker `run.json` (command, run fingerprint, time, status) last;
//   - refuses to replace a folder that holds files no run writes, or a run of another command;
//   - keeps the journal semantics of --resume: the journal lives in the staging folder while the
//     run works, so a killed run is resumed from it; a resume of a completed run continues from
//     the folder's own journal.
// Nested run folders of other commands (`backtest/`, `revalidation/`) are carried over.
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

namespace lagsieve {

inline constexpr const char* kRunLockFile = "lagsieve.lock";
inline constexpr const char* kRunMarkerFile = "run.json";

struct RunDirOptions {
  std::string command;           // "search", "backtest", "revalidate": the kind of run
  std::string fingerprint;       // what identifies the run (recorded in the marker)
  bool resume = false;           // continue an interrupted or completed run of the same fingerprint
  std::string option = "--out";  // how the user named the folder, for messages
};

// Throws InputError naming the path and what to do when `out` cannot be a run folder: empty, an
// existing file, below a file, or in a place the user cannot write. Creates nothing.
void check_run_dir_path(const std::filesystem::path& out, const std::string& option);

// True for names a run writes into its folder (run files, per-series variants, charts/, the lock,
// the marker, the journal, temporary files of an interrupted write, nested run folders).
bool is_run_entry(const std::string& name);

class RunDir {
 public:
  // Checks the path, takes the lock and prepares the staging folder. Throws InputError (nothing
  // written) when the path is unusable, the folder is in use, or it holds what this run must not
  // replace.
  RunDir(std::filesystem::path out, RunDirOptions options);
  ~RunDir();
  RunDir(const RunDir&) = delete;
  RunDir& operator=(const RunDir&) = delete;

  const std::filesystem::path& out() const { return out_; }
  // Where every file of this run is written until commit().
  const std::filesystem::path& staging() const { return staging_; }
  // Messages for the user (a stale lock taken over, an interrupted run resumed).
  const std::vector<std::string>& notes() const { return notes_; }

  // Writes the marker (status: "complete" or a short word such as "no_usable_candidate"), swaps
  // the staged folder in and removes what the folder held before. The lock is released.
  void commit(const std::string& status = "complete");

 private:
  void release();

  std::filesystem::path out_;
  std::filesystem::path staging_;
  RunDirOptions options_;
  std::vector<std::string> notes_;
  int lock_fd_ = -1;          // lock in out_
  int staging_lock_fd_ = -1;  // lock in staging_ (becomes out_'s on the swap)
  bool created_out_ = false;
  bool committed_ = false;
  bool reused_staging_ = false;  // resuming the journal of an interrupted run
  int journal_lines_ = 0;        // journal lines at the start (rows beyond them are this run's)
};

}  // namespace lagsieve
