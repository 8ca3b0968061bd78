#include "cli/batch_run.h"

#include <fmt/format.h>
#include <unistd.h>

#include <cstdio>

#include "batch/batch.h"
#include "batch/panel_report.h"
#include "batch/progress.h"
#include "batch/shards.h"
#include "batch/tables.h"
#include "core/names.h"
#include "forecast/fitted_model.h"
#include "io/atomic_file.h"
#include "io/csv.h"
#include "search/run_dir.h"
#include "search/run_folder.h"

namespace lagsieve::cli {
namespace {

void print_bad_series(const std::vector<SeriesSummary>& rows, size_t limit) {
  size_t shown = 0, bad = 0;
  for (const auto& s : rows) {
    if (s.status == SeriesStatus::ok) continue;
    ++bad;
    if (shown++ < limit)
      fmt::print(stderr, "lagsieve: series '{}' {}: {}\n", s.series, to_string(s.status), s.reason);
  }
  if (bad > shown) fmt::print(stderr, "lagsieve: ... and {} more (see summary.csv)\n", bad - shown);
}

nlohmann::json existing_path(const std::filesystem::path& p) {
  std::error_code ec;
  return std::filesystem::exists(p, ec) ? nlohmann::json(std::filesystem::absolute(p).string())
                                        : nlohmann::json(nullptr);
}

// `search --json` of a panel: counts by status, the series that are not ok with their reasons
// (every one: the caller decides what to show), and where the run's files are.
nlohmann::json panel_search_json(const SearchArgs& args, const RunConfig& config,
                                 const BatchResult& result, size_t total,
                                 const std::optional<ShardSpec>& shard,
                                 const std::filesystem::path& out) {
  nlohmann::json by_status = nlohmann::json::object();
  for (const auto status : {SeriesStatus::ok, SeriesStatus::no_usable_candidate,
                            SeriesStatus::bad_data, SeriesStatus::failed})
    by_status[std::string(to_string(status))] = result.count(status);
  nlohmann::json not_ok = nlohmann::json::array();
  long long candidates = 0, fitted = 0, resumed = 0, usable = 0, models = 0, warned = 0;
  for (const auto& s : result.series) {
    candidates += s.candidates;
    fitted += s.fitted;
    resumed += s.resumed;
    usable += s.usable;
    models += s.model.empty() ? 0 : 1;
    warned += s.warnings.empty() ? 0 : 1;
    if (s.status == SeriesStatus::ok) continue;
    not_ok.push_back({{"series", s.series},
                      {"status", std::string(to_string(s.status))},
                      {"reason", s.reason},
                      {"warning_codes", warnings_json(s.warnings)}});
  }
  nlohmann::json shard_json_value = nullptr;
  if (shard) shard_json_value = {{"k", shard->index}, {"n", shard->count}};
  return {{"command", "search"},
          {"config", args.config},
          {"panel", true},
          {"ran",
           {{"series", total},
            {"strategy", to_string(config.search.strategy)},
            {"candidates", candidates},
            {"fitted", fitted},
            {"from_journal", resumed},
            {"not_usable", candidates - usable},
            {"backtest", config.backtest.enabled && !args.no_backtest},
            {"resume", args.resume},
            {"shard", shard_json_value}}},
          {"by_status", by_status},
          {"series_with_warnings", warned},
          {"not_ok", not_ok},
          {"files",
           {{"run_folder", existing_path(out)},
            {"summary_csv", existing_path(out / kSummaryCsv)},
            {"summary_json", existing_path(out / kSummaryJson)},
            {"ranking_csv", existing_path(out / run_files::kRankingCsv)},
            {"forecasts_csv", existing_path(out / kForecastsCsv)},
            {"models_folder", existing_path(out / kModelsFolder)},
            {"model_files", models},
            {"report", existing_path(out / run_files::kReport)},
            {"shard", existing_path(out / kShardFile)}}}};
}

}  // namespace

int run_batch_search_command(const SearchArgs& args, const RunConfig& config) {
  const int threads = checked_threads(args.threads, config.search.threads);
  if (args.out && args.out->empty()) check_run_dir_path("", "--out");
  const std::filesystem::path out = args.out ? std::filesystem::path(*args.out) : config.output.dir;
  std::vector<PanelPart> parts = load_panel(config, args.series);
  const std::string panel_fingerprint = batch_fingerprint(config, parts, args.series);
  std::string fingerprint = panel_fingerprint;
  PanelReportOptions pages;
  pages.worst = args.pages_worst;
  pages.sample = args.pages_sample;
  // The sample of the whole panel, so that a shard keeps the pages its merge needs.
  std::vector<std::string> keys;
  for (const auto& p : parts) keys.push_back(p.key);
  const std::vector<std::string> sample = sample_keys(keys, pages.sample);
  keys.clear();
  std::optional<ShardSpec> shard;
  if (args.shard) {
    shard = parse_shard(*args.shard, "--shard");
    parts = select_shard(std::move(parts), *shard);
    fingerprint = shard_fingerprint(panel_fingerprint, *shard);
  }
  RunDir dir(out, {"search", fingerprint, args.resume, args.out ? "--out" : "output.dir"});
  for (const auto& note : dir.notes()) fmt::print(stderr, "lagsieve: note: {}\n", note);
  const std::filesystem::path& stage = dir.staging();
  Journal journal(stage / run_files::kJournal, fingerprint, args.resume);
  for (const auto& note : journal.notes()) fmt::print(stderr, "lagsieve: warning: {}\n", note);

  BatchOptions options;
  options.threads = threads;
  options.backtest = !args.no_backtest;
  options.folder = stage;
  options.journal = &journal;
  options.pages = pages;
  options.sample = sample;
  std::optional<ProgressPrinter> printer;
  if (!args.quiet) {  // on stderr, also with --json
    printer.emplace(ProgressOptions{static_cast<bool>(::isatty(STDERR_FILENO))},
                    [](const std::string& text) {
                      std::fputs(text.c_str(), stderr);
                      std::fflush(stderr);
                    });
    options.progress = [&](const BatchProgress& p) { (*printer)(p); };
  }
  const size_t total = parts.size();
  if (shard)
    write_file_atomic(stage / kShardFile,
                      shard_json(panel_fingerprint, *shard, parts, pages, sample, config).dump(1) +
                          "\n");
  const BatchResult result = run_batch(config, std::move(parts), options);
  write_batch_tables(stage, result);
  write_panel_report(stage, result.series, config, pages, &sample);

  const int ok = result.count(SeriesStatus::ok);
  dir.commit(ok == static_cast<int>(total) ? "complete"
             : ok > 0                      ? "some_series_failed"
                                           : "no_usable_candidate");
  const int code = ok == static_cast<int>(total) ? kExitOk
                   : ok > 0                      ? kExitSomeSeriesFailed
                                                 : kExitNoModel;
  if (args.json) {
    auto j = panel_search_json(args, config, result, total, shard, out);
    print_bad_series(result.series, 20);  // on stderr, for people
    return print_json_result(j, code);
  }
  fmt::print("{} series: {} ok, {} no usable candidate, {} bad data, {} failed\n", total, ok,
             result.count(SeriesStatus::no_usable_candidate), result.count(SeriesStatus::bad_data),
             result.count(SeriesStatus::failed));
  print_bad_series(result.series, 20);
  fmt::print("run folder: {} (summary: {}, report: {})\n", out.string(),
             (out / kSummaryCsv).string(), (out / run_files::kReport).string());
  if (ok == static_cast<int>(total)) return kExitOk;
  return ok > 0 ? kExitSomeSeriesFailed : kExitNoModel;
}

int merge_command(const std::string& out, const std::vector<std::string>& shard_dirs) {
  std::vector<std::filesystem::path> shards(shard_dirs.begin(), shard_dirs.end());
  const std::string fingerprint = check_shards(shards);  // refuses before anything is written
  RunDir dir(out, {"search", fingerprint, false, "OUT"});
  for (const auto& note : dir.notes()) fmt::print(stderr, "lagsieve: note: {}\n", note);
  merge_shards(dir.staging(), shards);
  const auto summary = read_csv(dir.staging() / kSummaryCsv);
  const int status = summary.column_index("status");
  int ok = 0;
  for (const auto& row : summary.rows) ok += row[status] == "ok" ? 1 : 0;
  const int total = summary.row_count();
  dir.commit(ok == total ? "complete" : ok > 0 ? "some_series_failed" : "no_usable_candidate");
  fmt::print("merged {} shards: {} series, {} ok\nrun folder: {} (summary: {})\n", shards.size(),
             total, ok, out, (std::filesystem::path(out) / kSummaryCsv).string());
  if (ok == total) return kExitOk;
  return ok > 0 ? kExitSomeSeriesFailed : kExitNoModel;
}

int validate_panel_command(const RunConfig& config, const std::vector<std::string>& only) {
  const auto parts = load_panel(config, only);
  const auto rows = check_panel(config, parts);
  fmt::print("config     {}\n", config.config_file.string());
  fmt::print("data       {} (long format, series key '{}', {} series)\n", config.data.file.string(),
             config.data.series_key, rows.size());
  int bad = 0;
  for (const auto& s : rows) {
    if (s.status != SeriesStatus::ok) {
      ++bad;
      fmt::print("bad        {}: {}\n", s.series, s.reason);
      continue;
    }
    fmt::print("series     {} ({} rows{})\n", s.series, s.rows,
               s.first_time.empty() ? "" : fmt::format(", {} .. {}", s.first_time, s.last_time));
    for (const auto& w : s.warnings) fmt::print("missing    {}: {}\n", s.series, w.message);
  }
  fmt::print("output     {}\n", config.output.dir.string());
  if (bad > 0) {
    fmt::print(stderr,
               "lagsieve: error: {} of {} series failed the checks (listed above as "
               "`bad`); a search would run the others and report these\n",
               bad, rows.size());
    return kExitBadInput;
  }
  fmt::print("valid\n");
  return kExitOk;
}

}  // namespace lagsieve::cli
