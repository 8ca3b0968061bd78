#include "batch/batch.h"

#include <tbb/parallel_for.h>

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <fstream>
#include <mutex>
#include <optional>
#include <set>
#include <sstream>

#include "backtest/backtest.h"
#include "core/error.h"
#include "core/names.h"
#include "data/load.h"
#include "forecast/fitted_model.h"
#include "io/atomic_file.h"
#include "io/csv.h"
#include "search/run_folder.h"
#include "search/search.h"

namespace lagsieve {

int BatchResult::count(SeriesStatus s) const {
  int n = 0;
  for (const auto& row : series) n += row.status == s ? 1 : 0;
  return n;
}

std::string series_folder(const std::string& key) {
  return std::string(kSeriesFolder) + "/" + safe_series_name(key);
}

std::vector<PanelPart> load_panel(const RunConfig& config, const std::vector<std::string>& only) {
  auto parts = split_by_key(read_csv(config.data.file), config.data.series_key,
                            "data.series_key in " + config.config_file.string());
  if (only.empty()) return parts;
  std::vector<std::string> keys;
  for (const auto& p : parts) keys.push_back(p.key);
  const std::set<std::string> wanted(only.begin(), only.end());
  for (const auto& name : wanted)
    if (!std::binary_search(keys.begin(), keys.end(), name)) {
      const auto guess = closest_match(name, keys);
      throw InputError(
          fmt::format("--series '{}': no such series in column '{}' of {} ({} series){}", name,
                      config.data.series_key, config.data.file.string(), keys.size(),
                      guess.empty() ? "" : fmt::format("; did you mean '{}'?", guess)));
    }
  std::erase_if(parts, [&](const PanelPart& p) { return !wanted.contains(p.key); });
  return parts;
}

SeriesData load_panel_series(RunConfig& config, const PanelPart& part) {
  SeriesData data = series_from_table(config, part.table, config.target.columns.front());
  data.target_name = part.key;
  apply_seasonal_default(config, data);
  return data;
}

std::vector<SeriesSummary> check_panel(const RunConfig& config,
                                       const std::vector<PanelPart>& parts) {
  std::vector<SeriesSummary> out;
  for (const auto& part : parts) {
    RunConfig own = config;
    try {
      const SeriesData data = load_panel_series(own, part);
      SeriesSummary s;
      s.series = part.key;
      s.folder = series_folder(part.key);
      s.status = SeriesStatus::ok;
      s.rows = data.rows();
      if (!data.time.empty()) s.first_time = data.time.front(), s.last_time = data.time.back();
      s.warnings = describe_missing(data);
      out.push_back(std::move(s));
    } catch (const InputError& e) {
      out.push_back(bad_series_summary(part.key, series_folder(part.key), e.what()));
    }
  }
  return out;
}

BatchResult run_batch(const RunConfig& config, std::vector<PanelPart> parts,
                      const BatchOptions& options) {
  BatchResult result;
  result.series.resize(parts.size());
  std::mutex progress_mutex;
  BatchProgress progress{0, static_cast<int>(parts.size()), 0};
  const auto report = [&](int series_done, long long candidates_done) {
    if (!options.progress) return;
    std::lock_guard lock(progress_mutex);
    progress.series_done += series_done;
    progress.candidates_done += candidates_done;
    options.progress(progress);
  };
  const auto one = [&](size_t i) {
    if (options.cancel && options.cancel->load()) return;
    PanelPart& part = parts[i];
    const std::string folder = series_folder(part.key);
    RunConfig own = config;  // seasonal defaults are resolved per series
    SeriesSummary summary;
    try {
      const SeriesData data = load_panel_series(own, part);
      CsvTable().rows.swap(part.table.rows);  // the text rows are no longer needed
      SeriesJobOptions job;
      job.threads = kInCallerArena;
      job.backtest = options.backtest;
      job.journal = options.journal;
      job.cancel = options.cancel;
      if (!options.folder.empty()) job.folder = options.folder / folder;
      if (options.progress) job.progress = [&](int, int) { report(0, 1); };
      summary = run_series_job(data, own, job);
      summary.folder = folder;
    } catch (const InputError& e) {
      summary = bad_series_summary(part.key, folder, e.what());
    }
    part = PanelPart{};
    result.series[i] = std::move(summary);
    report(1, 0);
  };
  run_in_arena(options.threads, [&] {
    // One series per task, scheduled dynamically: series differ much in cost.
    tbb::parallel_for(
        tbb::blocked_range<size_t>(0, parts.size(), 1),
        [&](const tbb::blocked_range<size_t>& range) {
          for (size_t i = range.begin(); i != range.end(); ++i) one(i);
        },
        tbb::simple_partitioner());
  });
  check_cancel(options.cancel);
  return result;
}

namespace {

std::optional<std::string> read_file(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return std::nullopt;
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return buffer.str();
}

}  // namespace

void write_batch_tables(const std::filesystem::path& folder, const BatchResult& result) {
  write_file_atomic(folder / kSummaryCsv, summary_csv(result.series));
  write_file_atomic(folder / kSummaryJson, summary_json(result.series).dump(1) + "\n");
  // The leaderboard of every series in one table: the header once, then each series' rows.
  size_t next = 0;
  bool header_written = false;
  write_file_atomic_chunks(
      folder / run_files::kLeaderboardCsv, [&]() -> std::optional<std::string> {
        while (next < result.series.size()) {
          const auto& s = result.series[next++];
          auto text = read_file(folder / s.folder / run_files::kLeaderboardCsv);
          if (!text) continue;
          const auto eol = text->find('\n');
          if (header_written)
            return eol == std::string::npos ? std::string() : text->substr(eol + 1);
          header_written = true;
          return *text;
        }
        return std::nullopt;
      });
}

std::string batch_fingerprint(const RunConfig& config, const std::vector<std::string>& only) {
  const auto text = read_file(config.data.file);
  std::string all = run_fingerprint(config, {}) + "|key=" + config.data.series_key +
                    "|data=" + text_fingerprint(text ? *text : "") + "|only=";
  std::set<std::string> sorted(only.begin(), only.end());
  for (const auto& s : sorted) all += s + ";";
  return text_fingerprint(all);
}

}  // namespace lagsieve
