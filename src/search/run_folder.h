#pragma once
// The files of a run folder, named in one place: every command that writes a run folder and the
// report that reads one use these names. Every file is written to a temporary name and renamed.
//
//   ranking.csv / .json   one row per candidate (search)
//   model.json                the chosen model's model file (model_<series>.json with several series)
//   fit.json                  the chosen model's fit: estimates, criteria, diagnostics, residual ACF,
//                             and the past (fitted values, residuals, contributions)
//   past.csv                  the chosen model's past: time, actual, fitted, residual, one column per
//                             input's contribution, noise (model/past.h)
//   screen.json               the identification screen of every input
//   forecast.json             the chosen model's forecast from the end of the data, inputs as configured
//                             and with inputs known, plus the recent history
//   backtest.csv              model, mode (production | oracle), origin, horizon, forecast, actual,
//                             bounds per level
//   accuracy.csv              model x mode x horizon metrics (horizon 0 = all horizons)
//   comparisons.csv           Diebold-Mariano tests of the chosen model against the others
//   input_value.csv           the chosen model's backtest score with and without each input
//   revalidation.json         the verdict and evidence of `revalidate`
//   report.html, charts/*.svg the report
//   journal.jsonl             the search journal (resume)
#include <string>

namespace lagsieve::run_files {

inline constexpr const char* kRankingCsv = "ranking.csv";
inline constexpr const char* kRankingJson = "ranking.json";
// The ranking's names before this release (legacy): read by `report`, cleared by a re-run.
inline constexpr const char* kLegacyRankingCsv = "leaderboard.csv";
inline constexpr const char* kLegacyRankingJson = "leaderboard.json";
inline constexpr const char* kFit = "fit.json";
inline constexpr const char* kPast = "past.csv";
inline constexpr const char* kScreen = "screen.json";
inline constexpr const char* kForecast = "forecast.json";
inline constexpr const char* kBacktest = "backtest.csv";
inline constexpr const char* kAccuracy = "accuracy.csv";
inline constexpr const char* kComparisons = "comparisons.csv";
inline constexpr const char* kInputValue = "input_value.csv";
inline constexpr const char* kRevalidation = "revalidation.json";
inline constexpr const char* kReport = "report.html";
inline constexpr const char* kCharts = "charts";
inline constexpr const char* kJournal = "journal.jsonl";

// model.json for a single series, model_<series>.json otherwise.
inline std::string model_file(const std::string& series, bool several) {
  return several ? "model_" + series + ".json" : "model.json";
}
// Per-series files (fit, screen, forecast) carry the series name when a run has several.
inline std::string per_series(const char* name, const std::string& series, bool several) {
  if (!several) return name;
  std::string base(name);
  const auto dot = base.rfind('.');
  return base.substr(0, dot) + "_" + series + base.substr(dot);
}

}  // namespace lagsieve::run_files
