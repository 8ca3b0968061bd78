#pragma once
// The search run behind `lagsieve search` (also the challenger search of `revalidate`).
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "batch/series_job.h"
#include "cli/common.h"
#include "forecast/fitted_model.h"
#include "search/search.h"
#include "search/shortlist.h"

namespace lagsieve::cli {

struct SearchArgs {
  std::string config;
  std::optional<std::string> out;  // absent: output.dir of the config
  bool resume = false;
  bool quiet = false;
  std::optional<int> threads;
  bool no_backtest = false;
  bool json = false;  // --json: one JSON object on stdout instead of the readable summary
  std::vector<std::string> series;   // --series: run only these (keys, or target columns)
  std::optional<std::string> shard;  // --shard K/N (long-format panels)
  int pages_worst = 10;   // --pages-worst: series listed per "worst" table and given a page
  int pages_sample = 5;   // --pages-sample: further series, spread over the keys, given a page
};

// Progress line on stderr, only when stderr is a terminal and not --quiet.
std::function<void(int, int)> progress_printer(bool quiet, const std::string& what);

int run_search_command(const SearchArgs& args);

struct SearchComputation;
// The --json object of a search of one series or a few target columns (docs in README.md).
nlohmann::json search_json(const SearchArgs& args, const LoadedRun& run, const SearchComputation& c,
                           const std::filesystem::path& out);

// The same on a run already loaded (the Python module loads its data from a DataFrame).
int run_search_in_folder(const LoadedRun& run, const SearchArgs& args);

// What a search computes before anything is written: per series the ranked result and the
// shortlist backtest (absent when off or without a chosen model), and every row in series order.
struct SearchComputation {
  std::vector<SearchResult> results;
  std::vector<std::optional<ShortlistBacktest>> backtests;
  std::vector<CandidateRow> all_rows;
};

// Runs the search (and the shortlist backtest unless `backtest` is false) of every series.
// `options.progress` empty: the terminal progress line unless `quiet`.
SearchComputation compute_search(const LoadedRun& run, const SearchOptions& options, bool backtest,
                                 bool quiet);

// Writes every file of the run folder but the journal, the report and the marker into `stage`;
// returns why each series without a usable candidate has none.
std::vector<std::string> write_search_files(const std::filesystem::path& stage,
                                            const LoadedRun& run, const SearchComputation& c);

// The model file of series k's chosen model (with its backtest accuracy when there was one).
FittedModel chosen_model(const LoadedRun& run, const SearchComputation& c, size_t k);

}  // namespace lagsieve::cli
