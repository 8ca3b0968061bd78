#pragma once
// Leaderboard files of a search: CSV for spreadsheets, JSON for pipelines.
#include <filesystem>
#include <string>
#include <vector>

#include "core/config.h"
#include "search/search.h"

namespace lagsieve {

std::string leaderboard_csv(const std::vector<CandidateRow>& rows, const RunConfig& config);
nlohmann::json leaderboard_json(const std::vector<CandidateRow>& rows, const RunConfig& config);

}  // namespace lagsieve
