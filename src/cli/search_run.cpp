#include "cli/search_run.h"

#include <fmt/format.h>
#include <unistd.h>
#include <limits>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <map>
#include <memory>

#include "core/error.h"
#include "core/names.h"
#include "data/load.h"
#include "forecast/fitted_model.h"
#include "forecast/forecast.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "model/past.h"
#include "report/report.h"
#include "screen/screen.h"
#include "search/leaderboard.h"
#include "search/run_dir.h"
#include "search/run_folder.h"
#include "search/shortlist.h"

namespace lagsieve::cli {

std::function<void(int, int)> progress_printer(bool quiet, const std::string& what) {
  if (quiet || !::isatty(STDERR_FILENO)) return {};
  const auto t0 =
      std::make_shared<std::chrono::steady_clock::time_point>(std::chrono::steady_clock::now());
  return [t0, what](int done, int total) {
    const double secs =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - *t0).count();
    const double rate = secs > 0 ? done / secs : 0.0;
    const double left = rate > 0 ? (total - done) / rate : 0.0;
    fmt::print(stderr, "\r{}: {}/{} candidates · {:.0f}/s · {:.0f} s left   ", what, done, total,
               rate, std::max(left, 0.0));
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
  options.parameter_uncertainty = config.forecast.parameter_uncertainty;
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
  // Observed values only: a missing or interpolated value is written as null (never shown as
  // an observation).
  std::vector<double> values;
  for (int t = data.rows() - tail; t < data.rows(); ++t)
    values.push_back(data.observed(t) ? data.target[t] : std::numeric_limits<double>::quiet_NaN());
  j["history"] = {{"time", std::vector<std::string>(data.time.end() - tail, data.time.end())},
                  {"values", values}};
  write_file_atomic(path, j.dump(1) + "\n");
}

namespace {

// Why a series has no usable candidate: the statuses counted and the most frequent message.
std::string no_candidate_reason(const SearchResult& r) {
  std::map<std::string, int> statuses, messages;
  for (const auto& row : r.rows) {
    ++statuses[std::string(to_string(row.status))];
    if (!row.message.empty()) ++messages[row.message];
  }
  std::string counts;
  for (const auto& [status, n] : statuses)
    counts += fmt::format("{}{} {}", counts.empty() ? "" : ", ", n, status);
  std::string why;
  int most = 0;
  for (const auto& [message, n] : messages)
    if (n > most) most = n, why = message;
  return fmt::format(
      "series '{}': no usable candidate among {} ({}){}", r.series, r.rows.size(),
      counts.empty() ? "none fitted" : counts,
      why.empty() ? "" : fmt::format("; most often ({} of {}): {}", most, r.rows.size(), why));
}

}  // namespace

int run_search_command(const SearchArgs& args) {
  const LoadedRun run = load_run(args.config);
  const RunConfig& config = run.config;
  const int threads = checked_threads(args.threads, config.search.threads);
  if (args.out && args.out->empty()) check_run_dir_path("", "--out");
  const std::filesystem::path out = args.out ? std::filesystem::path(*args.out) : config.output.dir;
  const std::string fingerprint = run_fingerprint(config, run.series);
  // The folder belongs to this run: locked, staged beside it and swapped in as a whole at the end.
  RunDir dir(out, {"search", fingerprint, args.resume, args.out ? "--out" : "output.dir"});
  for (const auto& note : dir.notes()) fmt::print(stderr, "lagsieve: note: {}\n", note);
  const std::filesystem::path& stage = dir.staging();
  Journal journal(stage / run_files::kJournal, fingerprint, args.resume);
  for (const auto& note : journal.notes()) fmt::print(stderr, "lagsieve: warning: {}\n", note);

  if (config.outliers.enabled)
    fmt::print(stderr,
               "lagsieve: note: `outliers` is applied by `fit` only in this version; the "
               "search ranks the candidates without detected effects\n");
  SearchOptions options;
  options.threads = threads;
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
    if (config.backtest.enabled && !args.no_backtest && r.has_leader()) {
      if (!args.quiet && ::isatty(STDERR_FILENO))
        fmt::print(stderr, "{}: backtesting the shortlist ...\n", data.target_name);
      backtests.back() = backtest_shortlist(data, config, r, options.threads);
      const auto& bt = backtests.back()->result;
      write_file_atomic(stage / run_files::per_series(run_files::kBacktest, r.series, several),
                        backtest_csv(bt));
      write_file_atomic(stage / run_files::per_series(run_files::kAccuracy, r.series, several),
                        accuracy_csv(bt));
      write_file_atomic(stage / run_files::per_series(run_files::kComparisons, r.series, several),
                        comparisons_csv(bt));
      write_file_atomic(stage / run_files::per_series(run_files::kInputValue, r.series, several),
                        input_value_csv(bt));
    }
    all_rows.insert(all_rows.end(), r.rows.begin(), r.rows.end());
  }
  // Per series: the leader's model file, fit, screen and forecast; then the leaderboard. All of
  // it goes to the staging folder, which replaces the run folder only once everything is written.
  std::vector<std::string> without_model;
  for (size_t k = 0; k < results.size(); ++k) {
    const auto& r = results[k];
    const SeriesData& data = run.series[k];
    const ScreenResult screen = r.screen ? *r.screen : screen_series(data, config);
    write_file_atomic(stage / run_files::per_series(run_files::kScreen, r.series, several),
                      to_json(screen).dump(1) + "\n");
    if (!r.has_leader()) {
      without_model.push_back(no_candidate_reason(r));
      continue;
    }
    FittedModel model = make_fitted_model(r.leader, config, data);
    if (backtests[k] && backtests[k]->result.leader >= 0)
      model.backtest = accuracy_json(backtests[k]->result.models[backtests[k]->result.leader],
                                     backtests[k]->options);
    save_model(stage / run_files::model_file(r.series, several), model);
    auto fit_json = fit_to_json(r.leader);
    fit_json["series"] = r.series;
    fit_json["frequency"] = data.frequency;
    fit_json["missing"] = describe_missing(data);  // what was missing, filled or inserted
    if (!config.seasonal_note.empty()) fit_json["seasonal_note"] = config.seasonal_note;
    const PastFit past = explain_past(data, r.leader.spec, r.leader.params, r.leader.start);
    fit_json["past"] = past_to_json(past);
    write_file_atomic(stage / run_files::per_series(run_files::kPast, r.series, several),
                      past_csv(past));
    write_file_atomic(stage / run_files::per_series(run_files::kFit, r.series, several),
                      fit_json.dump(1) + "\n");
    write_leader_forecast(stage / run_files::per_series(run_files::kForecast, r.series, several),
                          model, data, config);
  }
  write_file_atomic(stage / run_files::kLeaderboardCsv, leaderboard_csv(all_rows, config));
  write_file_atomic(stage / run_files::kLeaderboardJson,
                    leaderboard_json(all_rows, config, results).dump(2) + "\n");

  for (const auto& r : results) {
    int failed = 0;
    for (const auto& row : r.rows) failed += row.rankable() ? 0 : 1;
    fmt::print(
        "{} · {} strategy, {} candidates ({} fitted, {} from the journal, {} not usable) in "
        "{:.1f} s on {} common observations; rows: {}\n",
        r.series, to_string(config.search.strategy), r.rows.size(), r.fitted, r.resumed, failed,
        r.seconds, r.rows.empty() ? 0 : r.rows.front().n_obs, r.sorted_by);
    const size_t shown = std::min<size_t>(r.rows.size(), 10);
    size_t width = 5;  // the model column fits the longest label shown
    for (size_t i = 0; i < shown; ++i) width = std::max(width, r.rows[i].key.size());
    fmt::print("  {:>4}  {:<{}} {:>11} {:>9} {:>8} {:>9}  {}\n", "rank", "model", width,
               to_string(config.search.criterion), "loglik", "LB p", "bt " + config.backtest.score,
               "status");
    for (size_t i = 0; i < shown; ++i) {
      const auto& row = r.rows[i];
      fmt::print("  {:>4}  {:<{}} {:>11.3f} {:>9.2f} {:>8.3f} {:>9}  {}\n", row.rank, row.key,
                 width, row.criterion(config.search.criterion), row.loglik, row.ljung_box_p,
                 std::isfinite(row.backtest_score) ? fmt::format("{:.4f}", row.backtest_score) : "",
                 to_string(row.status));
    }
    if (!r.leader_reason.empty()) fmt::print("  leader: {}\n", r.leader_reason);
    for (const auto& w : r.warnings) fmt::print("  warning: {}\n", w);
  }
  ReportOptions report_options;
  report_options.folder_name = dir.out().filename().string();
  write_report(stage, report_options);
  dir.commit(without_model.empty() ? "complete" : "no_usable_candidate");
  const auto report_path = out / run_files::kReport;
  if (!without_model.empty()) {
    for (const auto& why : without_model)
      fmt::print(stderr,
                 "lagsieve: error: {}; no model file written (the leaderboard in {} lists "
                 "every candidate's status and message)\n",
                 why, out.string());
    fmt::print("run folder: {} (report: {})\n", out.string(), report_path.string());
    return kExitNoModel;
  }
  fmt::print("run folder: {} (report: {})\n", out.string(), report_path.string());
  return kExitOk;
}

}  // namespace lagsieve::cli
