#include "batch/shards.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <fstream>
#include <map>
#include <numeric>
#include <set>
#include <sstream>

#include "batch/batch.h"
#include "batch/tables.h"
#include "forecast/fitted_model.h"
#include "io/config.h"
#include "search/journal.h"
#include "search/journal_rows.h"
#include "core/error.h"
#include "io/atomic_file.h"
#include "io/csv.h"
#include "search/run_dir.h"
#include "search/run_folder.h"

namespace lagsieve {

namespace fs = std::filesystem;

ShardSpec parse_shard(const std::string& text, const std::string& option) {
  const auto slash = text.find('/');
  ShardSpec spec{0, 0};
  const auto number = [](std::string_view s, int& out) {
    const auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), out);
    return ec == std::errc() && p == s.data() + s.size() && !s.empty();
  };
  if (slash == std::string::npos || !number(std::string_view(text).substr(0, slash), spec.index) ||
      !number(std::string_view(text).substr(slash + 1), spec.count) || spec.count < 1 ||
      spec.count > 100000 || spec.index < 1 || spec.index > spec.count)
    throw InputError(fmt::format(
        "{} '{}': expected K/N with 1 <= K <= N (shard K of N, e.g. 3/8; N at most 100000)", option,
        text));
  return spec;
}

std::vector<int> shard_plan(const std::vector<PanelPart>& parts, int shards) {
  std::vector<size_t> order(parts.size());
  std::iota(order.begin(), order.end(), size_t{0});
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    const int ra = parts[a].rows, rb = parts[b].rows;
    return ra != rb ? ra > rb : parts[a].key < parts[b].key;
  });
  std::vector<long long> load(static_cast<size_t>(shards), 0);
  std::vector<int> plan(parts.size(), 0);
  for (const size_t i : order) {
    const auto lightest = std::min_element(load.begin(), load.end()) - load.begin();
    plan[i] = static_cast<int>(lightest);
    load[lightest] += parts[i].rows;
  }
  return plan;
}

std::vector<PanelPart> select_shard(std::vector<PanelPart> parts, const ShardSpec& spec) {
  const auto plan = shard_plan(parts, spec.count);
  std::vector<PanelPart> out;
  for (size_t i = 0; i < parts.size(); ++i)
    if (plan[i] == spec.index - 1) out.push_back(std::move(parts[i]));
  return out;
}

std::string shard_fingerprint(const std::string& panel_fingerprint, const ShardSpec& spec) {
  return text_fingerprint(fmt::format("{}|shard={}/{}", panel_fingerprint, spec.index, spec.count));
}

nlohmann::json shard_json(const std::string& panel_fingerprint, const ShardSpec& spec,
                          const std::vector<PanelPart>& parts, const PanelReportOptions& pages,
                          const std::vector<std::string>& sample, const RunConfig& config) {
  std::vector<std::string> keys;
  for (const auto& p : parts) keys.push_back(p.key);
  return {{"format", "lagsieve-shard"},
          {"panel_fingerprint", panel_fingerprint},
          {"shard", spec.index},
          {"of", spec.count},
          {"series", keys},
          {"pages", {{"worst", pages.worst}, {"sample", pages.sample}, {"keys", sample}}},
          {"config", {{"file", config.config_file.string()}, {"text", config.text}}}};
}

namespace {

std::string read_text(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return buffer.str();
}

nlohmann::json read_json(const fs::path& path, const std::string& what) {
  try {
    return nlohmann::json::parse(read_text(path));
  } catch (const std::exception& e) {
    throw InputError(
        fmt::format("{}: {} cannot be read ({}); give the folder of a completed "
                    "`search --shard K/N` run",
                    path.string(), what, e.what()));
  }
}

// Rows of the CSV files (same header), in key order of the first column, rows of one key in
// file order; written as the tables of an unsharded run are.
std::string merged_table(const std::vector<fs::path>& files) {
  std::string header;
  std::vector<std::vector<std::string>> rows;
  for (const auto& file : files) {
    if (!fs::exists(file)) continue;
    CsvTable t = read_csv(file);
    const std::string h = [&] {
      std::string s;
      for (size_t c = 0; c < t.header.size(); ++c) s += (c ? "," : "") + csv_field(t.header[c]);
      return s;
    }();
    if (header.empty()) header = h;
    if (h != header)
      throw InputError(
          fmt::format("{}: the header differs from the other shards' ({}); were "
                      "they run with the same config?",
                      file.string(), h));
    for (auto& r : t.rows) rows.push_back(std::move(r));
  }
  std::stable_sort(rows.begin(), rows.end(),
                   [](const auto& a, const auto& b) { return a.front() < b.front(); });
  std::string out = header.empty() ? "" : header + "\n";
  for (const auto& r : rows) {
    for (size_t c = 0; c < r.size(); ++c) out += (c ? "," : "") + csv_field(r[c]);
    out += "\n";
  }
  return out;
}

}  // namespace

std::string check_shards(const std::vector<fs::path>& shards, std::vector<fs::path>* in_order,
                         nlohmann::json* summaries_out) {
  if (shards.empty()) throw InputError("merge: give the shard folders to join");
  std::string fingerprint;
  int count = 0;
  std::map<int, fs::path> by_index;
  std::map<std::string, fs::path> series_of;
  nlohmann::json summaries = nlohmann::json::array();
  for (const auto& dir : shards) {
    const fs::path file = dir / kShardFile;
    if (!fs::is_regular_file(file) || !fs::is_regular_file(dir / kRunMarkerFile))
      throw InputError(fmt::format(
          "merge: '{}' is not the folder of a completed shard (no {} and {}); run `lagsieve "
          "search CONFIG --shard K/N --out {}` first",
          dir.string(), kShardFile, kRunMarkerFile, dir.string()));
    const auto j = read_json(file, kShardFile);
    const std::string fp = j.value("panel_fingerprint", "");
    const int k = j.value("shard", 0), n = j.value("of", 0);
    if (fingerprint.empty()) fingerprint = fp, count = n;
    if (fp != fingerprint)
      throw InputError(fmt::format(
          "merge: '{}' is a shard of another config or data than '{}' (fingerprints differ); "
          "merge only the shards of one run",
          dir.string(), shards.front().string()));
    if (n != count)
      throw InputError(fmt::format("merge: '{}' is shard {}/{}, but '{}' is one of {}",
                                   dir.string(), k, n, shards.front().string(), count));
    if (const auto [it, added] = by_index.try_emplace(k, dir); !added)
      throw InputError(fmt::format("merge: shard {}/{} is given twice: '{}' and '{}'", k, n,
                                   it->second.string(), dir.string()));
    for (const auto& key : j.at("series")) {
      const std::string s = key.get<std::string>();
      if (const auto [it, added] = series_of.try_emplace(s, dir); !added)
        throw InputError(fmt::format("merge: series '{}' is in two shards: '{}' and '{}'", s,
                                     it->second.string(), dir.string()));
    }
    const auto summary = read_json(dir / kSummaryJson, kSummaryJson);
    for (const auto& row : summary.at("series")) summaries.push_back(row);
  }
  std::string missing;
  for (int k = 1; k <= count; ++k)
    if (!by_index.contains(k))
      missing += fmt::format("{}{}/{}", missing.empty() ? "" : ", ", k, count);
  if (!missing.empty())
    throw InputError(fmt::format("merge: shard {} {} missing; give every shard of the run", missing,
                                 missing.find(',') == std::string::npos ? "is" : "are"));

  if (in_order)
    for (const auto& [k, dir] : by_index) in_order->push_back(dir);
  if (summaries_out) *summaries_out = std::move(summaries);
  return fingerprint;
}

std::string merge_shards(const fs::path& folder, const std::vector<fs::path>& shards) {
  std::vector<fs::path> dirs;
  nlohmann::json summaries;
  const std::string fingerprint = check_shards(shards, &dirs, &summaries);
  const auto head = read_json(dirs.front() / kShardFile, kShardFile);
  const RunConfig config =
      parse_config(head.at("config").at("text").get<std::string>(),
                   head.at("config").at("file").get<std::string>());
  PanelReportOptions pages;
  pages.worst = head.at("pages").value("worst", pages.worst);
  pages.sample = head.at("pages").value("sample", pages.sample);
  const auto sample = head.at("pages").at("keys").get<std::vector<std::string>>();

  // Where each series' files are: the shard it ran in.
  std::map<std::string, fs::path> shard_of;
  for (const auto& dir : dirs) {
    const auto shard = read_json(dir / kShardFile, kShardFile);
    for (const auto& key : shard.at("series")) shard_of[key.get<std::string>()] = dir;
  }

  BatchResult result;
  for (const auto& row : summaries) result.series.push_back(summary_from_json(row));
  std::stable_sort(result.series.begin(), result.series.end(),
                   [](const auto& a, const auto& b) { return a.series < b.series; });

  // Models of every series; the folders of the series with a page in the whole panel (each had
  // one in its shard: the panel's worst are among their shard's worst, the sample is the panel's).
  for (const auto& dir : dirs)
    if (fs::exists(dir / kModelsFolder))
      fs::copy(dir / kModelsFolder, folder / kModelsFolder,
               fs::copy_options::recursive | fs::copy_options::overwrite_existing);
  const auto paged = series_with_pages(result.series, pages, &sample);
  const std::set<size_t> keep(paged.begin(), paged.end());
  for (size_t i = 0; i < result.series.size(); ++i) {
    auto& s = result.series[i];
    const fs::path from = shard_of[s.series] / s.folder;
    if (!keep.contains(i) || s.folder.empty() || !fs::is_directory(from)) {
      s.folder.clear();
      continue;
    }
    fs::create_directories(folder / s.folder);
    fs::copy(from, folder / s.folder,
             fs::copy_options::recursive | fs::copy_options::overwrite_existing);
  }

  const auto tables = [&](const char* name) {
    std::vector<fs::path> files;
    for (const auto& dir : dirs) files.push_back(dir / name);
    return merged_table(files);
  };
  for (const char* name : {run_files::kRankingCsv, kForecastsCsv, run_files::kAccuracy})
    if (fs::exists(dirs.front() / name)) write_file_atomic(folder / name, tables(name));

  {
    Journal journal(folder / run_files::kJournal, fingerprint, false);
    for (const auto& dir : dirs) {
      const auto j = read_json(dir / kShardFile, kShardFile);
      const ShardSpec spec{j.at("shard").get<int>(), j.at("of").get<int>()};
      for (const auto& row : read_journal_rows(dir / run_files::kJournal,
                                                shard_fingerprint(fingerprint, spec)))
        journal.append(row);
    }
  }
  write_batch_tables(folder, result);
  write_panel_report(folder, result.series, config, pages, &sample);
  return fingerprint;
}

}  // namespace lagsieve
