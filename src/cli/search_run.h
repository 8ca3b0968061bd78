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

namespace lagsieve::cli {

struct SearchArgs {
  std::string config;
  std::optional<std::string> out;  // absent: output.dir of the config
  bool resume = false;
  bool quiet = false;
  std::optional<int> threads;
  bool no_backtest = false;
  std::vector<std::string> series;   // --series: run only these (keys, or target columns)
  std::optional<std::string> shard;  // --shard K/N (long-format panels)
};

// Progress line on stderr, only when stderr is a terminal and not --quiet.
std::function<void(int, int)> progress_printer(bool quiet, const std::string& what);

int run_search_command(const SearchArgs& args);

}  // namespace lagsieve::cli
