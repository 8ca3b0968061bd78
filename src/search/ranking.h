#pragma once
// Ranking files of a search: CSV for spreadsheets, JSON for pipelines.
#include <filesystem>
#include <string>
#include <vector>

#include "core/config.h"
#include "search/search.h"

namespace lagsieve {

std::string ranking_csv(const std::vector<CandidateRow>& rows, const RunConfig& config);
// With `results`, also per series what the rows are sorted by, why the model was chosen and the
// run's warnings (`series_notes`), which the report shows.
nlohmann::json ranking_json(const std::vector<CandidateRow>& rows, const RunConfig& config,
                                const std::vector<SearchResult>& results = {});

}  // namespace lagsieve
