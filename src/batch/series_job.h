#pragma once
// The work of one series in a run of many: search, shortlist backtest, the chosen model's model file,
// fit, screen and forecast, written into the series' own folder; the outcome is one summary row.
// Nothing a series holds outlives its job except that row, so a run's memory does not grow with
// the number of series. A series that fails (bad data, no usable candidate, a numerical failure)
// is a row with a status and the reason; the job never throws for it.
//
// Also the per-series entry point of other fronts (the command line, language bindings): plain
// options in, a plain result out.
#include <filesystem>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "core/config.h"
#include "core/series.h"
#include "forecast/fitted_model.h"
#include "forecast/forecast.h"
#include "search/journal.h"
#include "search/search.h"

namespace lagsieve {

enum class SeriesStatus {
  ok,                   // a chosen model, its model file and forecast
  no_usable_candidate,  // every candidate failed or was rejected: no model file
  bad_data,             // the series failed a data check (too short, constant, all missing, ...)
  failed,               // a numerical or internal failure while working on it
};
const char* to_string(SeriesStatus s);

struct SeriesSummary;

// A series' rows of the run-level tables of a panel (CSV rows without the header; the headers
// are those of ranking_header, forecasts_header and accuracy_header in batch/tables.h).
struct SeriesTables {
  std::string ranking;    // every candidate, ranked, with the series column
  std::string forecasts;  // the chosen model's forecast from the end of the data
  std::string accuracy;   // backtest accuracy of the shortlist and benchmarks
  std::string accuracy_header;  // its header (set with the rows; it depends on the levels)
};

struct SeriesJobOptions {
  int threads = 0;               // candidate workers: 0 all cores, kInCallerArena in a batch
  bool backtest = true;          // run the config's backtest when it has one
  Journal* journal = nullptr;    // shared by every series of a run (keyed by series)
  std::filesystem::path folder;  // the series' files go here; "" = none written
  // Asked once the series' outcome is known: false = the folder is not written (a run of many
  // series writes the folders only of the series that may get a report page). Unset: written.
  std::function<bool(const SeriesSummary&)> keep_folder;
  std::filesystem::path model_file;  // the chosen model's file also goes here ("" = not)
  SeriesTables* tables = nullptr;    // filled with the series' rows of the run-level tables
  std::function<void(int done, int total)> progress;  // per finished candidate
  const std::atomic<bool>* cancel = nullptr;  // set: Cancelled is thrown (search.h), no row
};

// The chosen model's dynamic structure for one configured input (included = false: left out).
struct ChosenInput {
  std::string name;
  bool included = false;
  int delay = 0, numerator = 0, denominator = 0;  // b, s, r
};

struct SeriesSummary {
  std::string series;  // the key (or the target column of a wide panel)
  std::string folder;  // its page folder relative to the run folder (series/<name>), or ""
  std::string model;   // its model file relative to the run folder (models/<name>.json), or ""
  SeriesStatus status = SeriesStatus::failed;
  std::string reason;  // empty when ok
  int rows = 0;
  std::string first_time, last_time;
  int candidates = 0, fitted = 0, resumed = 0, usable = 0;
  std::string chosen;               // model label ("" without a chosen model)
  std::vector<ChosenInput> inputs;  // config order
  int ar = 0, ma = 0, seasonal_ar = 0, seasonal_ma = 0;
  bool constant = false;
  static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  double criterion = kNaN;        // the chosen model's search criterion (config.search.criterion)
  double ljung_box_p = kNaN;      // the chosen model's Ljung-Box p at the largest lag tested
  double backtest_score = kNaN;   // the chosen model's backtest score (config.backtest.score)
  double benchmark_score = kNaN;  // the best model without inputs, same origins
  double benchmark_p = kNaN;      // Diebold-Mariano p (two-sided, horizon 1), chosen model vs it
  std::vector<Warning> warnings;
  double seconds = 0.0;  // timing: differs between runs

  bool beats_benchmark(double level = 0.05) const {
    return backtest_score < benchmark_score && benchmark_p < level;
  }
};

// Runs one series (already loaded and checked) as described above.
SeriesSummary run_series_job(const SeriesData& data, const RunConfig& config,
                             const SeriesJobOptions& options);

// The row of a series that never reached the search (its data failed a check).
SeriesSummary bad_series_summary(const std::string& series, const std::string& folder,
                                 const std::string& reason);

// Why a search found no usable candidate: the statuses counted and the most frequent message.
std::string no_candidate_reason(const SearchResult& r);

// The chosen model's forecast from the end of the data (horizon: forecast.horizon, else the backtest's,
// else 12); nullopt with the reason in `note` when it cannot be made (inputs declared known have
// no future values in a search).
std::optional<ForecastResult> chosen_forecast(const FittedModel& model, const SeriesData& data,
                                              const RunConfig& config, std::string* note);

// forecast.json: the chosen model's forecast from the end of the data plus the recent history.
void write_chosen_forecast(const std::filesystem::path& path, const FittedModel& model,
                           const SeriesData& data, const RunConfig& config);

// The summary table: CSV (one row per series; `seconds` is the only timing column) and JSON.
std::string summary_csv(const std::vector<SeriesSummary>& rows);
nlohmann::json summary_json(const std::vector<SeriesSummary>& rows);

}  // namespace lagsieve
