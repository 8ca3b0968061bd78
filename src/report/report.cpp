#include "report/report.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>
#include <optional>
#include <set>
#include <sstream>

#include "core/error.h"
#include "forecast/fitted_model.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "io/csv.h"
#include "model/polynomial.h"
#include "model/spec_from_config.h"
#include "report/effects_section.h"
#include "report/html.h"
#include "report/revalidation_page.h"
#include "report/past_section.h"
#include "report/svg.h"
#include "report/time_axis.h"
#include "screen/indicator.h"
#include "search/run_folder.h"

namespace lagsieve {

void ReportOptions::validate() const {
  const auto positive = [](int v, const char* name) {
    if (v <= 0)
      throw InputError(fmt::format("report option {} = {}: must be at least 1", name, v));
  };
  positive(ranking_rows, "ranking_rows");
  positive(backtest_models, "backtest_models");
  positive(forecast_table_rows, "forecast_table_rows");
}

namespace {

namespace fs = std::filesystem;
using nlohmann::json;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr int kWideChart = 960;  // charts that stand alone on a row (the page is ~1060 px wide)

// The page renderer has no block for preformatted text; this paragraph marks where the
// collapsible config block goes and is replaced after rendering.
constexpr const char* kConfigMarker = "lagsieve-report:config-text";

// ---------------------------------------------------------------------------------------------
// Reading the run files, with messages that name the file and the field.

std::string rerun_hint() {
  return "re-run the command that wrote the run folder (search, backtest or revalidate)";
}

template <class J = json>
J read_json(const fs::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(fmt::format("{}: cannot be read; check its permissions", file.string()));
  std::stringstream buffer;
  buffer << in.rdbuf();
  try {
    return J::parse(buffer.str());
  } catch (const typename J::parse_error& e) {
    throw InputError(fmt::format("{}: not valid JSON ({}); {}", file.string(), e.what(), rerun_hint()));
  }
}

// Field access inside one JSON file: a missing or mistyped field is an InputError naming the file
// and the field's path. Nulls read as NaN (the run files write non-finite numbers as null).
class JsonFile {
 public:
  explicit JsonFile(std::string file) : file_(std::move(file)) {}
  const std::string& file() const { return file_; }

  [[noreturn]] void fail(const std::string& path, const std::string& what) const {
    throw InputError(fmt::format("{}: field '{}' {}; {}", file_, path, what, rerun_hint()));
  }
  const json& at(const json& j, const std::string& key, const std::string& path) const {
    if (!j.is_object()) fail(path, "is not inside an object");
    const auto it = j.find(key);
    if (it == j.end()) fail(path + key, "is missing");
    return *it;
  }
  const json& array(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_array()) fail(path + key, "is not an array");
    return v;
  }
  double number(const json& j, const std::string& key, const std::string& path) const {
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return kNaN;
    const json& v = j[key];
    if (!v.is_number()) fail(path + key, "is not a number");
    return v.get<double>();
  }
  std::string text(const json& j, const std::string& key, const std::string& path) const {
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return "";
    const json& v = j[key];
    if (!v.is_string()) fail(path + key, "is not text");
    return v.get<std::string>();
  }
  std::vector<double> numbers(const json& v, const std::string& path) const {
    if (!v.is_array()) fail(path, "is not an array");
    std::vector<double> out;
    for (size_t i = 0; i < v.size(); ++i) {
      if (v[i].is_null()) out.push_back(kNaN);
      else if (v[i].is_number()) out.push_back(v[i].get<double>());
      else fail(fmt::format("{}[{}]", path, i), "is not a number");
    }
    return out;
  }
  std::vector<double> numbers(const json& j, const std::string& key, const std::string& path) const {
    return numbers(at(j, key, path), path + key);
  }
  std::vector<std::string> texts(const json& v, const std::string& path) const {
    if (!v.is_array()) fail(path, "is not an array");
    std::vector<std::string> out;
    for (size_t i = 0; i < v.size(); ++i) {
      if (v[i].is_string()) out.push_back(v[i].get<std::string>());
      else if (v[i].is_number()) out.push_back(v[i].dump());
      else fail(fmt::format("{}[{}]", path, i), "is not text");
    }
    return out;
  }

 private:
  std::string file_;
};

// A CSV file of the backtest stage, read by column name.
class CsvFile {
 public:
  explicit CsvFile(const fs::path& file) : table_(read_csv(file)) {}
  const CsvTable& table() const { return table_; }
  int rows() const { return table_.row_count(); }
  bool has(std::string_view column) const { return table_.column_index(column) >= 0; }
  int column(std::string_view name) const {
    const int c = table_.column_index(name);
    if (c < 0)
      throw InputError(fmt::format("{}: column '{}' is missing; {}", table_.source, name, rerun_hint()));
    return c;
  }
  const std::string& text(int r, int c) const { return table_.rows[r][c]; }
  // Empty cells and NA read as NaN.
  double number(int r, int c) const {
    const std::string& s = table_.rows[r][c];
    if (s.empty() || s == "NA" || s == "NaN" || s == "nan") return kNaN;
    try {
      size_t used = 0;
      const double v = std::stod(s, &used);
      if (used == s.size()) return v;
    } catch (const std::exception&) {
    }
    throw InputError(fmt::format("{}: column '{}' holds '{}', not a number; {}", table_.where(r),
                                 table_.header[c], s, rerun_hint()));
  }
  // Columns "<prefix><100*level>" (coverage_80, lower_95, ...) as level -> column, ascending.
  std::vector<std::pair<double, int>> level_columns(std::string_view prefix) const {
    std::vector<std::pair<double, int>> out;
    for (int c = 0; c < table_.columns(); ++c) {
      const std::string& h = table_.header[c];
      if (h.size() <= prefix.size() || h.compare(0, prefix.size(), prefix) != 0) continue;
      const std::string rest = h.substr(prefix.size());
      try {
        size_t used = 0;
        const double pct = std::stod(rest, &used);
        if (used == rest.size() && pct > 0.0 && pct < 100.0) out.emplace_back(pct / 100.0, c);
      } catch (const std::exception&) {
      }
    }
    std::sort(out.begin(), out.end());
    return out;
  }

 private:
  CsvTable table_;
};

// ---------------------------------------------------------------------------------------------
// The run folder: which series it holds and where each file is.

struct RankingRow {
  std::string series, key, status, message;
  int rank = 0;
  double criterion = kNaN, loglik = kNaN, ljung_box_p = kNaN, backtest_score = kNaN;
  int backtest_rank = 0;
  int n_params = 0;
  int n_obs = 0;
  std::string effects;  // detected effects fitted with the row, "" when none
};

// Per series: what the rows are sorted by, why the model was chosen, the run's warnings.
struct SeriesNote {
  std::string sorted_by, chosen_reason;
  std::vector<std::string> warnings;
  std::vector<std::string> stages;  // what each search stage fitted and skipped, in words
};

struct Ranking {
  std::string criterion;  // "aic", "aicc" or "bic"
  std::vector<RankingRow> rows;
  std::map<std::string, SeriesNote> notes;  // by series (rankings without notes: empty)
};

Ranking read_ranking(const fs::path& file) {
  const JsonFile f(file.string());
  const json doc = read_json(file);
  Ranking lb;
  lb.criterion = f.text(doc, "criterion", "");
  if (lb.criterion != "aic" && lb.criterion != "aicc" && lb.criterion != "bic")
    f.fail("criterion", "is not one of aic, aicc, bic");
  const json& rows = f.array(doc, "rows", "");
  for (size_t i = 0; i < rows.size(); ++i) {
    const json& r = rows[i];
    const std::string path = fmt::format("rows[{}].", i);
    RankingRow row;
    row.series = f.text(r, "series", path);
    f.at(r, "key", path);
    row.key = f.text(r, "key", path);
    row.status = f.text(r, "status", path);
    row.message = f.text(r, "message", path);
    f.at(r, "rank", path);
    const double rank = f.number(r, "rank", path);
    if (!std::isfinite(rank)) f.fail(path + "rank", "is not a number");
    row.rank = static_cast<int>(rank);
    row.criterion = f.number(r, lb.criterion, path);
    row.loglik = f.number(r, "loglik", path);
    row.ljung_box_p = f.number(r, "ljung_box_p", path);
    row.backtest_score = f.number(r, "backtest_score", path);
    const double br = f.number(r, "backtest_rank", path);
    row.backtest_rank = std::isfinite(br) ? static_cast<int>(br) : 0;
    const double k = f.number(r, "n_params", path);
    row.n_params = std::isfinite(k) ? static_cast<int>(k) : 0;
    const double n = f.number(r, "n_obs", path);
    row.n_obs = std::isfinite(n) ? static_cast<int>(n) : 0;
    if (r.contains("effects") && r["effects"].is_array())
      for (const auto& e : r["effects"])
        if (e.is_string()) row.effects += (row.effects.empty() ? "" : ", ") + e.get<std::string>();
    lb.rows.push_back(std::move(row));
  }
  if (doc.contains("series_notes") && doc["series_notes"].is_array())
    for (size_t i = 0; i < doc["series_notes"].size(); ++i) {
      const json& n = doc["series_notes"][i];
      const std::string path = fmt::format("series_notes[{}].", i);
      SeriesNote note;
      note.sorted_by = f.text(n, "sorted_by", path);
      const bool legacy_key = !n.contains("chosen_reason") && n.contains("leader_reason");
      note.chosen_reason = f.text(n, legacy_key ? "leader_reason" : "chosen_reason", path);
      if (n.contains("warnings"))
        for (const auto& w : f.array(n, "warnings", path))
          note.warnings.push_back(w.is_string() ? w.get<std::string>() : w.dump());
      if (n.contains("search") && n["search"].is_object() && n["search"].contains("stages") &&
          n["search"]["stages"].is_array())
        for (const auto& st : n["search"]["stages"]) {
          if (!st.is_object()) continue;
          std::string line = fmt::format("{}: {} fitted", st.value("stage", "?"), st.value("fitted", 0));
          if (st.value("from_journal", 0) > 0)
            line += fmt::format(", {} from the journal", st.value("from_journal", 0));
          if (st.contains("skipped") && st["skipped"].is_array())
            for (const auto& k : st["skipped"])
              if (k.is_object() && k.value("count", 0LL) > 0)
                line += fmt::format("; {} skipped: {}", k.value("count", 0LL), k.value("reason", ""));
          note.stages.push_back(line);
        }
      lb.notes[f.text(n, "series", path)] = std::move(note);
    }
  return lb;
}

std::string criterion_label(const std::string& c) {
  if (c == "aicc") return "AICc";
  return c == "aic" ? "AIC" : "BIC";
}

struct SeriesFiles {
  std::string name;
  std::optional<FittedModel> model;
  std::optional<json> fit, screen, forecast;
  std::string fit_file, screen_file, forecast_file, model_file;
  std::vector<RankingRow> rows;  // this series' ranking rows, by rank
};

struct RunFolder {
  fs::path dir;
  std::string name;  // the folder's name as shown (a staged run shows its final name)
  bool several = false;
  std::optional<Ranking> ranking;
  std::vector<SeriesFiles> series;
  std::optional<nlohmann::ordered_json> revalidation;
  std::vector<std::string> files_read;
};

bool starts_with(const std::string& s, std::string_view prefix) {
  return s.size() > prefix.size() && s.compare(0, prefix.size(), prefix) == 0;
}

// Series names taken from per-series file names (model_<s>.json, fit_<s>.json, ...).
std::vector<std::string> suffixed_series(const fs::path& dir) {
  std::set<std::string> names;
  for (const auto& entry : fs::directory_iterator(dir)) {
    if (!entry.is_regular_file() || entry.path().extension() != ".json") continue;
    const std::string stem = entry.path().stem().string();
    for (std::string_view prefix : {"model_", "fit_", "screen_", "forecast_"})
      if (starts_with(stem, prefix)) names.insert(stem.substr(prefix.size()));
  }
  return {names.begin(), names.end()};
}

RunFolder read_run_folder(const fs::path& dir, std::vector<std::string>& warnings) {
  if (!fs::is_directory(dir))
    throw InputError(fmt::format("{}: no such folder; pass the run folder a search, backtest or "
                                 "revalidate wrote (output.dir in the config)",
                                 dir.string()));
  RunFolder run;
  run.dir = dir;
  const auto exists = [&](const std::string& name) { return fs::is_regular_file(dir / name); };

  // A folder written before the ranking had its name holds the legacy leaderboard.json.
  const char* ranking_file =
      exists(run_files::kRankingJson) ? run_files::kRankingJson : run_files::kLegacyRankingJson;
  if (exists(ranking_file)) {
    run.ranking = read_ranking(dir / ranking_file);
    run.files_read.push_back(ranking_file);
  }
  if (exists(run_files::kRevalidation)) {
    run.revalidation = read_json<nlohmann::ordered_json>(dir / run_files::kRevalidation);
    if (!run.revalidation->is_object())
      throw InputError(fmt::format("{}: not a JSON object; {}",
                                   (dir / run_files::kRevalidation).string(), rerun_hint()));
    run.files_read.push_back(run_files::kRevalidation);
  }

  std::vector<std::string> names;
  if (run.ranking)
    for (const auto& row : run.ranking->rows)
      if (std::find(names.begin(), names.end(), row.series) == names.end()) names.push_back(row.series);
  const std::vector<std::string> suffixed = suffixed_series(dir);
  if (names.size() > 1 || (names.empty() && !suffixed.empty())) {
    run.several = true;
    if (names.empty()) names = suffixed;
  }
  if (!run.several) {
    // One series: its name from the ranking, else from whichever file names it.
    // A backtest folder holds only the backtest tables.
    const bool any = exists(run_files::kFit) || exists(run_files::kScreen) ||
                     exists(run_files::kForecast) || exists(run_files::model_file("", false)) ||
                     exists(run_files::kAccuracy);
    if (names.empty() && any) names.push_back("");
  }
  if (names.empty() && !run.revalidation && !run.ranking)
    throw InputError(fmt::format(
        "{}: not a run folder: none of {}, {}, {}, {}, {} found; pass the folder a search, "
        "backtest or revalidate wrote (output.dir in the config)",
        dir.string(), run_files::kRankingJson, run_files::model_file("", false), run_files::kFit,
        run_files::kScreen, run_files::kRevalidation));

  for (const std::string& name : names) {
    SeriesFiles s;
    s.name = name;
    const auto file_of = [&](const char* base) { return run_files::per_series(base, name, run.several); };
    s.model_file = run_files::model_file(name, run.several);
    s.fit_file = file_of(run_files::kFit);
    s.screen_file = file_of(run_files::kScreen);
    s.forecast_file = file_of(run_files::kForecast);
    if (exists(s.model_file)) {
      s.model = load_model(dir / s.model_file);
      run.files_read.push_back(s.model_file);
    }
    const auto load = [&](const std::string& file, std::optional<json>& into) {
      if (!exists(file)) return;
      into = read_json(dir / file);
      if (!into->is_object())
        throw InputError(fmt::format("{}: not a JSON object; {}", (dir / file).string(), rerun_hint()));
      run.files_read.push_back(file);
    };
    load(s.fit_file, s.fit);
    load(s.screen_file, s.screen);
    load(s.forecast_file, s.forecast);
    if (s.name.empty()) {
      if (s.model) s.name = s.model->training.target_column;
      else if (s.fit && (*s.fit).contains("series") && (*s.fit)["series"].is_string())
        s.name = (*s.fit)["series"].get<std::string>();
      else if (s.screen && (*s.screen).contains("target") && (*s.screen)["target"].is_string())
        s.name = (*s.screen)["target"].get<std::string>();
      else if (s.forecast && (*s.forecast).contains("series") && (*s.forecast)["series"].is_string())
        s.name = (*s.forecast)["series"].get<std::string>();
    }
    if (run.ranking) {
      for (const auto& row : run.ranking->rows)
        if (row.series == name) s.rows.push_back(row);
      std::stable_sort(s.rows.begin(), s.rows.end(),
                       [](const RankingRow& a, const RankingRow& b) { return a.rank < b.rank; });
      const bool has_chosen = std::any_of(s.rows.begin(), s.rows.end(), [](const RankingRow& r) {
        return r.status == "ok" || r.status == "boundary" || r.status == "no_convergence";
      });
      if (has_chosen && !s.model && !s.fit)
        warnings.push_back(fmt::format("{}: neither {} nor {} found; the chosen model's diagnostics and "
                                       "impulse responses are not shown",
                                       name, s.model_file, s.fit_file));
    }
    run.series.push_back(std::move(s));
  }
  return run;
}

// ---------------------------------------------------------------------------------------------
// Page and chart assembly.

std::string chart_file_name(std::string name) {
  for (char& c : name)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.')) c = '_';
  return name + ".svg";
}

class Builder {
 public:
  Builder(const RunFolder& run, const ReportOptions& options, ReportResult& result)
      : run_(run), options_(options), result_(result) {}

  HtmlPage page;

  // Adds a chart: into the page (as a figure) and into charts/ under `file_stem`.
  HtmlFigure figure(const std::string& svg, const std::string& file_stem, const std::string& caption) {
    std::string stem = file_stem;
    for (int k = 2; used_.count(stem); ++k) stem = fmt::format("{}_{}", file_stem, k);
    used_.insert(stem);
    const std::string file = chart_file_name(stem);
    if (options_.write_charts) charts_.emplace_back(file, svg);
    std::string full = caption;
    if (options_.write_charts)
      full += fmt::format("{}Standalone copy: {}/{}", caption.empty() ? "" : " ", run_files::kCharts, file);
    return HtmlFigure{svg, full};
  }

  void write_charts() {
    for (const auto& [file, svg] : charts_) {
      const fs::path path = run_.dir / run_files::kCharts / file;
      write_file_atomic(path, svg);
      result_.charts.push_back(path);
    }
  }

  std::string suffix(const SeriesFiles& s) const {
    return run_.several ? fmt::format(" · {}", s.name) : std::string();
  }
  std::string stem(const std::string& base, const SeriesFiles& s) const {
    return run_.several ? fmt::format("{}_{}", base, s.name) : base;
  }

 private:
  const RunFolder& run_;
  const ReportOptions& options_;
  ReportResult& result_;
  std::set<std::string> used_;
  std::vector<std::pair<std::string, std::string>> charts_;
};

std::string fmt_num(double v) {
  if (!std::isfinite(v)) return "\u2014";
  return format_table_value(TableValue{v}, TableColumn{});
}

// Labels: a level as a percentage ("80%"), a number to three significant digits.
std::string pct(double level) { return fmt::format("{:g}%", 100.0 * level); }
std::string short_num(double v) { return std::isfinite(v) ? fmt::format("{:.3g}", v) : "\u2014"; }

std::string join(const std::vector<std::string>& parts, std::string_view sep) {
  std::string out;
  for (size_t i = 0; i < parts.size(); ++i) {
    if (i) out += sep;
    out += parts[i];
  }
  return out;
}

TableValue cell(double v) { return TableValue{v}; }
TableValue cell(int v) { return TableValue{static_cast<long long>(v)}; }
TableValue cell(std::string v) { return TableValue{std::move(v)}; }

// A JSON scalar as table cell / text (generic views of revalidation.json).
template <class J>
TableValue json_cell(const J& v) {
  if (v.is_null()) return TableValue{};
  if (v.is_number_integer() || v.is_number_unsigned()) return TableValue{v.template get<long long>()};
  if (v.is_number()) return TableValue{v.template get<double>()};
  if (v.is_string()) return TableValue{v.template get<std::string>()};
  if (v.is_boolean()) return TableValue{std::string(v.template get<bool>() ? "yes" : "no")};
  return TableValue{v.dump()};
}
template <class J>
std::string json_text(const J& v) {
  if (v.is_string()) return v.template get<std::string>();
  if (v.is_number() && !v.is_number_integer() && !v.is_number_unsigned()) return fmt_num(v.template get<double>());
  if (v.is_boolean()) return v.template get<bool>() ? "yes" : "no";
  if (v.is_null()) return "\u2014";
  if (v.is_array() && std::all_of(v.begin(), v.end(), [](const J& e) { return !e.is_structured(); })) {
    std::vector<std::string> parts;
    for (const auto& e : v) parts.push_back(json_text(e));
    return join(parts, ", ");
  }
  return v.dump();
}

std::string humanise(std::string key) {
  std::replace(key.begin(), key.end(), '_', ' ');
  if (!key.empty()) key[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(key[0])));
  return key;
}

// ---- Run summary ----------------------------------------------------------------------------

std::string transform_text(const TargetTransform& t) {
  switch (t.kind) {
    case TransformKind::none: return "none";
    case TransformKind::log: return "log";
    case TransformKind::boxcox: return fmt::format("Box-Cox, lambda {}", fmt_num(t.lambda));
  }
  return "?";
}

std::string differencing_text(const Differencing& d) {
  if (d.regular == 0 && d.seasonal == 0) return "none";
  std::string s = fmt::format("d = {}", d.regular);
  if (d.seasonal > 0) s += fmt::format(", D = {} (period {})", d.seasonal, d.period);
  return s;
}

HtmlSection summary_section(const RunFolder& run, std::string& config_text) {
  HtmlSection s;
  s.heading = "Run summary";
  s.intro = "What was fitted, on which data, and what the run warned about.";
  const SeriesFiles* first_with_model = nullptr;
  for (const auto& sf : run.series)
    if (sf.model) {
      first_with_model = &sf;
      break;
    }
  HtmlKeyValues kv;
  kv.items.emplace_back("Run folder", run.name);
  if (first_with_model) {
    const TrainingInfo& tr = first_with_model->model->training;
    if (!tr.config_file.empty()) kv.items.emplace_back("Config file", tr.config_file);
    if (!tr.source_file.empty()) kv.items.emplace_back("Data file", tr.source_file);
    kv.items.emplace_back("Target transform", transform_text(first_with_model->model->spec.transform));
    kv.items.emplace_back("Differencing", differencing_text(first_with_model->model->spec.differencing));
  }
  if (run.ranking) {
    const bool backtested = std::any_of(run.ranking->rows.begin(), run.ranking->rows.end(),
                                        [](const RankingRow& r) { return std::isfinite(r.backtest_score); });
    const std::string crit = criterion_label(run.ranking->criterion);
    kv.items.emplace_back("Ranked by", backtested ? fmt::format("backtest score for the shortlist, then {} (lower is "
                                                                "better for both)", crit)
                                                  : crit + " (lower is better)");
    kv.items.emplace_back("Compared on", "the same observations for every candidate of a series, so the "
                                         "criteria are comparable");
  }
  s.blocks.push_back(std::move(kv));

  if (run.series.size() == 1) {
    const SeriesFiles& sf = run.series.front();
    HtmlKeyValues data;
    data.items.push_back({std::string("Series"), sf.name});
    if (sf.model) {
      const TrainingInfo& tr = sf.model->training;
      data.items.emplace_back(
          "Data", tr.first_time.empty()
                      ? fmt::format("{} rows", tr.rows)
                      : fmt::format("{} rows, {} to {}{}", tr.rows, tr.first_time, tr.last_time,
                                    tr.frequency.empty() ? "" : " (" + tr.frequency + ")"));
    }
    if (!sf.rows.empty()) data.items.emplace_back("Candidates", std::to_string(sf.rows.size()));
    if (!sf.rows.empty() && sf.rows.front().rank == 1) data.items.emplace_back("Chosen", sf.rows.front().key);
    else if (sf.model) data.items.emplace_back("Chosen", model_label(sf.model->spec));
    auto& items = std::get<HtmlKeyValues>(s.blocks.front()).items;
    items.insert(items.begin() + 1, data.items.begin(), data.items.end());
  }
  // Several series: one row each, with data range and chosen model.
  HtmlTable t;
  t.caption = "Series";
  t.columns = {{"Series", "", NumberFormat::automatic, 3},     {"Rows", "", NumberFormat::automatic, 0},
               {"First", "", NumberFormat::automatic, 3},      {"Last", "", NumberFormat::automatic, 3},
               {"Frequency", "", NumberFormat::automatic, 3},  {"Candidates", "", NumberFormat::automatic, 0},
               {"Chosen", "", NumberFormat::automatic, 3}};
  for (const auto& sf : run.series) {
    std::vector<TableValue> row{cell(sf.name)};
    if (sf.model) {
      const TrainingInfo& tr = sf.model->training;
      row.push_back(cell(tr.rows));
      row.push_back(cell(tr.first_time.empty() ? std::string("row 1") : tr.first_time));
      row.push_back(cell(tr.last_time.empty() ? fmt::format("row {}", tr.rows) : tr.last_time));
      row.push_back(cell(tr.frequency));
    } else if (sf.screen && (*sf.screen).contains("rows") && (*sf.screen)["rows"].is_number()) {
      row.push_back(cell((*sf.screen)["rows"].get<int>()));
      row.insert(row.end(), {TableValue{}, TableValue{}, TableValue{}});
    } else {
      row.insert(row.end(), {TableValue{}, TableValue{}, TableValue{}, TableValue{}});
    }
    row.push_back(sf.rows.empty() ? TableValue{} : cell(static_cast<int>(sf.rows.size())));
    std::string chosen;
    if (!sf.rows.empty() && sf.rows.front().rank == 1) chosen = sf.rows.front().key;
    else if (sf.model) chosen = model_label(sf.model->spec);
    row.push_back(cell(chosen.empty() ? std::string("none usable") : chosen));
    t.rows.push_back(std::move(row));
  }
  if (run.series.size() > 1) s.blocks.push_back(std::move(t));

  if (first_with_model && !first_with_model->model->training.config_text.empty()) {
    config_text = first_with_model->model->training.config_text;
    s.blocks.push_back(HtmlParagraph{kConfigMarker});
  }

  // Warnings of the screen and of the chosen model's fit, and forecasts that could not be made.
  for (const auto& sf : run.series) {
    const std::string who = run.several ? sf.name + ": " : "";
    if (sf.screen && (*sf.screen).contains("warnings") && (*sf.screen)["warnings"].is_array())
      for (const auto& w : (*sf.screen)["warnings"]) {
        const std::string kind = w.value("kind", std::string("screen"));
        s.blocks.push_back(HtmlNotice{Tone::warning, who + "Screen: " + humanise(kind),
                                      w.value("message", std::string())});
      }
    if (sf.fit && (*sf.fit).contains("diagnostics") && (*sf.fit)["diagnostics"].contains("warnings") &&
        (*sf.fit)["diagnostics"]["warnings"].is_array())
      for (const auto& w : (*sf.fit)["diagnostics"]["warnings"])
        s.blocks.push_back(HtmlNotice{Tone::warning, who + "Chosen model's fit", json_text(w)});
    if (sf.forecast && (*sf.forecast).contains("note") && (*sf.forecast)["note"].is_string())
      s.blocks.push_back(HtmlNotice{Tone::neutral, who + "Forecast", (*sf.forecast)["note"].get<std::string>()});
  }
  return s;
}

// ---- Inputs (screen) ------------------------------------------------------------------------

// The treatment of an input in the words of screen/indicator.h, from a screen.json input (fields
// "event", "indicator", "prewhitened", "prewhitening") or a fit.json residual_input_ccf entry
// ("input_kind", "indicator_shape", "prewhitened", "ar_order"). Files written before the field
// "prewhitened" existed prewhitened every data column and every diagnostics input.
std::string treatment_of(const json& e) {
  InputKind kind;
  kind.is_event = e.value("event", false) || e.value("input_kind", std::string()) == "event";
  if (e.contains("indicator") && e["indicator"].is_object())
    kind.indicator = indicator_shape_from(e["indicator"].value("shape", std::string()));
  if (e.contains("indicator_shape") && e["indicator_shape"].is_string())
    kind.indicator = indicator_shape_from(e["indicator_shape"].get<std::string>());
  if (kind.is_event) kind.indicator = IndicatorShape::none;
  int ar_order = 0;
  if (e.contains("prewhitening") && e["prewhitening"].is_object() &&
      e["prewhitening"].contains("order") && e["prewhitening"]["order"].is_number())
    ar_order = e["prewhitening"]["order"].get<int>();
  if (e.contains("ar_order") && e["ar_order"].is_number()) ar_order = e["ar_order"].get<int>();
  const bool prewhitened = e.value("prewhitened", !kind.deterministic());
  return describe_treatment(kind, prewhitened, ar_order);
}

void add_input_sections(Builder& b, const SeriesFiles& sf, HtmlSection& s) {
  const JsonFile f(sf.screen_file);
  const json& doc = *sf.screen;
  const json& inputs = f.array(doc, "inputs", "");
  s.heading = "Inputs: cross-correlation and impulse response" + b.suffix(sf);
  s.intro =
      "Each data column and the target are prewhitened by the column's own AR model, then "
      "cross-correlated; events and indicator columns (two-valued steps and pulses) are not "
      "prewhitened, since an AR model fitted to a step whitens away the change itself. Bars beyond the orange band lines at lags 0 and above point to the delay; bars at negative lags "
      "would mean the target leads the input (feedback). Beside it, the impulse response the screen "
      "estimates from those correlations, its fitted shape, and the chosen model's estimated response.";
  if (inputs.empty()) s.blocks.push_back(HtmlParagraph{"The run has no inputs."});
  for (size_t i = 0; i < inputs.size(); ++i) {
    const json& in = inputs[i];
    const std::string path = fmt::format("inputs[{}].", i);
    const std::string name = f.text(in, "name", path);
    const std::vector<double> lags = f.numbers(in, "lags", path);
    const std::vector<double> r = f.numbers(in, "cross_correlation", path);
    if (lags.size() != r.size()) f.fail(path + "lags", "does not match cross_correlation in length");
    const double band = f.number(in, "band", path);
    const double family = f.number(in, "family_band", path);
    const bool relevant = in.value("relevant", false);
    const bool event = in.value("event", false);
    const bool indicator = in.contains("indicator") && in["indicator"].is_object();
    const int b0 = static_cast<int>(f.number(in, "suggested_delay", path));
    const int s0 = static_cast<int>(f.number(in, "suggested_numerator", path));
    const int r0 = static_cast<int>(f.number(in, "suggested_denominator", path));
    const double n = f.number(in, "n", path);
    const std::string treatment = treatment_of(in);

    BarChart ccf;
    if (event || indicator)
      ccf.frame.title =
          relevant ? fmt::format("{} ({}): bars beyond the band show when the target responds", name,
                                 event ? "event" : "indicator")
                   : fmt::format("{} ({}): no clear response beyond the band", name, event ? "event" : "indicator");
    else
      ccf.frame.title = relevant ? fmt::format("{}: bars beyond the band from lag {} on mark the delay", name, b0)
                                 : fmt::format("{}: no lag clears the family band; a candidate to drop", name);
    ccf.frame.subtitle = fmt::format("{}, n = {:.0f}; family band \u00b1{}", treatment, n, short_num(family));
    ccf.frame.x_title = "Lag k (steps; input leads the target for k > 0)";
    ccf.frame.y_title = "Cross-correlation";
    ccf.x = lags;
    ccf.values = r;
    if (std::isfinite(band)) ccf.band = {band};
    ccf.band_label = fmt::format("\u00b1{} per-lag band", short_num(band));
    HtmlFigure left = b.figure(bar_chart_svg(ccf), b.stem("ccf_" + name, sf),
                               fmt::format("Cross-correlation of {} with {} ({}).", name, sf.name, treatment));

    const std::vector<double> v = f.numbers(in, "impulse", path);
    const std::vector<double> se = in.contains("impulse_se") ? f.numbers(in, "impulse_se", path)
                                                             : std::vector<double>(v.size(), kNaN);
    const std::vector<double> vfit = in.contains("impulse_fitted") ? f.numbers(in, "impulse_fitted", path)
                                                                   : std::vector<double>();
    LineChart ir;
    std::vector<double> k(v.size());
    for (size_t j = 0; j < v.size(); ++j) k[j] = static_cast<double>(j);
    Band est_band;
    est_band.name = "screen estimate \u00b1 2 s.e.";
    est_band.x = k;
    for (size_t j = 0; j < v.size(); ++j) {
      const double e = j < se.size() ? se[j] : kNaN;
      est_band.lower.push_back(v[j] - 2.0 * e);
      est_band.upper.push_back(v[j] + 2.0 * e);
    }
    // The colour roles of every chart (svg.h): uncertainty orange, what the data say in ink,
    // what the model says vermillion.
    est_band.colour = kBandColour;
    est_band.opacity = 0.3;
    ir.bands.push_back(std::move(est_band));
    ir.series.push_back(LineSeries{"screen estimate", k, v, 7, false, LineStyle::dotted, true});
    if (relevant && vfit.size() == v.size())
      ir.series.push_back(LineSeries{fmt::format("screen shape b{} s{} r{}", b0, s0, r0), k, vfit, 2,
                                     false, LineStyle::dashed, false});
    std::string chosen_text = "is not in the chosen model";
    if (sf.model) {
      const auto& spec = sf.model->spec;
      for (size_t t = 0; t < spec.inputs.size(); ++t) {
        if (spec.inputs[t].name != name || t >= sf.model->params.inputs.size()) continue;
        const InputOrder& o = spec.inputs[t].order;
        const std::vector<double> lv =
            impulse_response(o, sf.model->params.inputs[t], static_cast<int>(v.size()));
        ir.series.push_back(LineSeries{fmt::format("chosen model b{} s{} r{}", o.delay, o.numerator, o.denominator),
                                       k, lv, kModelColour, false, LineStyle::solid, true});
        chosen_text = "";
      }
    }
    ir.include_zero = true;
    if (!k.empty()) {
      ir.x_min = -0.5;
      ir.x_max = k.back() + 0.5;
    }
    ir.frame.title = chosen_text.empty()
        ? fmt::format("{}: the chosen model's response should stay inside the shaded band", name)
        : fmt::format("{} {}: the screen's estimate alone", name, chosen_text);
    ir.frame.subtitle = "response of the (transformed, differenced) target to a unit pulse in the input";
    ir.frame.x_title = "Lag k (steps after the pulse)";
    ir.frame.y_title = "Response v_k (per unit of input)";
    HtmlFigure right = b.figure(line_chart_svg(ir), b.stem("impulse_" + name, sf),
                                fmt::format("Impulse response of {}.", name));
    s.blocks.push_back(HtmlFigureRow{{std::move(left), std::move(right)}});

    std::vector<std::string> notes;
    if (in.contains("notes") && in["notes"].is_array()) notes = f.texts(in["notes"], path + "notes");
    if (!notes.empty()) s.blocks.push_back(HtmlParagraph{name + ": " + join(notes, " ")});
  }
  if (doc.contains("noise") && doc["noise"].is_object()) {
    const json& nz = doc["noise"];
    s.blocks.push_back(HtmlParagraph{fmt::format(
        "Noise orders the screen suggests from what the inputs leave over: p = {}, q = {} ({}).",
        json_text(nz.value("p", json(nullptr))), json_text(nz.value("q", json(nullptr))),
        nz.value("reason", std::string("no reason given")))});
  }
}

// ---- Ranking ----------------------------------------------------------------------------

HtmlSection ranking_section(const Builder& b, const SeriesFiles& sf, const Ranking& lb,
                                const ReportOptions& options) {
  HtmlSection s;
  const std::string crit = criterion_label(lb.criterion);
  s.heading = "Ranking" + b.suffix(sf);
  const bool backtested = std::any_of(sf.rows.begin(), sf.rows.end(),
                                      [](const RankingRow& r) { return std::isfinite(r.backtest_score); });
  const auto note = lb.notes.find(sf.name);
  const bool has_note = note != lb.notes.end() && !note->second.sorted_by.empty();
  s.intro = fmt::format(
      "{}\u0394 {} is the distance to the lowest {}: below about 2 the data hardly tell two models "
      "apart. Click a column heading to sort.",
      has_note ? fmt::format("Rows: {}. ", note->second.sorted_by)
      : backtested
          ? fmt::format("The shortlist is ranked by its backtest score (lower is better), the "
                        "other candidates by {} after it. ",
                        crit)
          : fmt::format("Candidates ranked by {} (lower is better). ", crit),
      crit, crit);
  if (note != lb.notes.end()) {
    if (!note->second.chosen_reason.empty())
      s.blocks.push_back(HtmlNotice{Tone::neutral, "Why this model", note->second.chosen_reason});
    if (!note->second.stages.empty())
      s.blocks.push_back(HtmlNotice{Tone::neutral, "What the search fitted and skipped",
                                    join(note->second.stages, ". ") + "."});
    for (const auto& w : note->second.warnings)
      s.blocks.push_back(HtmlNotice{Tone::warning, "Warning", w});
  }
  double best = kNaN;
  for (const auto& r : sf.rows)
    if (std::isfinite(r.criterion) && !(best <= r.criterion)) best = r.criterion;
  HtmlTable t;
  t.caption = fmt::format("Top {} of {} candidates", std::min<size_t>(sf.rows.size(), options.ranking_rows),
                          sf.rows.size());
  t.sortable = true;
  t.columns = {{"Rank", "", NumberFormat::automatic, 0},
               {"Model", "", NumberFormat::automatic, 3},
               {crit, "", NumberFormat::fixed, 2},
               {"\u0394 " + crit, "", NumberFormat::fixed, 2},
               {"Backtest score", "", NumberFormat::automatic, 3},
               {"Ljung-Box p", "", NumberFormat::p_value, 3},
               {"Parameters", "", NumberFormat::automatic, 0},
               {"Log-likelihood", "", NumberFormat::fixed, 2},
               {"Status", "", NumberFormat::automatic, 3}};
  // With outlier detection, a last column names the detected effects each row was fitted with.
  const bool any_effects = std::any_of(sf.rows.begin(), sf.rows.end(),
                                       [](const RankingRow& r) { return !r.effects.empty(); });
  if (any_effects) t.columns.push_back({"Detected effects", "", NumberFormat::automatic, 3});
  std::map<std::string, int> by_status;
  for (const auto& r : sf.rows) ++by_status[r.status];
  for (size_t i = 0; i < sf.rows.size() && static_cast<int>(i) < options.ranking_rows; ++i) {
    const auto& r = sf.rows[i];
    if (r.rank == 1) t.highlighted_rows.push_back(static_cast<int>(i));
    // The fit's message only where the status needs explaining.
    const std::string status = r.status == "ok" || r.message.empty() ? r.status : r.status + ": " + r.message;
    t.rows.push_back({cell(r.rank), cell(r.key), cell(r.criterion), cell(r.criterion - best),
                      cell(r.backtest_score), cell(r.ljung_box_p), cell(r.n_params), cell(r.loglik),
                      cell(status)});
    if (any_effects) t.rows.back().push_back(cell(r.effects.empty() ? "none" : r.effects));
  }
  std::vector<std::string> counts;
  for (const auto& [status, count] : by_status) counts.push_back(fmt::format("{} {}", count, status));
  t.note = fmt::format("Status of all {} candidates: {}. Parameters count every estimated parameter, "
                       "sigma\u00b2 included{}.",
                       sf.rows.size(), join(counts, ", "),
                       sf.rows.empty() ? "" : fmt::format("; all fitted on {} observations", sf.rows.front().n_obs));
  s.blocks.push_back(std::move(t));
  return s;
}

// ---- Forecast -------------------------------------------------------------------------------

// Calendar ticks of a time axis given as position -> stamp (report/time_axis.h), across the plot
// of a chart `width` wide.
std::vector<AxisTick> time_ticks(const std::vector<double>& x, const std::vector<std::string>& stamps,
                                 int width) {
  return time_axis_ticks(x, stamps, width - 90.0);
}

// The level keys of forecast.json ("0.8", "0.95") as level -> key, ascending.
std::vector<std::pair<double, std::string>> level_keys(const json& bounds) {
  std::vector<std::pair<double, std::string>> out;
  if (!bounds.is_object()) return out;
  for (const auto& [key, value] : bounds.items()) {
    try {
      out.emplace_back(std::stod(key), key);
    } catch (const std::exception&) {
    }
  }
  std::sort(out.begin(), out.end());
  return out;
}

// The model's event inputs (name and start), for the marks of the fan and the past charts.
std::vector<PastEvent> model_events(const SeriesFiles& sf) {
  std::vector<PastEvent> events;
  if (sf.model)
    for (const auto& use : sf.model->inputs)
      if (use.is_event && !use.at.empty()) events.push_back({use.name, use.at});
  return events;
}

std::optional<HtmlSection> past_of_series(Builder& b, const SeriesFiles& sf) {
  if (!sf.fit) return std::nullopt;
  const std::string stem = b.stem("", sf);
  return past_section(*sf.fit, sf.fit_file, model_events(sf), b.suffix(sf), stem,
                      [&b](const std::string& svg, const std::string& file_stem,
                           const std::string& caption) { return b.figure(svg, file_stem, caption); });
}

std::optional<HtmlSection> forecast_section(Builder& b, const SeriesFiles& sf, const ReportOptions& options) {
  const JsonFile f(sf.forecast_file);
  const json& doc = *sf.forecast;
  HtmlSection s;
  s.heading = "Forecast" + b.suffix(sf);
  std::vector<double> history;
  std::vector<std::string> history_time;
  if (doc.contains("history") && doc["history"].is_object()) {
    history = f.numbers(doc["history"], "values", "history.");
    if (doc["history"].contains("time")) history_time = f.texts(doc["history"]["time"], "history.time");
  }
  const json fc = doc.contains("forecast") ? doc["forecast"] : json(nullptr);
  if (fc.is_null()) {
    s.intro = "No forecast from the end of the data.";
    s.blocks.push_back(HtmlNotice{Tone::neutral, "No forecast", doc.value("note", std::string("forecast.json holds none"))});
    return s;
  }
  const std::vector<double> median = f.numbers(fc, "median", "forecast.");
  const std::vector<std::string> ftime = fc.contains("time") ? f.texts(fc["time"], "forecast.time")
                                                             : std::vector<std::string>(median.size());
  const auto levels = level_keys(f.at(fc, "lower", "forecast."));
  if (levels.empty()) f.fail("forecast.lower", "has no levels");
  const auto bound = [&](const char* side, const std::string& key) {
    const std::string path = fmt::format("forecast.{}.", side);
    if (!fc.contains(side)) return std::vector<double>(median.size(), kNaN);
    std::vector<double> v = f.numbers(f.at(fc[side], key, path), path + key);
    if (v.size() != median.size()) f.fail(path + key, "does not match the forecast in length");
    return v;
  };
  const auto& [inner_level, inner_key] = levels.front();
  const auto& [outer_level, outer_key] = levels.back();

  FanChartData fan;
  const int nh = static_cast<int>(history.size());
  for (int i = 0; i < nh; ++i) fan.history_x.push_back(static_cast<double>(i - nh + 1));
  fan.history = history;
  for (size_t j = 0; j < median.size(); ++j) fan.forecast_x.push_back(static_cast<double>(j + 1));
  fan.forecast = median;
  fan.inner_level = inner_level;
  fan.outer_level = outer_level;
  FanBands forecast_bands{"inputs forecast", bound("lower", inner_key), bound("upper", inner_key),
                          bound("lower", outer_key), bound("upper", outer_key)};
  FanBands known_bands{"inputs known", bound("lower_inputs_known", inner_key),
                       bound("upper_inputs_known", inner_key), bound("lower_inputs_known", outer_key),
                       bound("upper_inputs_known", outer_key)};
  // When every input's future is known (or there are no inputs) the two band sets coincide.
  double gap = 0.0, scale = 0.0;
  for (size_t j = 0; j < median.size(); ++j) {
    const double w = forecast_bands.outer_upper[j] - forecast_bands.outer_lower[j];
    const double wk = known_bands.outer_upper[j] - known_bands.outer_lower[j];
    if (std::isfinite(w) && std::isfinite(wk)) {
      gap = std::max(gap, std::fabs(w - wk));
      scale = std::max(scale, std::fabs(w));
    }
  }
  const bool input_share = gap > 1e-9 * std::max(scale, 1e-300);
  if (!input_share) forecast_bands.label.clear();
  fan.bands.push_back(forecast_bands);
  if (input_share) fan.bands.push_back(known_bands);

  std::vector<double> all_x = fan.history_x;
  all_x.insert(all_x.end(), fan.forecast_x.begin(), fan.forecast_x.end());
  std::vector<std::string> stamps = history_time;
  stamps.resize(history.size());
  stamps.insert(stamps.end(), ftime.begin(), ftime.end());
  fan.x_ticks = time_ticks(all_x, stamps, kWideChart);
  add_past_to_fan(fan, history_time, ftime, sf.fit ? &*sf.fit : nullptr, model_events(sf));

  const std::string label = sf.model ? model_label(sf.model->spec) : std::string();
  fan.frame.title = input_share
      ? "The green outline is the band with future inputs known; the extra width of the orange "
        "band comes from forecasting the inputs"
      : fmt::format("{}: point forecast with {} and {} bands", sf.name, pct(inner_level),
                    pct(outer_level));
  fan.frame.subtitle = fmt::format(
      "{}{} · {} steps ahead from {}", sf.name, label.empty() ? "" : " · " + label, median.size(),
      history_time.empty() || history_time.back().empty() ? "the end of the data" : history_time.back());
  fan.frame.x_title = fan.x_ticks.empty() ? "Steps from the forecast origin" : "Time";
  fan.frame.y_title = sf.name;
  fan.frame.width = kWideChart;
  fan.frame.height = 440;

  std::vector<std::string> treatment;
  if (fc.contains("input_treatment") && fc["input_treatment"].is_array())
    treatment = f.texts(fc["input_treatment"], "forecast.input_treatment");
  std::vector<std::string> treat_text;
  if (sf.model)
    for (size_t i = 0; i < sf.model->spec.inputs.size() && i < treatment.size(); ++i)
      treat_text.push_back(sf.model->spec.inputs[i].name + ": " + treatment[i]);
  s.intro = "The chosen model's forecast from the end of the data: median (the back-transformed point "
            "forecast) with nested prediction intervals.";
  s.blocks.push_back(b.figure(
      fan_chart_svg(fan), b.stem("forecast_fan", sf),
      treat_text.empty() ? std::string("Future inputs: none in the model.")
                         : fmt::format("Future inputs: {}.", join(treat_text, "; "))));

  HtmlTable t;
  t.caption = "Forecast values";
  const std::string in_pct = pct(inner_level);
  const std::string out_pct = pct(outer_level);
  t.columns = {{"Step", "", NumberFormat::automatic, 0},
               {"Time", "", NumberFormat::automatic, 3},
               {"Median", "", NumberFormat::automatic, 3},
               {"Lower " + in_pct, "", NumberFormat::automatic, 3},
               {"Upper " + in_pct, "", NumberFormat::automatic, 3},
               {"Lower " + out_pct, "", NumberFormat::automatic, 3},
               {"Upper " + out_pct, "", NumberFormat::automatic, 3}};
  if (input_share) t.columns.push_back({"Width from inputs", "", NumberFormat::percent, 0});
  for (size_t j = 0; j < median.size() && static_cast<int>(j) < options.forecast_table_rows; ++j) {
    std::vector<TableValue> row{cell(static_cast<int>(j + 1)),
                                cell(j < ftime.size() ? ftime[j] : std::string()),
                                cell(median[j]),
                                cell(forecast_bands.inner_lower[j]),
                                cell(forecast_bands.inner_upper[j]),
                                cell(forecast_bands.outer_lower[j]),
                                cell(forecast_bands.outer_upper[j])};
    if (input_share) {
      const double w = forecast_bands.outer_upper[j] - forecast_bands.outer_lower[j];
      const double wk = known_bands.outer_upper[j] - known_bands.outer_lower[j];
      row.push_back(cell(w > 0 ? 1.0 - wk / w : kNaN));
    }
    t.rows.push_back(std::move(row));
  }
  if (input_share)
    t.note = fmt::format("Width from inputs: the share of the {} band's width that forecasting the "
                         "inputs adds (1 \u2212 width with inputs known / width with inputs forecast).",
                         out_pct);
  s.blocks.push_back(std::move(t));
  return s;
}

// ---- Backtest -------------------------------------------------------------------------------

struct BacktestFiles {
  std::optional<CsvFile> accuracy, backtest, comparisons, input_value;
  std::vector<std::string> names;
};

// The series' own file (suffix) when the run has several series, else the plain one.
std::optional<CsvFile> open_csv(const RunFolder& run, const SeriesFiles& sf, const char* base,
                                std::vector<std::string>& names) {
  std::vector<std::string> tries;
  if (run.several) tries.push_back(run_files::per_series(base, sf.name, true));
  tries.emplace_back(base);
  for (const auto& name : tries)
    if (fs::is_regular_file(run.dir / name)) {
      names.push_back(name);
      return CsvFile(run.dir / name);
    }
  return std::nullopt;
}

// Rows that belong to the series: all, unless the file has a series column.
bool row_in_series(const CsvFile& csv, int r, const SeriesFiles& sf) {
  const int c = csv.table().column_index("series");
  return c < 0 || csv.text(r, c) == sf.name;
}

std::optional<HtmlSection> backtest_section(Builder& b, const RunFolder& run, const SeriesFiles& sf,
                                            const ReportOptions& options,
                                            std::vector<std::string>& files_read) {
  BacktestFiles bf;
  bf.accuracy = open_csv(run, sf, run_files::kAccuracy, bf.names);
  bf.backtest = open_csv(run, sf, run_files::kBacktest, bf.names);
  bf.comparisons = open_csv(run, sf, run_files::kComparisons, bf.names);
  bf.input_value = open_csv(run, sf, run_files::kInputValue, bf.names);
  if (!bf.accuracy && !bf.backtest && !bf.comparisons && !bf.input_value) return std::nullopt;
  for (const auto& n : bf.names)
    if (std::find(files_read.begin(), files_read.end(), n) == files_read.end()) files_read.push_back(n);

  HtmlSection s;
  s.heading = "Backtest" + b.suffix(sf);
  s.intro = "Rolling-origin backtest: at every origin each model forecasts 1..K steps ahead with "
            "inputs as in production (known or forecast) and, for comparison, with the realised "
            "inputs (oracle). Lower errors are better; honest intervals cover about their nominal share.";

  // Chosen model and candidates from the ranking; anything else is a benchmark.
  std::string chosen = !sf.rows.empty() && sf.rows.front().rank == 1 ? sf.rows.front().key
                       : sf.model ? model_label(sf.model->spec) : std::string();
  std::set<std::string> candidates;
  for (const auto& r : sf.rows) candidates.insert(r.key);
  const auto is_benchmark = [&](const std::string& m) {
    return (!candidates.empty() && !candidates.count(m)) || starts_with(m, "benchmark");
  };

  if (bf.accuracy) {
    const CsvFile& a = *bf.accuracy;
    const int cm = a.column("model"), cmode = a.column("mode"), ch = a.column("horizon"),
              cmae = a.column("mae");
    const int ccount = a.table().column_index("count");
    // Model order: chosen model, other candidates by ranking rank, then benchmarks (file order).
    std::vector<std::string> models;
    for (int r = 0; r < a.rows(); ++r) {
      if (!row_in_series(a, r, sf)) continue;
      const std::string& m = a.text(r, cm);
      if (std::find(models.begin(), models.end(), m) == models.end()) models.push_back(m);
    }
    std::map<std::string, int> order;
    for (const auto& row : sf.rows) order[row.key] = row.backtest_rank > 0 ? row.backtest_rank : 100000 + row.rank;
    std::stable_sort(models.begin(), models.end(), [&](const std::string& x, const std::string& y) {
      const auto key = [&](const std::string& m) {
        if (m == chosen) return -1;
        if (is_benchmark(m)) return 1 << 30;
        const auto it = order.find(m);
        return it == order.end() ? (1 << 29) : it->second;
      };
      return key(x) < key(y);
    });
    std::vector<std::string> shown;
    int n_bench = 0;
    for (const auto& m : models) n_bench += is_benchmark(m) ? 1 : 0;
    const int cand_slots = std::max(1, options.backtest_models - n_bench);
    int taken = 0;
    for (const auto& m : models)
      if (!is_benchmark(m) && taken < cand_slots) {
        shown.push_back(m);
        ++taken;
      }
    for (const auto& m : models)
      if (is_benchmark(m) && static_cast<int>(shown.size()) < options.backtest_models) shown.push_back(m);

    std::set<int> horizon_set;
    for (int r = 0; r < a.rows(); ++r)
      if (row_in_series(a, r, sf)) {
        const double h = a.number(r, ch);
        if (std::isfinite(h) && h > 0) horizon_set.insert(static_cast<int>(h));
      }
    const std::vector<int> horizons(horizon_set.begin(), horizon_set.end());
    const auto value_at = [&](const std::string& model, const std::string& mode, int h, int col) {
      for (int r = 0; r < a.rows(); ++r)
        if (row_in_series(a, r, sf) && a.text(r, cm) == model && a.text(r, cmode) == mode &&
            a.number(r, ch) == h)
          return a.number(r, col);
      return kNaN;
    };
    std::vector<HtmlFigure> pair;
    if (!horizons.empty()) {
      HorizonChart hc;
      hc.horizons = horizons;
      for (const auto& m : shown) {
        HorizonSeries hs{m == chosen ? m + " (chosen model)" : m, {}, is_benchmark(m)};
        for (int h : horizons) hs.values.push_back(value_at(m, "production", h, cmae));
        hc.series.push_back(std::move(hs));
      }
      hc.frame.title = "Error by horizon: the lowest line forecasts best; dashed lines are benchmarks";
      hc.frame.subtitle = "mean absolute error with inputs as in production";
      hc.frame.x_title = "Forecast horizon (steps ahead)";
      hc.frame.y_title = fmt::format("MAE ({} units)", sf.name);
      hc.frame.width = kWideChart;
      s.blocks.push_back(b.figure(horizon_chart_svg(hc), b.stem("backtest_error_by_horizon", sf), ""));

      // The chosen model with forecast inputs against the chosen model with the realised inputs.
      HorizonChart oc;
      oc.horizons = horizons;
      HorizonSeries prod{"inputs as in production", {}, false};
      HorizonSeries oracle{"inputs known (oracle)", {}, true};
      bool any_oracle = false;
      for (int h : horizons) {
        prod.values.push_back(value_at(chosen, "production", h, cmae));
        oracle.values.push_back(value_at(chosen, "oracle", h, cmae));
        any_oracle = any_oracle || std::isfinite(oracle.values.back());
      }
      if (any_oracle) {
        oc.series = {prod, oracle};
        oc.frame.title = "Chosen model: the gap is the error from forecasting the inputs";
        oc.frame.subtitle = chosen;
        oc.frame.x_title = "Forecast horizon (steps ahead)";
        oc.frame.y_title = fmt::format("MAE ({} units)", sf.name);
        pair.push_back(b.figure(horizon_chart_svg(oc), b.stem("backtest_inputs_known_vs_forecast", sf), ""));
      }
    }

    // Coverage over all horizons (horizon 0), production mode.
    const auto cov_cols = a.level_columns("coverage_");
    bool any_coverage = false;
    for (const auto& m : shown)
      for (const auto& [level, col] : cov_cols)
        any_coverage = any_coverage || std::isfinite(value_at(m, "production", 0, col));
    if (any_coverage) {
      CoverageChart cc;
      for (const auto& [level, col] : cov_cols) cc.nominal.push_back(level);
      for (const auto& m : shown) {
        CoverageSeries cs{m == chosen ? m + " (chosen model)" : m, {}, 0};
        for (const auto& [level, col] : cov_cols) cs.empirical.push_back(value_at(m, "production", 0, col));
        if (ccount >= 0) {
          const double n = value_at(m, "production", 0, ccount);
          cs.count = std::isfinite(n) ? static_cast<int>(n) : 0;
        }
        cc.series.push_back(std::move(cs));
      }
      cc.frame.title = "Coverage: points below the diagonal are over-confident";
      cc.frame.subtitle = "share of actuals inside the production intervals, all horizons";
      cc.frame.x_title = "Nominal coverage";
      cc.frame.y_title = "Empirical coverage";
      cc.frame.height = 400;
      pair.push_back(b.figure(coverage_chart_svg(cc), b.stem("coverage", sf), ""));
    }
    // The input-cost chart and the coverage chart side by side.
    if (pair.size() == 1) s.blocks.push_back(std::move(pair.front()));
    if (pair.size() == 2) s.blocks.push_back(HtmlFigureRow{std::move(pair)});

    // Overall accuracy (horizon 0): one row per model, production, with the oracle MASE beside it.
    HtmlTable t;
    t.caption = "Accuracy over all horizons, inputs as in production";
    t.sortable = true;
    const auto score_cols = a.level_columns("interval_score_");
    const int cmase = a.table().column_index("mase");
    const int crmse = a.table().column_index("rmse");
    t.columns = {{"Model", "", NumberFormat::automatic, 3}, {"Forecasts", "", NumberFormat::automatic, 0},
                 {"MAE", "", NumberFormat::automatic, 3},   {"RMSE", "", NumberFormat::automatic, 3},
                 {"MASE", "", NumberFormat::automatic, 3}};
    for (const auto& [level, col] : cov_cols)
      t.columns.push_back({"Coverage " + pct(level), "", NumberFormat::percent, 1});
    if (!score_cols.empty())
      t.columns.push_back({"Interval score " + pct(score_cols.back().first), "", NumberFormat::automatic, 3});
    t.columns.push_back({"MASE, inputs known", "", NumberFormat::automatic, 3});
    for (const auto& m : models) {
      const double count = ccount >= 0 ? value_at(m, "production", 0, ccount) : kNaN;
      std::vector<TableValue> row{cell(m == chosen ? m + " (chosen model)" : m),
                                  std::isfinite(count) ? cell(static_cast<int>(count)) : TableValue{},
                                  cell(value_at(m, "production", 0, cmae)),
                                  cell(crmse >= 0 ? value_at(m, "production", 0, crmse) : kNaN),
                                  cell(cmase >= 0 ? value_at(m, "production", 0, cmase) : kNaN)};
      for (const auto& [level, col] : cov_cols) row.push_back(cell(value_at(m, "production", 0, col)));
      if (!score_cols.empty()) row.push_back(cell(value_at(m, "production", 0, score_cols.back().second)));
      row.push_back(cell(cmase >= 0 ? value_at(m, "oracle", 0, cmase) : kNaN));
      if (m == chosen) t.highlighted_rows.push_back(static_cast<int>(t.rows.size()));
      t.rows.push_back(std::move(row));
    }
    t.note = "MASE below 1: better than the in-sample one-step naive forecast. The interval score "
             "rewards narrow intervals and penalises misses (lower is better). \"Inputs known\": the "
             "same model given the realised inputs (oracle), the floor that perfect input forecasts would reach.";
    if (!t.rows.empty()) s.blocks.push_back(std::move(t));
  }

  // The chosen model's one-step production forecasts against the actuals, origin by origin.
  if (bf.backtest) {
    const CsvFile& c = *bf.backtest;
    const int cm = c.column("model"), cmode = c.column("mode"), ch = c.column("horizon"),
              cf = c.column("forecast"), ca = c.column("actual");
    // The forecast's own time stamp (`time`); older folders only have the origin's.
    const int ct = c.table().column_index("time") >= 0 ? c.table().column_index("time")
                                                       : c.table().column_index("origin_time");
    const auto lowers = c.level_columns("lower_");
    const auto uppers = c.level_columns("upper_");
    std::vector<double> x, fcast, actual;
    std::vector<std::string> stamps;
    std::vector<std::vector<double>> lo(lowers.size()), hi(uppers.size());
    for (int r = 0; r < c.rows(); ++r) {
      if (!row_in_series(c, r, sf) || c.text(r, cm) != chosen || c.text(r, cmode) != "production" ||
          c.number(r, ch) != 1)
        continue;
      x.push_back(static_cast<double>(x.size() + 1));
      fcast.push_back(c.number(r, cf));
      actual.push_back(c.number(r, ca));
      stamps.push_back(ct >= 0 ? c.text(r, ct) : std::string());
      for (size_t l = 0; l < lowers.size(); ++l) lo[l].push_back(c.number(r, lowers[l].second));
      for (size_t l = 0; l < uppers.size(); ++l) hi[l].push_back(c.number(r, uppers[l].second));
    }
    if (!x.empty()) {
      LineChart lc;
      // Widest band first, so the narrower one is drawn over it.
      for (size_t l = lowers.size(); l-- > 0;) {
        size_t u = 0;
        while (u < uppers.size() && uppers[u].first != lowers[l].first) ++u;
        if (u == uppers.size()) continue;
        lc.bands.push_back(Band{pct(lowers[l].first) + " interval", x, lo[l], hi[u],
                                kBandColour, l + 1 == lowers.size() ? 0.2 : 0.4, BandStyle::filled});
      }
      // The colour roles of every chart: observed ink, the model vermillion, its bands orange.
      lc.series.push_back(LineSeries{"actual", x, actual, -1, true, LineStyle::solid, true});
      lc.series.push_back(
          LineSeries{"one-step forecast", x, fcast, kModelColour, false, LineStyle::solid, false});
      lc.x_ticks = time_ticks(x, stamps, kWideChart);
      lc.frame.title = "Chosen model's one-step backtest forecasts: actuals outside the bands are misses";
      lc.frame.subtitle = chosen + " · inputs as in production";
      lc.frame.x_title = "Time of the one-step forecast";
      lc.frame.y_title = sf.name;
      lc.frame.width = kWideChart;
      s.blocks.push_back(b.figure(line_chart_svg(lc), b.stem("backtest_one_step", sf), ""));
    }
  }

  if (bf.comparisons) {
    // One row per challenger: at which horizons either model is significantly better.
    const CsvFile& c = *bf.comparisons;
    const int cl = c.column("chosen"), cc = c.column("challenger"), ch = c.column("horizon"),
              cn = c.column("n"), cd = c.column("mean_difference"), cp = c.column("p_value"),
              cs = c.column("status");
    struct Summary {
      std::vector<int> chosen_better, challenger_better;
      int tested = 0;
      double min_p = kNaN, pooled_difference = kNaN, pooled_p = kNaN;
      std::map<std::string, std::vector<int>> odd_status;  // status other than ok -> horizons
    };
    std::vector<std::pair<std::string, Summary>> rows;
    std::string compared_chosen;
    for (int r = 0; r < c.rows(); ++r) {
      if (!row_in_series(c, r, sf)) continue;
      compared_chosen = c.text(r, cl);
      const std::string& who = c.text(r, cc);
      auto it = std::find_if(rows.begin(), rows.end(), [&](const auto& e) { return e.first == who; });
      if (it == rows.end()) it = rows.insert(rows.end(), {who, Summary{}});
      Summary& sm = it->second;
      const double h = c.number(r, ch), d = c.number(r, cd), pv = c.number(r, cp);
      (void)c.number(r, cn);  // checked to be a number
      if (c.text(r, cs) != "ok" && std::isfinite(h)) sm.odd_status[c.text(r, cs)].push_back(static_cast<int>(h));
      if (h == 0) {
        sm.pooled_difference = d;
        sm.pooled_p = pv;
        continue;
      }
      if (c.text(r, cs) != "not_tested") ++sm.tested;
      if (std::isfinite(pv) && !(sm.min_p <= pv)) sm.min_p = pv;
      if (std::isfinite(pv) && pv < 0.05) (d < 0 ? sm.chosen_better : sm.challenger_better).push_back(static_cast<int>(h));
    }
    const auto ranges = [](std::vector<int> v) {
      if (v.empty()) return std::string("none");
      std::sort(v.begin(), v.end());
      std::vector<std::string> parts;
      for (size_t i = 0; i < v.size();) {
        size_t j = i;
        while (j + 1 < v.size() && v[j + 1] == v[j] + 1) ++j;
        parts.push_back(j == i ? std::to_string(v[i]) : fmt::format("{}\u2013{}", v[i], v[j]));
        i = j + 1;
      }
      return join(parts, ", ");
    };
    bool pooled = false;
    for (const auto& [who, sm] : rows) pooled = pooled || std::isfinite(sm.pooled_p);
    HtmlTable t;
    t.caption = "Is the chosen model better than each challenger? Diebold-Mariano tests, small-sample corrected";
    t.sortable = true;
    t.columns = {{"Challenger", "", NumberFormat::automatic, 3},
                 {"Horizons tested", "", NumberFormat::automatic, 0},
                 {"Chosen model better at", "", NumberFormat::automatic, 3},
                 {"Challenger better at", "", NumberFormat::automatic, 3},
                 {"Smallest p-value", "", NumberFormat::p_value, 3}};
    if (pooled) {
      t.columns.push_back({"Mean loss difference, all horizons", "", NumberFormat::automatic, 3});
      t.columns.push_back({"p-value, all horizons", "", NumberFormat::p_value, 3});
    }
    t.columns.push_back({"Notes", "", NumberFormat::automatic, 3});
    for (const auto& [who, sm] : rows) {
      std::vector<TableValue> row{cell(who), cell(sm.tested), cell(ranges(sm.chosen_better)),
                                  cell(ranges(sm.challenger_better)), cell(sm.min_p)};
      if (pooled) {
        row.push_back(cell(sm.pooled_difference));
        row.push_back(cell(sm.pooled_p));
      }
      // Each status in words: why a horizon has no test, or a test of a weaker kind.
      const auto meaning = [](const std::string& status) -> std::string {
        if (status == "not_tested")
          return "not tested (fewer than h + 3 paired forecasts; more origins test more horizons)";
        if (status == "variance_fallback")
          return "tested with the lag-0 variance only (the long-run variance was not positive)";
        if (status == "degenerate") return "no test (the two models' losses are equal)";
        return status;
      };
      std::vector<std::string> notes;
      for (const auto& [status, hs] : sm.odd_status)
        notes.push_back(fmt::format("horizon{} {}: {}", hs.size() == 1 ? "" : "s", ranges(hs),
                                    meaning(status)));
      row.push_back(cell(join(notes, "; ")));
      t.rows.push_back(std::move(row));
    }
    t.note = fmt::format(
        "Chosen model: {}. Squared-error loss, one test per horizon; \"better at\" lists the horizons where "
        "the mean loss difference (chosen model minus challenger) is significant at 5% (two-sided). "
        "Every test is in {}.",
        compared_chosen, fs::path(c.table().source).filename().string());
    if (!t.rows.empty()) s.blocks.push_back(std::move(t));
  }

  if (bf.input_value) {
    const CsvFile& c = *bf.input_value;
    HtmlTable t;
    t.caption = "What each input is worth: the chosen model's backtest score with and without it";
    t.sortable = true;
    t.columns = {{"Input", "", NumberFormat::automatic, 3},       {"Score with", "", NumberFormat::automatic, 3},
                 {"Score without", "", NumberFormat::automatic, 3}, {"Difference", "", NumberFormat::automatic, 3},
                 {"Statistic", "", NumberFormat::fixed, 2},       {"p-value", "", NumberFormat::p_value, 3}};
    const int ci = c.column("input"), cw = c.column("score_with"), cwo = c.column("score_without"),
              cd = c.column("difference"), cs = c.column("statistic"), cp = c.column("p_value");
    for (int r = 0; r < c.rows(); ++r) {
      if (!row_in_series(c, r, sf)) continue;
      t.rows.push_back({cell(c.text(r, ci)), cell(c.number(r, cw)), cell(c.number(r, cwo)),
                        cell(c.number(r, cd)), cell(c.number(r, cs)), cell(c.number(r, cp))});
    }
    t.note = "An input earns its place when the score without it is clearly worse (small p-value).";
    if (!t.rows.empty()) s.blocks.push_back(std::move(t));
  }
  if (s.blocks.empty()) return std::nullopt;  // the run's backtest files hold nothing for this series
  return s;
}

// ---- Chosen model diagnostics ---------------------------------------------------------------------

std::string complex_text(const json& z) {
  if (!z.is_array() || z.size() != 2 || !z[0].is_number() || !z[1].is_number()) return json_text(z);
  const double re = z[0].get<double>(), im = z[1].get<double>();
  if (im == 0.0) return fmt::format("{:.3f}", re);
  return fmt::format("{:.3f} {} {:.3f}i", re, im < 0 ? "\u2212" : "+", std::fabs(im));
}

HtmlSection diagnostics_section(Builder& b, const SeriesFiles& sf) {
  const JsonFile f(sf.fit_file);
  const json& fit = *sf.fit;
  HtmlSection s;
  s.heading = "Chosen model diagnostics" + b.suffix(sf);
  s.intro = "Checks of the chosen model's fit: residuals should look like white noise, estimates should "
            "be well determined, and no root should sit near the unit circle.";
  HtmlKeyValues kv;
  kv.items.emplace_back("Model", f.text(fit, "label", ""));
  kv.items.emplace_back("Status", f.text(fit, "status", ""));
  const std::pair<const char*, const char*> criteria[] = {{"loglik", "Log-likelihood"},
                                                          {"sigma2", "Innovation variance \u03c3\u00b2"},
                                                          {"aic", "AIC"}, {"aicc", "AICc"}, {"bic", "BIC"}};
  for (const auto& [key, label] : criteria)
    if (fit.contains(key)) kv.items.emplace_back(label, fmt_num(f.number(fit, key, "")));
  for (const char* key : {"n_obs", "n_params"})
    if (fit.contains(key)) kv.items.emplace_back(key == std::string("n_obs") ? "Observations" : "Parameters (sigma\u00b2 included)",
                                                 json_text(fit[key]));
  if (fit.contains("frequency") && fit["frequency"].is_string())
    kv.items.emplace_back("Frequency", fit["frequency"].get<std::string>());
  // What was missing, filled or inserted, per column (the data layer's own sentences).
  if (fit.contains("missing") && fit["missing"].is_array()) {
    std::string lines;
    for (const auto& line : fit["missing"])
      if (line.is_string()) lines += (lines.empty() ? "" : "; ") + line.get<std::string>();
    kv.items.emplace_back("Missing values", lines.empty() ? "none" : lines);
  }
  if (fit.contains("seasonal_note") && fit["seasonal_note"].is_string())
    kv.items.emplace_back("Seasonal period", fit["seasonal_note"].get<std::string>());
  s.blocks.push_back(std::move(kv));

  const json empty = json::object();
  const json& d = fit.contains("diagnostics") && fit["diagnostics"].is_object() ? fit["diagnostics"] : empty;
  if (d.contains("residual_acf") && d["residual_acf"].is_object()) {
    const json& acf = d["residual_acf"];
    BarChart bc;
    bc.x = f.numbers(acf, "lags", "diagnostics.residual_acf.");
    bc.values = f.numbers(acf, "values", "diagnostics.residual_acf.");
    if (bc.x.size() != bc.values.size()) f.fail("diagnostics.residual_acf.lags", "does not match values in length");
    const double band = f.number(acf, "band", "diagnostics.residual_acf.");
    if (std::isfinite(band)) bc.band = {band};
    bc.band_label = fmt::format("\u00b1{} (2/\u221an)", short_num(band));
    int beyond = 0;
    for (double v : bc.values) beyond += std::isfinite(band) && std::fabs(v) > band ? 1 : 0;
    bc.frame.title = "Residual autocorrelation: bars beyond the band point to structure the noise model missed";
    bc.frame.subtitle = fmt::format("{} of {} lags beyond the band (about 1 in 20 is expected by chance)", beyond,
                                    bc.values.size());
    bc.frame.x_title = "Lag (steps)";
    bc.frame.y_title = "Autocorrelation of residuals";
    bc.frame.width = kWideChart;
    s.blocks.push_back(b.figure(bar_chart_svg(bc), b.stem("residual_acf", sf), ""));
  }
  // Residuals against each input (absent from fit files written before the check).
  if (d.contains("residual_input_ccf") && d["residual_input_ccf"].is_array() &&
      !d["residual_input_ccf"].empty()) {
    HtmlTable t;
    t.caption = "Residual\u2013input cross-correlation test";
    t.columns = {{"Input", "", NumberFormat::automatic, 3},
                 {"Lags", "", NumberFormat::automatic, 0},
                 {"Degrees of freedom", "", NumberFormat::automatic, 0},
                 {"Statistic", "", NumberFormat::fixed, 2},
                 {"p-value", "", NumberFormat::p_value, 3},
                 {"Largest at lag", "", NumberFormat::automatic, 0},
                 {"Input treatment", "", NumberFormat::automatic, 0}};
    for (size_t i = 0; i < d["residual_input_ccf"].size(); ++i) {
      const json& e = d["residual_input_ccf"][i];
      const std::string path = fmt::format("diagnostics.residual_input_ccf[{}].", i);
      const std::string name = f.text(e, "input", path);
      BarChart bc;
      bc.x = f.numbers(e, "lags", path);
      bc.values = f.numbers(e, "values", path);
      if (bc.x.size() != bc.values.size()) f.fail(path + "lags", "does not match values in length");
      const double band = f.number(e, "band", path);
      const double stat = f.number(e, "statistic", path), p = f.number(e, "p_value", path);
      const double df = f.number(e, "df", path);
      if (std::isfinite(band)) bc.band = {band};
      bc.band_label = fmt::format("\u00b1{} (1.96/\u221an)", short_num(band));
      // The lag k >= 0 with the largest |r|: where a missing term would sit.
      double max_lag = 0.0, largest = -1.0, largest_lag = kNaN;
      for (size_t k = 0; k < bc.x.size(); ++k) {
        max_lag = std::max(max_lag, bc.x[k]);
        if (bc.x[k] >= 0 && std::isfinite(bc.values[k]) && std::fabs(bc.values[k]) > largest)
          largest = std::fabs(bc.values[k]), largest_lag = bc.x[k];
      }
      bc.frame.title = fmt::format(
          "Residuals vs {}: bars beyond the band at k \u2265 0 mark lags its transfer function "
          "misses",
          name);
      const std::string treatment = treatment_of(e);
      // An event or indicator cannot respond to the target: its bars at k < 0 are chance.
      const bool deterministic = treatment.find("not prewhitened") != std::string::npos;
      bc.frame.subtitle = fmt::format(
          "{}: {}; test over lags 0\u2013{:.0f}: S = {}, df {:.0f}, p = {}{}; {}",
          name, treatment, max_lag, short_num(stat), df, p < 0.001 ? "< 0.001" : short_num(p),
          p < 0.01 ? " (significant)" : "",
          deterministic ? "bars at k < 0 are chance (it cannot respond to the target)"
                        : "bars at k < 0 (residual first) point to feedback");
      bc.frame.x_title =
          fmt::format("Lag k (steps; {} at t\u2212k against the residual at t)", name);
      bc.frame.y_title = "Cross-correlation";
      bc.frame.width = kWideChart;
      s.blocks.push_back(b.figure(bar_chart_svg(bc), b.stem("residual_ccf_" + name, sf), ""));
      t.rows.push_back(
          {cell(name), cell(fmt::format("0\u2013{:.0f}", max_lag)),
           std::isfinite(df) ? cell(static_cast<int>(df)) : cell(kNaN), cell(stat), cell(p),
           std::isfinite(largest_lag) ? cell(static_cast<int>(largest_lag)) : cell(kNaN),
           cell(treatment)});
    }
    t.note =
        "Portmanteau over lags 0 to L of the residuals against each input, with "
        "L + 1 \u2212 (r + s + 1) degrees of freedom. Data columns are prewhitened by their own AR "
        "model, as in the screen; events and indicator columns are not (a step is differenced "
        "once more into a pulse), and for them the p-value is approximate. A small p-value: try "
        "another delay or more numerator or denominator lags.";
    s.blocks.push_back(std::move(t));
  }
  if (d.contains("ljung_box") && d["ljung_box"].is_array() && !d["ljung_box"].empty()) {
    HtmlTable t;
    t.caption = "Ljung-Box test of the residuals";
    t.columns = {{"Lags", "", NumberFormat::automatic, 0},
                 {"Degrees of freedom", "", NumberFormat::automatic, 0},
                 {"Statistic", "", NumberFormat::fixed, 2},
                 {"p-value", "", NumberFormat::p_value, 3}};
    for (size_t i = 0; i < d["ljung_box"].size(); ++i) {
      const json& e = d["ljung_box"][i];
      const std::string path = fmt::format("diagnostics.ljung_box[{}].", i);
      t.rows.push_back({json_cell(f.at(e, "lag", path)), json_cell(f.at(e, "df", path)),
                        cell(f.number(e, "statistic", path)), cell(f.number(e, "p_value", path))});
    }
    t.note = "A small p-value: the residuals are still autocorrelated up to that lag.";
    s.blocks.push_back(std::move(t));
  }
  if (fit.contains("params") && fit["params"].is_array() && !fit["params"].empty()) {
    HtmlTable t;
    t.caption = "Estimates";
    t.columns = {{"Parameter", "", NumberFormat::automatic, 3},
                 {"Estimate", "", NumberFormat::automatic, 3},
                 {"Standard error", "", NumberFormat::automatic, 3},
                 {"Estimate / s.e.", "", NumberFormat::fixed, 2}};
    for (size_t i = 0; i < fit["params"].size(); ++i) {
      const json& e = fit["params"][i];
      const std::string path = fmt::format("params[{}].", i);
      const double v = f.number(e, "value", path), se = f.number(e, "std_error", path);
      t.rows.push_back({cell(f.text(e, "name", path)), cell(v), cell(se), cell(se > 0 ? v / se : kNaN)});
    }
    t.note = "Estimates within about two standard errors of zero are not well determined by the data.";
    s.blocks.push_back(std::move(t));
  }
  if (d.contains("gains") && d["gains"].is_array() && !d["gains"].empty()) {
    HtmlTable t;
    t.caption = "Steady-state gains";
    t.note = "The eventual change in the (transformed) target after a lasting unit step in the input.";
    t.columns = {{"Input", "", NumberFormat::automatic, 3},
                 {"Gain", "", NumberFormat::automatic, 3},
                 {"Standard error", "", NumberFormat::automatic, 3}};
    for (size_t i = 0; i < d["gains"].size(); ++i) {
      const json& e = d["gains"][i];
      const std::string path = fmt::format("diagnostics.gains[{}].", i);
      t.rows.push_back({cell(f.text(e, "input", path)), cell(f.number(e, "gain", path)),
                        cell(f.number(e, "std_error", path))});
    }
    s.blocks.push_back(std::move(t));
  }
  if (d.contains("roots") && d["roots"].is_array() && !d["roots"].empty()) {
    HtmlTable t;
    t.caption = "Polynomial roots";
    t.note = "Moduli close to 1 mean a nearly non-stationary or nearly non-invertible factor; equal roots "
             "in two polynomials mean factors that cancel.";
    t.columns = {{"Polynomial", "", NumberFormat::automatic, 3},
                 {"Smallest modulus", "", NumberFormat::fixed, 3},
                 {"Roots", "", NumberFormat::automatic, 3}};
    for (size_t i = 0; i < d["roots"].size(); ++i) {
      const json& e = d["roots"][i];
      const std::string path = fmt::format("diagnostics.roots[{}].", i);
      std::vector<std::string> zs;
      if (e.contains("roots") && e["roots"].is_array())
        for (const auto& z : e["roots"]) zs.push_back(complex_text(z));
      t.rows.push_back({cell(f.text(e, "polynomial", path)), cell(f.number(e, "min_modulus", path)),
                        cell(join(zs, ", "))});
    }
    s.blocks.push_back(std::move(t));
  }
  if (d.contains("warnings") && d["warnings"].is_array())
    for (const auto& w : d["warnings"]) s.blocks.push_back(HtmlNotice{Tone::warning, "Warning", json_text(w)});
  return s;
}

std::string config_details(const std::string& text) {
  return fmt::format(
      "<details><summary>Config the model came from (YAML)</summary>\n"
      "<pre style=\"white-space: pre-wrap; font-size: 0.85em; background: #f6f6f6; "
      "padding: 8px 12px; margin: 6px 0; border-left: 3px solid #d6d6d6;\">{}</pre>\n</details>",
      escape_markup(text));
}

}  // namespace

ReportResult write_report(const fs::path& run_dir, const ReportOptions& options) {
  options.validate();
  ReportResult result;
  RunFolder run = read_run_folder(run_dir, result.warnings);
  std::vector<std::string> files_read = run.files_read;

  Builder b(run, options, result);
  HtmlPage& page = b.page;
  const std::string folder = !options.folder_name.empty() ? options.folder_name
                             : run_dir.filename().empty()
                                 ? run_dir.parent_path().filename().string()
                                 : run_dir.filename().string();
  page.title = options.title.empty() ? fmt::format("Run report: {}", folder) : options.title;
  run.name = folder;
  std::vector<std::string> names;
  for (const auto& sf : run.series) names.push_back(sf.name);
  page.subtitle = names.empty() ? std::string()
                                : fmt::format("{} {}", names.size() == 1 ? "Series" : "Series:", join(names, ", "));
  // What the rows are sorted by: the criterion, and the backtest score for a backtested shortlist.
  if (run.ranking) {
    bool backtested = false;
    for (const auto& row : run.ranking->rows)
      backtested = backtested || std::isfinite(row.backtest_score);
    page.subtitle += fmt::format(
        "{}candidates ranked by {}{}", page.subtitle.empty() ? "" : " · ",
        criterion_label(run.ranking->criterion),
        backtested ? ", the backtested shortlist by its backtest score" : "");
  }

  if (run.revalidation)
    for (auto& s : revalidation_sections(json::parse(run.revalidation->dump()),
                                         (run_dir / run_files::kRevalidation).string()))
      page.sections.push_back(std::move(s));
  std::string config_text;
  if (!run.series.empty()) page.sections.push_back(summary_section(run, config_text));

  for (const SeriesFiles& sf : run.series) {
    if (sf.screen) {
      HtmlSection s;
      add_input_sections(b, sf, s);
      page.sections.push_back(std::move(s));
    }
    if (run.ranking && !sf.rows.empty())
      page.sections.push_back(ranking_section(b, sf, *run.ranking, options));
    if (sf.forecast)
      if (auto s = forecast_section(b, sf, options)) page.sections.push_back(std::move(*s));
    if (auto s = past_of_series(b, sf)) page.sections.push_back(std::move(*s));
    if (auto s = backtest_section(b, run, sf, options, files_read)) page.sections.push_back(std::move(*s));
    if (sf.fit)
      if (auto e = effects_section(*sf.fit, b.suffix(sf))) {
        if (!e->chart_svg.empty())
          e->section.blocks.insert(e->section.blocks.begin(),
                                   b.figure(e->chart_svg, b.stem("effects", sf), e->chart_caption));
        page.sections.push_back(std::move(e->section));
      }
    if (sf.fit) page.sections.push_back(diagnostics_section(b, sf));
  }
  if (run.series.empty() && !run.revalidation)
    result.warnings.push_back("the run folder names no series; the report shows the ranking only");

  page.footer = fmt::format("{} · built from {}", options.footer, join(files_read, ", "));
  std::string html = render_html(page);
  if (!config_text.empty()) {
    const std::string marker = "<p>" + escape_markup(kConfigMarker) + "</p>";
    const auto at = html.find(marker);
    if (at != std::string::npos) html.replace(at, marker.size(), config_details(config_text));
  }
  for (const auto& s : page.sections) result.sections.push_back(s.heading);
  b.write_charts();
  result.path = run_dir / run_files::kReport;
  write_file_atomic(result.path, html);
  return result;
}

}  // namespace lagsieve
