#pragma once
// Shards for batch schedulers: `search --shard K/N` runs only shard K of N of a panel's series
// into a folder of its own, and `merge` joins the N shard folders into the folder an unsharded
// run writes (identical tables except the timing columns).
#include <filesystem>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "batch/panel_report.h"
#include "core/config.h"
#include "data/panel.h"

namespace lagsieve {

inline constexpr const char* kShardFile = "shard.json";  // in a shard's run folder

struct ShardSpec {
  int index = 1;  // K, 1-based
  int count = 1;  // N
};

// Parses "K/N" (1 <= K <= N <= 100000); InputError naming `option` otherwise.
ShardSpec parse_shard(const std::string& text, const std::string& option);

// The shard (0-based) of every part: a pure function of the series keys and their row counts.
// Series are taken by rows (most first, ties by key) and each goes to the shard with the fewest
// rows so far (ties: the lowest shard), so shards are balanced by rows.
std::vector<int> shard_plan(const std::vector<PanelPart>& parts, int shards);

// Keeps the parts of shard `spec` (parts stay sorted by key).
std::vector<PanelPart> select_shard(std::vector<PanelPart> parts, const ShardSpec& spec);

// The fingerprint of shard `spec` of the run `panel_fingerprint` (its journal and marker).
std::string shard_fingerprint(const std::string& panel_fingerprint, const ShardSpec& spec);

// shard.json: the run fingerprint of the whole panel, K, N, the series of the shard, the page
// settings and the panel's sample (so the merge picks the pages a whole run would), and the
// config (its text and path: the merged panel report needs it).
nlohmann::json shard_json(const std::string& panel_fingerprint, const ShardSpec& spec,
                          const std::vector<PanelPart>& parts, const PanelReportOptions& pages,
                          const std::vector<std::string>& sample, const RunConfig& config);

// Checks that `shards` are the completed shards 1..N of one run, each once (InputError naming the
// folder otherwise: not a completed shard, another config or data, a missing or duplicated
// shard, a series in two shards). Returns the panel fingerprint; fills the folders in shard
// order and the summary rows of every shard when asked.
std::string check_shards(const std::vector<std::filesystem::path>& shards,
                         std::vector<std::filesystem::path>* in_order = nullptr,
                         nlohmann::json* summaries = nullptr);

// Joins shard folders into `folder` (a run folder being staged) as an unsharded run writes it:
// models/, the ranking, forecasts and accuracy tables with the rows of every series in key order,
// summary.csv/json, the journal (every shard's rows, checked and signed for the whole run), the
// panel report, and series/<name>/ of the series that get a page in the whole panel. Throws InputError naming the folder for a folder that is not a
// completed shard, shards of another config or data, a missing or duplicated shard, or a series
// in two shards. Returns the panel fingerprint.
std::string merge_shards(const std::filesystem::path& folder,
                         const std::vector<std::filesystem::path>& shards);

}  // namespace lagsieve
