#include "batch/batch.h"

#include <tbb/parallel_for.h>

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <mutex>
#include <optional>
#include <set>

#include "backtest/backtest.h"
#include "batch/spool.h"
#include "batch/tables.h"
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

std::string series_folder(const std::string& name) {
  return std::string(kSeriesFolder) + "/" + name;
}

std::string series_model_file(const std::string& name) {
  return std::string(kModelsFolder) + "/" + name + ".json";
}

std::vector<PanelPart> load_panel(const RunConfig& config, const std::vector<std::string>& only) {
  auto parts = index_panel(config.data.file, config.data.series_key,
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
  SeriesData data = series_from_table(config, part_table(part), config.target.columns.front());
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
      s.status = SeriesStatus::ok;
      s.rows = data.rows();
      if (!data.time.empty()) s.first_time = data.time.front(), s.last_time = data.time.back();
      s.warnings = missing_warnings(data);
      out.push_back(std::move(s));
    } catch (const InputError& e) {
      out.push_back(bad_series_summary(part.key, "", e.what()));
    }
  }
  return out;
}

namespace {

// The scratch files and the page keeper of a run with a folder.
struct BatchOutputs {
  BatchOutputs(const std::filesystem::path& folder, size_t count,
               const PanelReportOptions& options, const std::vector<std::string>& sample)
      : ranking(folder / ".ranking.spool", count),
        forecasts(folder / ".forecasts.spool", count),
        accuracy(folder / ".accuracy.spool", count),
        pages(options, sample) {}
  TableSpool ranking, forecasts, accuracy;
  PageKeeper pages;
};

std::vector<std::string> sample_of(const BatchOptions& options,
                                   const std::vector<PanelPart>& parts) {
  if (!options.sample.empty()) return options.sample;
  std::vector<std::string> keys;
  for (const auto& p : parts) keys.push_back(p.key);
  return sample_keys(keys, options.pages.sample);
}

}  // namespace

BatchResult run_batch(const RunConfig& config, std::vector<PanelPart> parts,
                      const BatchOptions& options) {
  BatchResult result;
  result.series.resize(parts.size());
  std::vector<std::string> names(parts.size());
  for (size_t i = 0; i < parts.size(); ++i)
    names[i] = parts[i].name.empty() ? safe_series_name(parts[i].key) : parts[i].name;
  const std::vector<std::string> sample = sample_of(options, parts);
  std::optional<BatchOutputs> out;
  if (!options.folder.empty()) {
    std::filesystem::create_directories(options.folder / kModelsFolder);
    out.emplace(options.folder, parts.size(), options.pages, sample);
  }
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
    const std::string key = parts[i].key;
    RunConfig own = config;  // seasonal defaults are resolved per series
    SeriesSummary summary;
    try {
      std::optional<SeriesData> data(load_panel_series(own, parts[i]));
      parts[i] = PanelPart{};  // the index of its rows is no longer needed
      SeriesJobOptions job;
      job.threads = kInCallerArena;
      job.backtest = options.backtest;
      job.journal = options.journal;
      job.cancel = options.cancel;
      SeriesTables tables;
      if (out) {
        job.folder = options.folder / series_folder(names[i]);
        job.keep_folder = [&](const SeriesSummary& s) { return out->pages.keep(s); };
        job.model_file = options.folder / series_model_file(names[i]);
        job.tables = &tables;
      }
      if (options.progress) job.progress = [&](int, int) { report(0, 1); };
      summary = run_series_job(*data, own, job);
      data.reset();
      if (out) {
        out->ranking.put(i, tables.ranking, ranking_header(config));
        out->forecasts.put(i, tables.forecasts);
        out->accuracy.put(i, tables.accuracy, tables.accuracy_header);
      }
    } catch (const InputError& e) {
      summary = bad_series_summary(key, "", e.what());
    }
    if (summary.status == SeriesStatus::ok && out) summary.model = series_model_file(names[i]);
    parts[i] = PanelPart{};
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
  if (!out) return result;
  out->ranking.write(options.folder / run_files::kRankingCsv, ranking_header(config));
  out->forecasts.write(options.folder / kForecastsCsv, forecasts_header(config.forecast.levels));
  if (config.backtest.enabled && options.backtest)
    out->accuracy.write(options.folder / run_files::kAccuracy);
  // The series with a page keep their folder; the others' folders (written while they could
  // still be among the worst) go.
  const auto paged = series_with_pages(result.series, options.pages, &sample);
  const std::set<size_t> keep(paged.begin(), paged.end());
  for (size_t i = 0; i < result.series.size(); ++i) {
    const auto dir = options.folder / series_folder(names[i]);
    if (keep.contains(i) && std::filesystem::is_directory(dir))
      result.series[i].folder = series_folder(names[i]);
    else
      std::filesystem::remove_all(dir);
  }
  std::error_code ec;
  std::filesystem::remove(options.folder / kSeriesFolder, ec);  // only when empty
  return result;
}

void write_batch_tables(const std::filesystem::path& folder, const BatchResult& result) {
  write_file_atomic(folder / kSummaryCsv, summary_csv(result.series));
  write_file_atomic(folder / kSummaryJson, summary_json(result.series).dump(1) + "\n");
}

std::string batch_fingerprint(const RunConfig& config, const std::vector<PanelPart>& parts,
                              const std::vector<std::string>& only) {
  const std::string data = parts.empty() || !parts.front().file
                               ? text_fingerprint("")
                               : parts.front().file->scan.fingerprint;
  std::string all = run_fingerprint(config, {}) + "|key=" + config.data.series_key +
                    "|data=" + data + "|only=";
  std::set<std::string> sorted(only.begin(), only.end());
  for (const auto& s : sorted) all += s + ";";
  return text_fingerprint(all);
}

}  // namespace lagsieve
