#include "batch/tables.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>

#include "io/csv.h"
#include "search/ranking.h"

namespace lagsieve {
namespace {

std::string level_tag(double level) { return fmt::format("{:g}", 100.0 * level); }

double number(const nlohmann::json& j, const char* key) {
  return j.contains(key) && j[key].is_number() ? j[key].get<double>()
                                                : std::numeric_limits<double>::quiet_NaN();
}

}  // namespace

std::string forecasts_header(const std::vector<double>& levels) {
  std::string out = "series,time,horizon,point,mean";
  for (double l : levels) out += fmt::format(",lower_{0},upper_{0}", level_tag(l));
  for (double l : levels) out += fmt::format(",known_lower_{0},known_upper_{0}", level_tag(l));
  return out + "\n";
}

std::string forecast_rows(const std::string& series, const ForecastResult& f) {
  std::string out;
  const std::string key = csv_field(series);
  for (size_t h = 0; h < f.median.size(); ++h) {
    out += fmt::format("{},{},{},{},{}", key, csv_field(h < f.time.size() ? f.time[h] : ""), h + 1,
                       csv_number(f.median[h]), csv_number(h < f.mean.size() ? f.mean[h] : NAN));
    for (size_t l = 0; l < f.levels.size(); ++l)
      out += fmt::format(",{},{}", csv_number(f.lower[l][h]), csv_number(f.upper[l][h]));
    for (size_t l = 0; l < f.levels.size(); ++l)
      out += fmt::format(",{},{}", csv_number(f.lower_known[l][h]),
                         csv_number(f.upper_known[l][h]));
    out += "\n";
  }
  return out;
}

std::string with_series_column(const std::string& series, const std::string& rows) {
  const std::string key = csv_field(series) + ",";
  std::string out;
  size_t begin = 0;
  while (begin < rows.size()) {
    size_t end = rows.find('\n', begin);
    if (end == std::string::npos) end = rows.size();
    out += key;
    out.append(rows, begin, end - begin);
    out += '\n';
    begin = end + 1;
  }
  return out;
}

std::string ranking_header(const RunConfig& config) { return ranking_csv({}, config); }

SeriesSummary summary_from_json(const nlohmann::json& j) {
  SeriesSummary s;
  s.series = j.value("series", "");
  s.folder = j.value("folder", "");
  s.model = j.value("model_file", "");
  const std::string status = j.value("status", "failed");
  for (const auto st : {SeriesStatus::ok, SeriesStatus::no_usable_candidate,
                        SeriesStatus::bad_data, SeriesStatus::failed})
    if (status == to_string(st)) s.status = st;
  s.reason = j.value("reason", "");
  s.rows = j.value("rows", 0);
  s.first_time = j.value("first_time", "");
  s.last_time = j.value("last_time", "");
  s.candidates = j.value("candidates", 0);
  s.fitted = j.value("fitted", 0);
  s.resumed = j.value("resumed", 0);
  s.usable = j.value("usable", 0);
  s.chosen = j.value("chosen", "");
  if (j.contains("inputs"))
    for (const auto& in : j["inputs"]) {
      ChosenInput li;
      li.name = in.value("name", "");
      li.included = in.value("included", false);
      li.delay = in.value("b", 0);
      li.denominator = in.value("r", 0);
      li.numerator = in.value("s", 0);
      s.inputs.push_back(li);
    }
  if (j.contains("noise")) {
    const auto& n = j["noise"];
    s.ar = n.value("ar", 0);
    s.ma = n.value("ma", 0);
    s.seasonal_ar = n.value("seasonal_ar", 0);
    s.seasonal_ma = n.value("seasonal_ma", 0);
    s.constant = n.value("constant", false);
  }
  s.criterion = number(j, "criterion");
  s.ljung_box_p = number(j, "ljung_box_p");
  s.backtest_score = number(j, "backtest_score");
  s.benchmark_score = number(j, "benchmark_score");
  s.benchmark_p = number(j, "benchmark_p");
  s.warnings =
      warnings_from_json(j.contains("warning_codes") ? j["warning_codes"] : nlohmann::json(),
                         j.contains("warnings") ? j["warnings"] : nlohmann::json());
  s.seconds = number(j, "seconds");
  return s;
}

}  // namespace lagsieve
