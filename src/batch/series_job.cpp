#include "batch/series_job.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <map>
#include <optional>

#include "core/error.h"
#include "core/names.h"
#include "data/load.h"
#include "forecast/forecast.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "io/csv.h"
#include "model/past.h"
#include "screen/screen.h"
#include "search/ranking.h"
#include "search/run_folder.h"
#include "search/search_outliers.h"
#include "search/shortlist.h"
#include "batch/tables.h"

namespace lagsieve {

const char* to_string(SeriesStatus s) {
  switch (s) {
    case SeriesStatus::ok:
      return "ok";
    case SeriesStatus::no_usable_candidate:
      return "no_usable_candidate";
    case SeriesStatus::bad_data:
      return "bad_data";
    case SeriesStatus::failed:
      return "failed";
  }
  return "failed";
}

namespace {

ForecastOptions chosen_forecast_options(const RunConfig& config) {
  ForecastOptions options;
  options.horizon = config.forecast.horizon > 0 ? config.forecast.horizon
                    : config.backtest.enabled   ? config.backtest.horizon
                                                : 12;
  options.levels = config.forecast.levels;
  options.parameter_uncertainty = config.forecast.parameter_uncertainty;
  return options;
}

void write_forecast_json(const std::filesystem::path& path, const std::optional<ForecastResult>& f,
                         const std::string& note, const SeriesData& data,
                         const ForecastOptions& options) {
  nlohmann::json j;
  j["series"] = data.target_name;
  j["horizon"] = options.horizon;
  j["forecast"] = f ? forecast_to_json(*f) : nlohmann::json(nullptr);
  if (!f) j["note"] = note;
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

}  // namespace

std::optional<ForecastResult> chosen_forecast(const FittedModel& model, const SeriesData& data,
                                              const RunConfig& config, std::string* note) {
  try {
    return forecast(model, data, {}, chosen_forecast_options(config));
  } catch (const InputError& e) {
    // Inputs declared known need future values the search does not have.
    if (note) *note = std::string("no forecast from the end of the data: ") + e.what();
    return std::nullopt;
  }
}

void write_chosen_forecast(const std::filesystem::path& path, const FittedModel& model,
                           const SeriesData& data, const RunConfig& config) {
  std::string note;
  const auto f = chosen_forecast(model, data, config, &note);
  write_forecast_json(path, f, note, data, chosen_forecast_options(config));
}

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
      "no usable candidate among {} ({}){}", r.rows.size(), counts.empty() ? "none fitted" : counts,
      why.empty() ? "" : fmt::format("; most often ({} of {}): {}", most, r.rows.size(), why));
}

namespace {

void fill_chosen(SeriesSummary& s, const SearchResult& r, const RunConfig& config) {
  const CandidateRow& top = r.rows.front();
  s.chosen = top.key;
  s.criterion = top.criterion(config.search.criterion);
  s.ljung_box_p = top.ljung_box_p;
  for (const auto& ic : config.inputs) {
    ChosenInput in{ic.name};
    for (const auto& term : top.spec.inputs)
      if (term.name == ic.name)
        in = {ic.name, true, term.order.delay, term.order.numerator, term.order.denominator};
    s.inputs.push_back(in);
  }
  s.ar = top.spec.noise.p;
  s.ma = top.spec.noise.q;
  s.seasonal_ar = top.spec.noise.seasonal_p;
  s.seasonal_ma = top.spec.noise.seasonal_q;
  s.constant = top.spec.constant;
}

void fill_backtest(SeriesSummary& s, const ShortlistBacktest& bt) {
  const auto& res = bt.result;
  if (res.chosen < 0) return;
  const auto& chosen = res.models[res.chosen];
  s.backtest_score = chosen.score;
  for (size_t i = 0; i < res.models.size(); ++i) {
    // The first benchmark of the shortlist plan is the best model without inputs.
    if (!res.models[i].benchmark || bt.candidates[i].kind != BacktestCandidate::Kind::model)
      continue;
    s.benchmark_score = res.models[i].score;
    for (const auto& c : res.comparisons)
      if (c.challenger == res.models[i].name && c.horizon == 1 && c.tested)
        s.benchmark_p = c.test.p_value;
    break;
  }
}

// The chosen model as a model file (with detected effects: the data with their columns, and the
// chosen model's set in its model file), and the data it was fitted on.
FittedModel chosen_model(const SeriesData& fitted, const RunConfig& config, const SearchResult& r,
                         const std::optional<ShortlistBacktest>& bt) {
  FittedModel model = make_fitted_model(
      r.chosen, config, fitted,
      r.rows.empty() ? std::vector<OutlierEffect>{} : row_effects(r.rows.front(), r));
  if (bt && bt->result.chosen >= 0)
    model.backtest = accuracy_json(bt->result.models[bt->result.chosen], bt->options);
  return model;
}

void write_series_files(const std::filesystem::path& dir, const SeriesData& data,
                        const RunConfig& config, SearchResult& r,
                        const std::optional<ShortlistBacktest>& bt, const SeriesSummary& s,
                        const FittedModel* model, const std::optional<ForecastResult>& forecast,
                        const std::string& forecast_note) {
  if (bt) {
    const auto& res = bt->result;
    write_file_atomic(dir / run_files::kBacktest, backtest_csv(res));
    write_file_atomic(dir / run_files::kAccuracy, accuracy_csv(res));
    write_file_atomic(dir / run_files::kComparisons, comparisons_csv(res));
    write_file_atomic(dir / run_files::kInputValue, input_value_csv(res));
  }
  const ScreenResult screen = r.screen ? *r.screen : screen_series(data, config);
  write_file_atomic(dir / run_files::kScreen, to_json(screen).dump(1) + "\n");
  write_file_atomic(dir / run_files::kRankingCsv, ranking_csv(r.rows, config));
  write_file_atomic(dir / run_files::kRankingJson,
                    ranking_json(r.rows, config, {r}).dump(1) + "\n");
  if (s.status != SeriesStatus::ok || !model) return;
  const SeriesData fitted = search_data(data, r);
  save_model(dir / run_files::model_file(r.series, false), *model);
  auto fit_json = fit_to_json(r.chosen);
  fit_json["series"] = r.series;
  fit_json["frequency"] = data.frequency;
  fit_json["missing"] = describe_missing(data);
  if (!config.seasonal_note.empty()) fit_json["seasonal_note"] = config.seasonal_note;
  if (r.outliers) fit_json["outliers"] = search_outliers_json(*r.outliers, data);
  const PastFit past = explain_past(fitted, r.chosen.spec, r.chosen.params, r.chosen.start);
  fit_json["past"] = past_to_json(past);
  write_file_atomic(dir / run_files::kPast, past_csv(past));
  write_file_atomic(dir / run_files::kFit, fit_json.dump(1) + "\n");
  write_forecast_json(dir / run_files::kForecast, forecast, forecast_note, fitted,
                      chosen_forecast_options(config));
}

// The series' rows of the run-level tables (the headers are written once, by the batch).
void fill_tables(SeriesTables& t, const std::string& series, const RunConfig& config,
                 const SearchResult& r, const std::optional<ShortlistBacktest>& bt,
                 const std::optional<ForecastResult>& forecast) {
  const auto rows_of = [](const std::string& csv) {
    const auto eol = csv.find('\n');
    return eol == std::string::npos ? std::string() : csv.substr(eol + 1);
  };
  t.ranking = rows_of(ranking_csv(r.rows, config));
  if (forecast) t.forecasts = forecast_rows(series, *forecast);
  if (bt) {
    const std::string csv = accuracy_csv(bt->result);
    t.accuracy_header = "series," + csv.substr(0, csv.find('\n') + 1);
    t.accuracy = with_series_column(series, rows_of(csv));
  }
}

}  // namespace

SeriesSummary bad_series_summary(const std::string& series, const std::string& folder,
                                 const std::string& reason) {
  SeriesSummary s;
  s.series = series;
  s.folder = folder;
  s.status = SeriesStatus::bad_data;
  s.reason = reason;
  return s;
}

SeriesSummary run_series_job(const SeriesData& data, const RunConfig& config,
                             const SeriesJobOptions& options) {
  const auto t0 = std::chrono::steady_clock::now();
  SeriesSummary s;
  s.series = data.target_name;
  s.rows = data.rows();
  if (!data.time.empty()) s.first_time = data.time.front(), s.last_time = data.time.back();
  try {
    SearchOptions so;
    so.threads = options.threads;
    so.journal = options.journal;
    so.progress = options.progress;
    so.cancel = options.cancel;
    SearchResult r = run_search(data, config, so);
    check_cancel(options.cancel);
    std::optional<ShortlistBacktest> bt;
    if (config.backtest.enabled && options.backtest && r.has_chosen())
      bt = backtest_shortlist(data, config, r, options.threads, options.cancel);
    s.candidates = static_cast<int>(r.rows.size());
    s.fitted = r.fitted;
    s.resumed = r.resumed;
    for (const auto& row : r.rows) s.usable += row.rankable() ? 1 : 0;
    s.warnings = r.warnings;
    if (r.has_chosen()) {
      s.status = SeriesStatus::ok;
      fill_chosen(s, r, config);
      if (bt) fill_backtest(s, *bt);
    } else {
      s.status = SeriesStatus::no_usable_candidate;
      s.reason = no_candidate_reason(r);
    }
    const bool folder = !options.folder.empty() && (!options.keep_folder || options.keep_folder(s));
    std::optional<FittedModel> model;
    std::optional<ForecastResult> forecast;
    std::string forecast_note;
    if (s.status == SeriesStatus::ok && (folder || options.tables || !options.model_file.empty())) {
      const SeriesData fitted = search_data(data, r);
      model = chosen_model(fitted, config, r, bt);
      if (folder || options.tables) {
        forecast = chosen_forecast(*model, fitted, config, &forecast_note);
        if (!forecast) s.warnings.push_back({"no_forecast", forecast_note, {}, {}});
      }
      if (!options.model_file.empty()) save_model(options.model_file, *model);
    }
    if (folder)
      write_series_files(options.folder, data, config, r, bt, s, model ? &*model : nullptr,
                         forecast, forecast_note);
    if (options.tables) fill_tables(*options.tables, s.series, config, r, bt, forecast);
  } catch (const Cancelled&) {
    throw;  // not the series' outcome: the whole run stops
  } catch (const InputError& e) {
    // A check that only the search can make (e.g. the grid over the budget for this series).
    s.status = SeriesStatus::bad_data;
    s.reason = e.what();
  } catch (const std::exception& e) {
    s.status = SeriesStatus::failed;
    s.reason = e.what();
  }
  s.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return s;
}

namespace {

std::string fixed(double v) { return std::isfinite(v) ? csv_number(v) : ""; }

std::string inputs_text(const SeriesSummary& s) {
  std::string out;
  for (const auto& in : s.inputs) {
    if (!in.included) continue;
    out += fmt::format("{}{} b={} r={} s={}", out.empty() ? "" : "; ", in.name, in.delay,
                       in.denominator, in.numerator);
  }
  return out;
}

nlohmann::json number_or_null(double v) { return std::isfinite(v) ? nlohmann::json(v) : nullptr; }

}  // namespace

std::string summary_csv(const std::vector<SeriesSummary>& rows) {
  std::string out =
      "series,status,reason,rows,first_time,last_time,candidates,usable,chosen,inputs,ar,ma,"
      "seasonal_ar,seasonal_ma,constant,criterion,ljung_box_p,backtest_score,benchmark_score,"
      "benchmark_p,warnings,model_file,folder,seconds\n";
  for (const auto& s : rows)
    out += fmt::format("{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{},{:.3f}\n",
                       csv_field(s.series), to_string(s.status), csv_field(s.reason), s.rows,
                       csv_field(s.first_time), csv_field(s.last_time), s.candidates, s.usable,
                       csv_field(s.chosen), csv_field(inputs_text(s)), s.ar, s.ma, s.seasonal_ar,
                       s.seasonal_ma, s.chosen.empty() ? "" : (s.constant ? "true" : "false"),
                       fixed(s.criterion), fixed(s.ljung_box_p), fixed(s.backtest_score),
                       fixed(s.benchmark_score), fixed(s.benchmark_p), s.warnings.size(),
                       csv_field(s.model), csv_field(s.folder), s.seconds);
  return out;
}

nlohmann::json summary_json(const std::vector<SeriesSummary>& rows) {
  nlohmann::json counts = nlohmann::json::object();
  for (const auto status : {SeriesStatus::ok, SeriesStatus::no_usable_candidate,
                            SeriesStatus::bad_data, SeriesStatus::failed})
    counts[to_string(status)] = 0;
  nlohmann::json list = nlohmann::json::array();
  for (const auto& s : rows) {
    counts[to_string(s.status)] = counts[to_string(s.status)].get<int>() + 1;
    nlohmann::json inputs = nlohmann::json::array();
    for (const auto& in : s.inputs)
      inputs.push_back(in.included ? nlohmann::json{{"name", in.name},
                                                    {"included", true},
                                                    {"b", in.delay},
                                                    {"r", in.denominator},
                                                    {"s", in.numerator}}
                                   : nlohmann::json{{"name", in.name}, {"included", false}});
    list.push_back({{"series", s.series},
                    {"status", to_string(s.status)},
                    {"reason", s.reason},
                    {"folder", s.folder},
                    {"model_file", s.model},
                    {"rows", s.rows},
                    {"first_time", s.first_time},
                    {"last_time", s.last_time},
                    {"candidates", s.candidates},
                    {"fitted", s.fitted},
                    {"resumed", s.resumed},
                    {"usable", s.usable},
                    {"chosen", s.chosen},
                    {"inputs", inputs},
                    {"noise",
                     {{"ar", s.ar},
                      {"ma", s.ma},
                      {"seasonal_ar", s.seasonal_ar},
                      {"seasonal_ma", s.seasonal_ma},
                      {"constant", s.constant}}},
                    {"criterion", number_or_null(s.criterion)},
                    {"ljung_box_p", number_or_null(s.ljung_box_p)},
                    {"backtest_score", number_or_null(s.backtest_score)},
                    {"benchmark_score", number_or_null(s.benchmark_score)},
                    {"benchmark_p", number_or_null(s.benchmark_p)},
                    {"warnings", warning_texts(s.warnings)},
                    {"warning_codes", warnings_json(s.warnings)},
                    {"seconds", s.seconds}});
  }
  return {{"series_total", rows.size()}, {"by_status", counts}, {"series", list}};
}

}  // namespace lagsieve
