#include "cli/search_run.h"

#include <fmt/format.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <memory>

#include "core/error.h"
#include "core/names.h"
#include "forecast/fitted_model.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "forecast/forecast.h"
#include "screen/screen.h"
#include "search/leaderboard.h"
#include "search/shortlist.h"
#include "report/report.h"
#include "search/run_folder.h"

namespace lagsieve::cli {

std::function<void(int, int)> progress_printer(bool quiet, const std::string& what) {
  if (quiet || !::isatty(STDERR_FILENO)) return {};
  const auto t0 = std::make_shared<std::chrono::steady_clock::time_point>(std::chrono::steady_clock::now());
  return [t0, what](int done, int total) {
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - *t0).count();
    const double rate = secs > 0 ? done / secs : 0.0;
    const double left = rate > 0 ? (total - done) / rate : 0.0;
    fmt::print(stderr, "\r{}: {}/{} candidates · {:.0f}/s · {:.0f} s left   ", what, done, total, rate,
               std::max(left, 0.0));
    if (done >= total) fmt::print(stderr, "\n");
  };
}

void write_leader_forecast(const std::filesystem::path& path, const FittedModel& model,
                           const SeriesData& data, const RunConfig& config) {
  ForecastOptions options;
  options.horizon = config.forecast.horizon > 0 ? config.forecast.horizon
                    : config.backtest.enabled   ? config.backtest.horizon
                                                : 12;
  options.levels = config.forecast.levels;
  nlohmann::json j;
  j["series"] = data.target_name;
  j["horizon"] = options.horizon;
  try {
    j["forecast"] = forecast_to_json(forecast(model, data, {}, options));
  } catch (const InputError& e) {
    // Inputs declared known need future values the search does not have.
    j["forecast"] = nullptr;
    j["note"] = std::string("no forecast from the end of the data: ") + e.what();
  }
  const int tail = std::min(data.rows(), 4 * options.horizon);
  j["history"] = {{"time", std::vector<std::string>(data.time.end() - tail, data.time.end())},
                  {"values", std::vector<double>(data.target.end() - tail, data.target.end())}};
  write_file_atomic(path, j.dump(1) + "\n");
}

int run_search_command(const SearchArgs& args) {
  const LoadedRun run = load_run(args.config);
  const RunConfig& config = run.config;
  const std::filesystem::path out = args.out.empty() ? config.output.dir : std::filesystem::path(args.out);
  std::filesystem::create_directories(out);
  Journal journal(out / run_files::kJournal, run_fingerprint(config, run.series), args.resume);

  if (config.outliers.enabled)
    fmt::print(stderr, "lagsieve: note: `outliers` is applied by `fit` only in this version; the "
                       "search ranks the candidates without detected effects\n");
  SearchOptions options;
  options.threads = args.threads.value_or(config.search.threads);
  options.journal = &journal;

  std::vector<CandidateRow> all_rows;
  std::vector<SearchResult> results;
  std::vector<std::optional<ShortlistBacktest>> backtests;
  const bool several = run.series.size() > 1;
  for (const auto& data : run.series) {
    options.progress = progress_printer(args.quiet, data.target_name);
    results.push_back(run_search(data, config, options));
    auto& r = results.back();
    backtests.emplace_back();
    if (config.backtest.enabled && !args.no_backtest) {
      if (!args.quiet && ::isatty(STDERR_FILENO))
        fmt::print(stderr, "{}: backtesting the shortlist ...\n", data.target_name);
      backtests.back() = backtest_shortlist(data, config, r, options.threads);
      const auto& bt = backtests.back()->result;
      write_file_atomic(out / run_files::per_series(run_files::kBacktest, r.series, several), backtest_csv(bt));
      write_file_atomic(out / run_files::per_series(run_files::kAccuracy, r.series, several), accuracy_csv(bt));
      write_file_atomic(out / run_files::per_series(run_files::kComparisons, r.series, several),
                        comparisons_csv(bt));
      write_file_atomic(out / run_files::per_series(run_files::kInputValue, r.series, several),
                        input_value_csv(bt));
    }
    all_rows.insert(all_rows.end(), r.rows.begin(), r.rows.end());
  }
  // Per series: the leader's model file, fit, screen and forecast; then the leaderboard. Each
  // file is written atomically, so an interrupted run leaves whole files or none.
  for (size_t k = 0; k < results.size(); ++k) {
    const auto& r = results[k];
    const SeriesData& data = run.series[k];
    const ScreenResult screen = r.screen ? *r.screen : screen_series(data, config);
    write_file_atomic(out / run_files::per_series(run_files::kScreen, r.series, several),
                      to_json(screen).dump(1) + "\n");
    if (!r.has_leader()) continue;
    FittedModel model = make_fitted_model(r.leader, config, data);
    if (backtests[k] && backtests[k]->result.leader >= 0)
      model.backtest = accuracy_json(backtests[k]->result.models[backtests[k]->result.leader],
                                     backtests[k]->options);
    save_model(out / run_files::model_file(r.series, several), model);
    auto fit_json = fit_to_json(r.leader);
    fit_json["series"] = r.series;
    write_file_atomic(out / run_files::per_series(run_files::kFit, r.series, several),
                      fit_json.dump(1) + "\n");
    write_leader_forecast(out / run_files::per_series(run_files::kForecast, r.series, several),
                          model, data, config);
  }
  write_file_atomic(out / run_files::kLeaderboardCsv, leaderboard_csv(all_rows, config));
  write_file_atomic(out / run_files::kLeaderboardJson, leaderboard_json(all_rows, config).dump(2) + "\n");

  for (const auto& r : results) {
    int failed = 0;
    for (const auto& row : r.rows) failed += row.rankable() ? 0 : 1;
    fmt::print("{} · {} strategy, {} candidates ({} fitted, {} from the journal, {} not usable) in "
               "{:.1f} s; ranked by {} on {} common observations\n",
               r.series, to_string(config.search.strategy), r.rows.size(), r.fitted, r.resumed, failed,
               r.seconds, to_string(config.search.criterion), r.rows.empty() ? 0 : r.rows.front().n_obs);
    const size_t shown = std::min<size_t>(r.rows.size(), 10);
    size_t width = 5;  // the model column fits the longest label shown
    for (size_t i = 0; i < shown; ++i) width = std::max(width, r.rows[i].key.size());
    fmt::print("  {:>4}  {:<{}} {:>11} {:>9} {:>8} {:>9}  {}\n", "rank", "model", width,
               to_string(config.search.criterion), "loglik", "LB p", "backtest", "status");
    for (size_t i = 0; i < shown; ++i) {
      const auto& row = r.rows[i];
      fmt::print("  {:>4}  {:<{}} {:>11.3f} {:>9.2f} {:>8.3f} {:>9}  {}\n", row.rank, row.key, width,
                 row.criterion(config.search.criterion), row.loglik, row.ljung_box_p,
                 std::isfinite(row.backtest_score) ? fmt::format("{:.4f}", row.backtest_score) : "",
                 to_string(row.status));
    }
  }
  const auto report = write_report(out);
  fmt::print("run folder: {} (report: {})\n", out.string(), report.path.string());
  return kExitOk;
}

}  // namespace lagsieve::cli
