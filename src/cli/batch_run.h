#pragma once
// `lagsieve search` and `validate` on a long-format panel (data.series_key): the thin front of
// src/batch/.
#include "cli/search_run.h"

namespace lagsieve::cli {

// The search of every series into one run folder; exit 0 when every series has a model, 5 when
// some series failed (the others finished), 4 when none has a model.
int run_batch_search_command(const SearchArgs& args, const RunConfig& config);

// `merge OUT SHARD_DIR...`: the shard folders joined into one run folder (exit codes as search).
int merge_command(const std::string& out, const std::vector<std::string>& shard_dirs);

// `validate` of a panel: every series checked, every bad one reported; exit 2 when any is bad.
int validate_panel_command(const RunConfig& config, const std::vector<std::string>& only);

}  // namespace lagsieve::cli
