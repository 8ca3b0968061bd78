#pragma once
// Leaderboard files of a search: CSV for spreadsheets, JSON for pipelines.
#include <filesystem>
#include <string>
#include <vector>

#include "core/config.h"
#include "search/search.h"

namespace lagsieve {

std::string leaderboard_csv(const std::vector<CandidateRow>& rows, const RunConfig& config);
// With `results`, also per series what the rows are sorted by, why the leader was chosen and the
// run's warnings (`series_notes`), which the report shows.
nlohmann::json leaderboard_json(const std::vector<CandidateRow>& rows, const RunConfig& config,
                                const std::vector<SearchResult>& results = {});

}  // namespace lagsieve
