#pragma once
// A run of many series from one long-format file (`data.series_key`): every series is loaded,
// checked, searched, backtested and forecast on its own (series_job.h), in parallel with TBB, and
// its files go to `series/<safe name>/` of the run folder. A bad series is a summary row with its
// status and reason; the others go on. Series and candidates share one pool of `threads`
// workers; results do not depend on the thread count. Memory: the file's cells are split by
// series once, and each series' rows, fits and backtest are released when its job ends.
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include "batch/series_job.h"
#include "core/config.h"
#include "data/panel.h"
#include "search/journal.h"

namespace lagsieve {

inline constexpr const char* kSeriesFolder = "series";  // series/<safe name>/ in a run folder
inline constexpr const char* kSummaryCsv = "summary.csv";
inline constexpr const char* kSummaryJson = "summary.json";

struct BatchProgress {
  int series_done = 0;
  int series_total = 0;
  long long candidates_done = 0;  // finished candidates over all series so far
};

struct BatchOptions {
  int threads = 0;                // workers for series and candidates together; 0 all cores
  bool backtest = true;           // run the config's backtest when it has one
  std::vector<std::string> only;  // run only these series keys (`--series`); empty = all
  std::filesystem::path folder;   // the run folder (or its staging); "" = no files written
  Journal* journal = nullptr;     // one journal for the run, keyed by series
  // Called after every finished candidate and series (serialised; from worker threads).
  std::function<void(const BatchProgress&)> progress;
  // Set (from any thread) to stop: series not started are skipped, running searches stop
  // between candidates, and run_batch throws Cancelled (core/error.h).
  const std::atomic<bool>* cancel = nullptr;
};

struct BatchResult {
  std::vector<SeriesSummary> series;  // sorted by key
  int count(SeriesStatus s) const;
  bool all_ok() const { return count(SeriesStatus::ok) == static_cast<int>(series.size()); }
};

// The series of a long-format config: the file split by key, filtered by `only` (every name in
// it must be a key of the file: InputError naming the unknown one, with a suggestion).
std::vector<PanelPart> load_panel(const RunConfig& config, const std::vector<std::string>& only);

// Folder of a series relative to the run folder: series/<safe name>.
std::string series_folder(const std::string& key);

// Loads and checks one series' rows (InputError for a bad series, its message without the key);
// the series is named by its key and the config's seasonal defaults are resolved for it in
// `config`.
SeriesData load_panel_series(RunConfig& config, const PanelPart& part);

// Checks every series as `search` would before fitting, without fitting: one row per series,
// ok (rows and time range filled) or bad_data with the reason.
std::vector<SeriesSummary> check_panel(const RunConfig& config,
                                       const std::vector<PanelPart>& parts);

// Runs every series of `parts` (consumed: each part's rows are released when its series is done).
BatchResult run_batch(const RunConfig& config, std::vector<PanelPart> parts,
                      const BatchOptions& options);

// Writes the run-level tables of a batch into `folder`: summary.csv, summary.json and the
// leaderboard.csv of all series (concatenated from the series' folders, streamed).
void write_batch_tables(const std::filesystem::path& folder, const BatchResult& result);

// What identifies a batch run for its journal and marker: the config's fingerprint over the
// data file's text, the key column and the series selected.
std::string batch_fingerprint(const RunConfig& config, const std::vector<std::string>& only);

}  // namespace lagsieve
