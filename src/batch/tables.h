#pragma once
// The run-level tables of a run of many series, one long table each with the series column
// first: the forecasts of every series' chosen model, and rows read back from summary.json (merge
// rebuilds a whole run's files from its shards' summaries).
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "batch/series_job.h"
#include "core/config.h"
#include "forecast/forecast.h"

namespace lagsieve {

inline constexpr const char* kForecastsCsv = "forecasts.csv";  // run level of a panel
inline constexpr const char* kModelsFolder = "models";         // models/<safe name>.json

// series,time,horizon,point,mean, lower_L and upper_L per level, then the same bounds with every
// input's future taken as known (known_lower_L, known_upper_L).
std::string forecasts_header(const std::vector<double>& levels);
std::string forecast_rows(const std::string& series, const ForecastResult& f);

// `rows` (CSV rows, one a line) with the series as a first column.
std::string with_series_column(const std::string& series, const std::string& rows);

// The header of the ranking table of every series (the ranking's; it has the series column).
std::string ranking_header(const RunConfig& config);

// A summary row as summary_json writes it, read back.
SeriesSummary summary_from_json(const nlohmann::json& j);

}  // namespace lagsieve
