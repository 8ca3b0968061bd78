#pragma once
// Leaderboard files of a search: CSV for spreadsheets, JSON for pipelines.
#include <filesystem>
#include <string>
#include <vector>

#include "core/config.h"
#include "search/search.h"

namespace lagsieve {

// A CSV field, quoted when it holds a comma, quote or line break.
std::string csv_field(const std::string& text);

std::string leaderboard_csv(const std::vector<CandidateRow>& rows, const RunConfig& config);
nlohmann::json leaderboard_json(const std::vector<CandidateRow>& rows, const RunConfig& config);

}  // namespace lagsieve
