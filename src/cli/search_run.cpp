#include "cli/search_run.h"

#include "cli/batch_run.h"
#include "io/config.h"

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
#include "outliers/detect.h"
#include "report/report.h"
#include "screen/screen.h"
#include "search/ranking.h"
#include "search/run_dir.h"
#include "search/run_folder.h"
#include "search/search_outliers.h"
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

namespace {

// The detected set under the ranking table: where it came from, each effect, the cost.
void print_search_outliers(const SearchOutliers& o) {
  if (!o.note.empty()) {
    fmt::print("  detected effects: none ({})\n", o.note);
    return;
  }
  if (o.effects.empty()) {
    fmt::print("  detected effects: none above the critical |t| {:.2f} (on {})\n", o.critical,
               o.detected_on);
    return;
  }
  fmt::print(
      "  detected effects (on {}, critical |t| {:.2f}; shared by the {} shortlisted candidates, "
      "{:.3f} s; sizes from the chosen model's fit):\n",
      o.detected_on, o.critical, o.shortlisted, o.seconds);
  for (const auto& e : o.effects) fmt::print("    {}\n", describe_effect(e));
}

}  // namespace

SearchComputation compute_search(const LoadedRun& run, const SearchOptions& base, bool backtest,
                                 bool quiet) {
  const RunConfig& config = run.config;
  SearchComputation c;
  SearchOptions options = base;
  for (const auto& data : run.series) {
    if (!options.progress) options.progress = progress_printer(quiet, data.target_name);
    c.results.push_back(run_search(data, config, options));
    options.progress = base.progress;
    auto& r = c.results.back();
    c.backtests.emplace_back();
    check_cancel(options.cancel);  // and before every origin of the shortlist backtest
    if (config.backtest.enabled && backtest && r.has_chosen()) {
      if (!quiet && ::isatty(STDERR_FILENO))
        fmt::print(stderr, "{}: backtesting the shortlist ...\n", data.target_name);
      c.backtests.back() =
          backtest_shortlist(data, config, r, options.threads, options.cancel);
    }
    c.all_rows.insert(c.all_rows.end(), r.rows.begin(), r.rows.end());
  }
  return c;
}

std::vector<std::string> write_search_files(const std::filesystem::path& stage,
                                            const LoadedRun& run, const SearchComputation& c) {
  const RunConfig& config = run.config;
  const auto& results = c.results;
  const bool several = run.series.size() > 1;
  for (size_t k = 0; k < results.size(); ++k) {
    if (!c.backtests[k]) continue;
    const auto& r = results[k];
    const auto& bt = c.backtests[k]->result;
    write_file_atomic(stage / run_files::per_series(run_files::kBacktest, r.series, several),
                      backtest_csv(bt));
    write_file_atomic(stage / run_files::per_series(run_files::kAccuracy, r.series, several),
                      accuracy_csv(bt));
    write_file_atomic(stage / run_files::per_series(run_files::kComparisons, r.series, several),
                      comparisons_csv(bt));
    write_file_atomic(stage / run_files::per_series(run_files::kInputValue, r.series, several),
                      input_value_csv(bt));
  }
  // Per series: the chosen model's model file, fit, screen and forecast; then the ranking.
  std::vector<std::string> without_model;
  for (size_t k = 0; k < results.size(); ++k) {
    const auto& r = results[k];
    const SeriesData& data = run.series[k];
    const ScreenResult screen = r.screen ? *r.screen : screen_series(data, config);
    write_file_atomic(stage / run_files::per_series(run_files::kScreen, r.series, several),
                      to_json(screen).dump(1) + "\n");
    if (!r.has_chosen()) {
      without_model.push_back(fmt::format("series '{}': {}", r.series, no_candidate_reason(r)));
      continue;
    }
    const FittedModel model = chosen_model(run, c, k);
    const SeriesData fitted = search_data(data, r);  // with the detected effects' columns
    save_model(stage / run_files::model_file(r.series, several), model);
    auto fit_json = fit_to_json(r.chosen);
    fit_json["series"] = r.series;
    fit_json["frequency"] = data.frequency;
    fit_json["missing"] = describe_missing(data);  // what was missing, filled or inserted
    if (!config.seasonal_note.empty()) fit_json["seasonal_note"] = config.seasonal_note;
    if (r.outliers) fit_json["outliers"] = search_outliers_json(*r.outliers, data);
    const PastFit past = explain_past(fitted, r.chosen.spec, r.chosen.params, r.chosen.start);
    fit_json["past"] = past_to_json(past);
    write_file_atomic(stage / run_files::per_series(run_files::kPast, r.series, several),
                      past_csv(past));
    write_file_atomic(stage / run_files::per_series(run_files::kFit, r.series, several),
                      fit_json.dump(1) + "\n");
    write_chosen_forecast(stage / run_files::per_series(run_files::kForecast, r.series, several),
                          model, fitted, config);
  }
  write_file_atomic(stage / run_files::kRankingCsv, ranking_csv(c.all_rows, config));
  write_file_atomic(stage / run_files::kRankingJson,
                    ranking_json(c.all_rows, config, results).dump(2) + "\n");
  return without_model;
}

FittedModel chosen_model(const LoadedRun& run, const SearchComputation& c, size_t k) {
  // With detected effects: the data with their columns, and the chosen model's set in its model file.
  const SearchResult& r = c.results[k];
  FittedModel model = make_fitted_model(
      r.chosen, run.config, search_data(run.series[k], r),
      r.rows.empty() ? std::vector<OutlierEffect>{} : row_effects(r.rows.front(), r));
  if (c.backtests[k] && c.backtests[k]->result.chosen >= 0)
    model.backtest = accuracy_json(c.backtests[k]->result.models[c.backtests[k]->result.chosen],
                                   c.backtests[k]->options);
  return model;
}

namespace {

// A path in the JSON: the file's path when it exists, else null.
nlohmann::json existing(const std::filesystem::path& p) {
  std::error_code ec;
  return std::filesystem::exists(p, ec) ? nlohmann::json(std::filesystem::absolute(p).string())
                                        : nlohmann::json(nullptr);
}

}  // namespace

nlohmann::json search_json(const SearchArgs& args, const LoadedRun& run, const SearchComputation& c,
                           const std::filesystem::path& out) {
  const RunConfig& config = run.config;
  const bool several = run.series.size() > 1;
  nlohmann::json series = nlohmann::json::array();
  nlohmann::json by_status = {{"ok", 0}, {"no_usable_candidate", 0}};
  int candidates = 0, fitted = 0, resumed = 0, failed_total = 0;
  for (size_t k = 0; k < c.results.size(); ++k) {
    const auto& r = c.results[k];
    int failed = 0;
    for (const auto& row : r.rows) failed += row.rankable() ? 0 : 1;
    candidates += static_cast<int>(r.rows.size());
    fitted += r.fitted;
    resumed += r.resumed;
    failed_total += failed;
    const std::string status = r.has_chosen() ? "ok" : "no_usable_candidate";
    by_status[status] = by_status[status].get<int>() + 1;
    auto file = [&](const char* name) {
      return existing(out / run_files::per_series(name, r.series, several));
    };
    series.push_back(
        {{"series", r.series},
         {"status", status},
         {"reason",
          r.has_chosen() ? nlohmann::json(nullptr) : nlohmann::json(no_candidate_reason(r))},
         {"chosen", r.has_chosen() ? nlohmann::json(r.rows.front().key) : nlohmann::json(nullptr)},
         {"chosen_reason", r.chosen_reason},
         {"candidates", r.rows.size()},
         {"fitted", r.fitted},
         {"from_journal", r.resumed},
         {"not_usable", failed},
         {"backtest", c.backtests[k].has_value()},
         {"warnings", warning_texts(r.warnings)},
         {"warning_codes", warnings_json(r.warnings)},
         {"files",
          {{"model", existing(out / run_files::model_file(r.series, several))},
           {"fit", file(run_files::kFit)},
           {"forecast", file(run_files::kForecast)},
           {"screen", file(run_files::kScreen)},
           {"backtest", file(run_files::kBacktest)},
           {"accuracy", file(run_files::kAccuracy)}}}});
  }
  return {{"command", "search"},
          {"config", args.config},
          {"panel", false},
          {"ran",
           {{"series", c.results.size()},
            {"strategy", to_string(config.search.strategy)},
            {"candidates", candidates},
            {"fitted", fitted},
            {"from_journal", resumed},
            {"not_usable", failed_total},
            {"backtest", config.backtest.enabled && !args.no_backtest},
            {"resume", args.resume}}},
          {"by_status", by_status},
          {"series", series},
          {"files",
           {{"run_folder", existing(out)},
            {"ranking_csv", existing(out / run_files::kRankingCsv)},
            {"ranking_json", existing(out / run_files::kRankingJson)},
            {"report", existing(out / run_files::kReport)}}}};
}

int run_search_command(const SearchArgs& args) {
  {
    const RunConfig config = load_config(args.config);
    if (!config.data.series_key.empty()) return run_batch_search_command(args, config);
  }
  return run_search_in_folder(load_run(args.config, args.series), args);
}

int run_search_in_folder(const LoadedRun& run, const SearchArgs& args) {
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

  SearchOptions options;
  options.threads = threads;
  options.journal = &journal;
  const SearchComputation computed = compute_search(run, options, !args.no_backtest, args.quiet);
  const auto& results = computed.results;
  // Everything goes to the staging folder, which replaces the run folder only once all is written.
  const std::vector<std::string> without_model = write_search_files(stage, run, computed);

  for (const auto& r : results) {
    if (args.json) break;  // the JSON object below says it all
    int failed = 0;
    for (const auto& row : r.rows) failed += row.rankable() ? 0 : 1;
    fmt::print(
        "{} · {} strategy, {} candidates ({} fitted, {} from the journal, {} not usable) in "
        "{:.1f} s on {} common observations; rows: {}\n",
        r.series, to_string(config.search.strategy), r.rows.size(), r.fitted, r.resumed, failed,
        r.seconds, r.rows.empty() ? 0 : r.rows.front().n_obs, r.sorted_by);
    if (r.stages.size() > 1 || (!r.stages.empty() && !r.stages.front().skipped.empty())) {
      fmt::print("  of a grid of {} candidates:\n", r.full_grid_size);
      for (const auto& line : stage_lines(r.stages)) fmt::print("    {}\n", line);
    }
    const size_t shown = std::min<size_t>(r.rows.size(), 10);
    size_t width = 5;  // the model column fits the longest label shown
    for (size_t i = 0; i < shown; ++i) width = std::max(width, r.rows[i].key.size());
    // With detected effects, a last column names those fitted with each row.
    const bool effects_column = r.outliers && !r.outliers->effects.empty();
    fmt::print("  {:>4}  {:<{}} {:>11} {:>9} {:>8} {:>9}  {:<14}{}\n", "rank", "model", width,
               to_string(config.search.criterion), "loglik", "LB p", "bt " + config.backtest.score,
               "status", effects_column ? " effects" : "");
    for (size_t i = 0; i < shown; ++i) {
      const auto& row = r.rows[i];
      std::string effects;
      for (const auto& e : row.effects) effects += " " + e;
      if (effects_column && effects.empty()) effects = " (none)";
      fmt::print("  {:>4}  {:<{}} {:>11.3f} {:>9.2f} {:>8.3f} {:>9}  {:<14}{}\n", row.rank, row.key,
                 width, row.criterion(config.search.criterion), row.loglik, row.ljung_box_p,
                 std::isfinite(row.backtest_score) ? fmt::format("{:.4f}", row.backtest_score) : "",
                 to_string(row.status), effects_column ? effects : "");
    }
    if (r.outliers) print_search_outliers(*r.outliers);
    if (!r.chosen_reason.empty()) fmt::print("  chosen model: {}\n", r.chosen_reason);
    for (const auto& w : r.warnings) fmt::print("  warning: {}\n", w.message);
  }
  ReportOptions report_options;
  report_options.folder_name = dir.out().filename().string();
  write_report(stage, report_options);
  dir.commit(without_model.empty() ? "complete" : "no_usable_candidate");
  const auto report_path = out / run_files::kReport;
  if (args.json) {
    const int code = without_model.empty() ? kExitOk : kExitNoModel;
    for (const auto& why : without_model) fmt::print(stderr, "lagsieve: error: {}\n", why);
    auto j = search_json(args, run, computed, out);
    return print_json_result(j, code);
  }
  if (!without_model.empty()) {
    for (const auto& why : without_model)
      fmt::print(stderr,
                 "lagsieve: error: {}; no model file written (the ranking in {} lists "
                 "every candidate's status and message)\n",
                 why, out.string());
    fmt::print("run folder: {} (report: {})\n", out.string(), report_path.string());
    return kExitNoModel;
  }
  fmt::print("run folder: {} (report: {})\n", out.string(), report_path.string());
  return kExitOk;
}

}  // namespace lagsieve::cli
