#pragma once
// A run of many series from one long-format file (`data.series_key`): every series is loaded,
// checked, searched, backtested and forecast on its own (series_job.h), in parallel with TBB. A
// bad series is a summary row with its status and reason; the others go on. Series and
// candidates share one pool of `threads` workers; results do not depend on the thread count.
//
// The run folder stays a few files however many series there are (docs/run-folder.md): one
// ranking table, forecasts.csv and accuracy.csv across series (series column first), the chosen
// models in models/<name>.json, summary.csv/json, the journal, the panel report; a folder
// series/<name>/ (the single-series files and a report page) only for the series that get a page
// (panel_report.h: the worst and a sample).
//
// Memory: the file is indexed by series (byte spans, data/panel.h), a series' rows are read and
// parsed when it runs, and its rows, fits and backtest are released when its job ends; its table
// rows go to scratch files at once (spool.h). What stays per series is its summary row.
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include "batch/panel_report.h"
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
  std::filesystem::path folder;   // the run folder (or its staging); "" = no files written
  Journal* journal = nullptr;     // one journal for the run, keyed by series
  PanelReportOptions pages;       // which series get a folder and report page
  // The sample of series given a page: sample_keys over the keys of the whole panel (a shard
  // takes the panel's, so a merge finds the pages it needs). Empty: those of the parts run.
  std::vector<std::string> sample;
  // Called after every finished candidate and series (serialised; from worker threads).
  std::function<void(const BatchProgress&)> progress;
  // Set (from any thread) to stop: series not started are skipped, running searches stop
  // between candidates (their shortlist backtests between origins), and run_batch throws
  // Cancelled (core/error.h).
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

// Folder of a series relative to the run folder: series/<name>; its model file: models/<name>.json.
std::string series_folder(const std::string& name);
std::string series_model_file(const std::string& name);

// Loads and checks one series' rows (InputError for a bad series, its message without the key);
// the series is named by its key and the config's seasonal defaults are resolved for it in
// `config`.
SeriesData load_panel_series(RunConfig& config, const PanelPart& part);

// Checks every series as `search` would before fitting, without fitting: one row per series,
// ok (rows and time range filled) or bad_data with the reason.
std::vector<SeriesSummary> check_panel(const RunConfig& config,
                                       const std::vector<PanelPart>& parts);

// Runs every series of `parts` (consumed: each part is released when its series is done). With a
// folder: the models, the ranking, forecasts and accuracy tables, and the folders of the series
// with a page (the summary rows say which: `folder`; the others' folders are removed).
BatchResult run_batch(const RunConfig& config, std::vector<PanelPart> parts,
                      const BatchOptions& options);

// Writes summary.csv and summary.json of `rows` into `folder`.
void write_batch_tables(const std::filesystem::path& folder, const BatchResult& result);

// What identifies a batch run for its journal and marker: the config's fingerprint over the
// data file's bytes (from the parts' index), the key column and the series selected.
std::string batch_fingerprint(const RunConfig& config, const std::vector<PanelPart>& parts,
                              const std::vector<std::string>& only);

}  // namespace lagsieve
