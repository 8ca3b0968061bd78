#include "io/config.h"

#include <fmt/format.h>
#include <fmt/ranges.h>
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "core/error.h"
#include "core/names.h"
#include "io/csv.h"
#include "io/yaml_reader.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;

// The run config's reader: the shared YAML access plus the config's own value kinds.
class Reader : public YamlReader {
 public:
  using YamlReader::YamlReader;

  template <typename Enum>
  Enum get_enum(const YAML::Node& node, const std::string& path) const {
    const auto choices = enum_choices<Enum>();
    require_scalar(node, path, "one of " + join_comma(choices));
    if (auto v = parse_enum<Enum>(node.Scalar())) return *v;
    const auto guess = closest_match(node.Scalar(), choices);
    fail(node, path,
         fmt::format("unknown value '{}'; {}choose one of: {}", node.Scalar(),
                     guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess),
                     join_comma(choices)));
  }

  // `3` or `[1, 3]`; both ends within [0, max_value] and min <= max.
  IntRange get_range(const YAML::Node& node, const std::string& path, int max_value) const {
    IntRange r;
    if (node.IsSequence()) {
      if (node.size() != 2)
        fail(node, path,
             fmt::format("expected an integer or a range [min, max], got a list of {} item{}",
                         node.size(), node.size() == 1 ? "" : "s"));
      r.min = get_int(node[0], path + "[0]");
      r.max = get_int(node[1], path + "[1]");
      if (r.min > r.max)
        fail(node, path,
             fmt::format("range [{}, {}] has min > max; write it as [{}, {}]", r.min, r.max, r.max,
                         r.min));
    } else {
      if (!node.IsScalar())
        fail(node, path,
             fmt::format("expected an integer or a range [min, max], got {}", describe(node)));
      const auto& text = node.Scalar();
      if (text.empty() || text.find_first_not_of("+-0123456789") != std::string::npos)
        fail(node, path, fmt::format("expected an integer or a range [min, max], got '{}'", text));
      r.min = r.max = get_int(node, path);
    }
    if (r.max > max_value)
      fail(node, path,
           fmt::format("{} is above the limit of {}; orders this large are not identifiable "
                       "(check for a typo)",
                       r.max, max_value));
    return r;
  }

  std::vector<double> get_levels(const YAML::Node& node, const std::string& path) const {
    std::vector<double> levels;
    if (node.IsScalar()) {
      levels.push_back(get_double(node, path));
    } else if (node.IsSequence() && node.size() > 0) {
      for (size_t i = 0; i < node.size(); ++i)
        levels.push_back(get_double(node[i], fmt::format("{}[{}]", path, i)));
    } else {
      fail(node, path,
           fmt::format("expected a list of levels such as [0.8, 0.95], got {}", describe(node)));
    }
    for (double level : levels)
      if (!(level > 0.0 && level < 1.0))
        fail(node, path,
             fmt::format("level {} is outside (0, 1); write coverage as a fraction, e.g. 0.95",
                         level));
    std::sort(levels.begin(), levels.end());
    levels.erase(std::unique(levels.begin(), levels.end()), levels.end());
    return levels;
  }
};

fs::path resolve(const fs::path& base_dir, const std::string& p) {
  const fs::path path(p);
  return path.is_absolute() ? path : (base_dir / path).lexically_normal();
}

void read_data(const Reader& rd, const YAML::Node& node, const fs::path& base, DataConfig& data) {
  const std::string path = "data";
  rd.check_map(node, path,
               {"file", "time", "time_format", "missing", "missing_inputs", "gaps", "series_key"});
  if (!node["file"]) rd.fail(node, path, "missing key `file` (the CSV file with the series)");
  data.file = resolve(base, rd.get_string(node["file"], "data.file"));
  if (const auto n = node["time"]; n && !n.IsNull()) data.time = rd.get_string(n, "data.time");
  if (const auto n = node["time_format"]; n && !n.IsNull())
    data.time_format = rd.get_string(n, "data.time_format");
  if (const auto n = node["missing"]) data.missing = rd.get_enum<MissingPolicy>(n, "data.missing");
  if (const auto n = node["missing_inputs"]) {
    data.missing_inputs = rd.get_enum<MissingPolicy>(n, "data.missing_inputs");
    if (*data.missing_inputs == MissingPolicy::skip)
      rd.fail(n, "data.missing_inputs",
              "`skip` applies to the target only (a model needs every input value it uses); "
              "use `interpolate` or `error`");
  }
  if (const auto n = node["gaps"]) data.gaps = rd.get_enum<GapPolicy>(n, "data.gaps");
  if (const auto n = node["series_key"]; n && !n.IsNull()) {
    data.series_key = rd.get_string(n, "data.series_key");
    if (data.series_key.empty())
      rd.fail(n, "data.series_key", "the column name is empty; name the column of series keys");
    if (data.series_key == data.time)
      rd.fail(n, "data.series_key",
              fmt::format("'{}' is also data.time; the key names the series, the time column "
                          "orders the rows of each",
                          data.series_key));
  }
}

void read_target(const Reader& rd, const YAML::Node& node, TargetConfig& target) {
  const std::string path = "target";
  rd.check_map(node, path, {"column", "columns", "transform", "lambda"});
  const auto one = node["column"];
  const auto many = node["columns"];
  if (one && many)
    rd.fail(node, path, "give either `column` (one series) or `columns` (a panel), not both");
  if (!one && !many)
    rd.fail(node, path, "missing key `column` (the series to forecast) or `columns` (a panel)");
  if (one) {
    target.columns.push_back(rd.get_string(one, "target.column"));
  } else {
    if (!many.IsSequence() || many.size() == 0)
      rd.fail(
          many, "target.columns",
          fmt::format("expected a non-empty list of column names, got {}", Reader::describe(many)));
    std::set<std::string> seen;
    for (size_t i = 0; i < many.size(); ++i) {
      const auto key = fmt::format("target.columns[{}]", i);
      auto name = rd.get_string(many[i], key);
      if (!seen.insert(name).second)
        rd.fail(many[i], key, fmt::format("column '{}' is listed twice", name));
      target.columns.push_back(std::move(name));
    }
  }
  if (const auto n = node["transform"])
    target.transform.kind = rd.get_enum<TransformKind>(n, "target.transform");
  const auto lambda = node["lambda"];
  if (target.transform.kind == TransformKind::boxcox) {
    if (!lambda)
      rd.fail(node, "target.lambda",
              "`transform: boxcox` needs `lambda` (e.g. 0.5 for a square root; 0 is the log)");
    target.transform.lambda = rd.get_double(lambda, "target.lambda");
    if (std::abs(target.transform.lambda) > 3.0)
      rd.fail(lambda, "target.lambda",
              fmt::format("{} is outside [-3, 3]; such a strong power transform is almost "
                          "certainly a mistake",
                          target.transform.lambda));
  } else if (lambda) {
    rd.fail(lambda, "target.lambda", "only used with `transform: boxcox`; remove it");
  }
}

void read_differencing(const Reader& rd, const YAML::Node& node, Differencing& diff) {
  const std::string path = "differencing";
  rd.check_map(node, path, {"regular", "seasonal", "period"});
  if (const auto n = node["regular"]) {
    diff.regular = rd.get_int(n, "differencing.regular");
    if (diff.regular > kMaxDifferencing)
      rd.fail(n, "differencing.regular",
              fmt::format("{} is above {}; more differencing than that over-differences the "
                          "series",
                          diff.regular, kMaxDifferencing));
  }
  if (const auto n = node["seasonal"]) {
    diff.seasonal = rd.get_int(n, "differencing.seasonal");
    if (diff.seasonal > kMaxDifferencing)
      rd.fail(n, "differencing.seasonal",
              fmt::format("{} is above {}", diff.seasonal, kMaxDifferencing));
  }
  if (const auto n = node["period"]) diff.period = rd.get_int(n, "differencing.period", 1);
  if (diff.seasonal > 0 && !node["period"]) return;  // from the data's frequency (load.h)
  if (diff.seasonal > 0 && diff.period < 2)
    rd.fail(node, "differencing.period",
            "a seasonal difference needs `period` of at least 2 (e.g. 7 for daily data with a "
            "weekly cycle, 12 for monthly data)");
}

// `at`: one stamp, a {from, to} window, or a list of either (a recurring event), written as
// the canonical text of data/events.h ("a;b;c..d").
std::string read_event_at(const Reader& rd, const YAML::Node& node, const std::string& path) {
  auto one = [&](const YAML::Node& n, const std::string& key) -> std::string {
    if (n.IsMap()) {
      rd.check_map(n, key, {"from", "to"});
      if (!n["from"] || !n["to"])
        rd.fail(n, key, "a window needs both `from` and `to` (time stamps, inclusive)");
      return rd.get_string(n["from"], key + ".from") + ".." + rd.get_string(n["to"], key + ".to");
    }
    const auto text = rd.get_string(n, key);
    if (text.find(';') != std::string::npos || text.find("..") != std::string::npos)
      rd.fail(n, key, "write several dates as a YAML list, and a window as {from: .., to: ..}");
    return text;
  };
  if (!node.IsSequence()) return one(node, path);
  if (node.size() == 0) rd.fail(node, path, "an empty list; give at least one time stamp");
  std::string out;
  for (size_t i = 0; i < node.size(); ++i)
    out += (i ? ";" : "") + one(node[i], fmt::format("{}[{}]", path, i));
  return out;
}

// `events: {file: holidays.csv, date: date, name: name, to: to}`: one pulse event per distinct
// name (in order of first appearance), at every date listed for it (a window when the optional
// `to` column is filled).
void read_event_file(const Reader& rd, const YAML::Node& node, const fs::path& base,
                     std::vector<InputConfig>& inputs) {
  const std::string path = "events";
  rd.check_map(node, path, {"file", "date", "name", "to", "shape"});
  if (!node["file"]) rd.fail(node, path, "missing key `file` (a CSV of dates with a name column)");
  const auto file = resolve(base, rd.get_string(node["file"], "events.file"));
  const std::string date_col = node["date"] ? rd.get_string(node["date"], "events.date") : "date";
  const std::string name_col = node["name"] ? rd.get_string(node["name"], "events.name") : "name";
  const std::string to_col = node["to"] ? rd.get_string(node["to"], "events.to") : "";
  EventShape shape = EventShape::pulse;
  if (const auto n = node["shape"]) shape = rd.get_enum<EventShape>(n, "events.shape");
  const CsvTable table = read_csv(file);
  const int dc = table.column_index(date_col), nc = table.column_index(name_col);
  // The window end: the named column, or a column called `to` when the file has one.
  const int tc = to_col.empty() ? table.column_index("to") : table.column_index(to_col);
  if (dc < 0 || nc < 0 || (!to_col.empty() && tc < 0))
    throw InputError(fmt::format("{}: the event file needs columns '{}' and '{}'{}; its header "
                                 "is: {}",
                                 table.source, date_col, name_col,
                                 to_col.empty() ? "" : fmt::format(" and '{}'", to_col),
                                 fmt::join(table.header, ", ")));
  std::vector<std::string> order;
  std::map<std::string, std::string> at;
  for (int r = 0; r < table.row_count(); ++r) {
    const auto& name = table.rows[r][nc];
    const auto& date = table.rows[r][dc];
    if (name.empty() || date.empty())
      throw InputError(fmt::format("{}: an event row needs a name and a date", table.where(r)));
    std::string occurrence = date;
    if (tc >= 0 && !table.rows[r][tc].empty()) occurrence += ".." + table.rows[r][tc];
    if (!at.count(name)) order.push_back(name);
    at[name] += (at[name].empty() ? "" : ";") + occurrence;
  }
  for (const auto& name : order) {
    for (const auto& in : inputs)
      if (in.name == name)
        rd.fail(node, path, fmt::format("event '{}' of {} is also an input", name, file.string()));
    InputConfig in;
    in.name = name;
    in.is_event = true;
    in.shape = shape;
    in.at = at[name];
    in.line = node.Mark().line + 1;
    inputs.push_back(std::move(in));
  }
}

void read_input(const Reader& rd, const YAML::Node& node, const std::string& path,
                InputConfig& in) {
  rd.check_map(node, path,
               {"column", "event", "shape", "at", "delay", "numerator", "denominator", "optional",
                "future", "known_steps", "model"});
  in.line = node.Mark().line + 1;
  const auto column = node["column"];
  const auto event = node["event"];
  if (column && event)
    rd.fail(node, path,
            "give either `column` (a data column) or `event` (a generated input), "
            "not both");
  if (!column && !event)
    rd.fail(node, path, "missing key `column` (a data column) or `event` (a generated input)");
  in.is_event = static_cast<bool>(event);
  in.name = in.is_event ? rd.get_string(event, key_path(path, "event"))
                        : rd.get_string(column, key_path(path, "column"));
  if (in.is_event) {
    if (const auto n = node["shape"])
      in.shape = rd.get_enum<EventShape>(n, key_path(path, "shape"));
    if (!node["at"])
      rd.fail(node, path, "an event needs `at`: a time stamp of the data or a row index (from 0)");
    in.at = read_event_at(rd, node["at"], key_path(path, "at"));
    if (node["future"] || node["known_steps"] || node["model"]) {
      const auto key = node["future"] ? "future" : node["known_steps"] ? "known_steps" : "model";
      rd.fail(node[key], key_path(path, key),
              "events are generated from the config, so their future is always known; remove it");
    }
  } else {
    for (const char* key : {"shape", "at"})
      if (node[key])
        rd.fail(node[key], key_path(path, key),
                "only used with `event:` inputs; a `column:` input takes its values from the data");
  }
  if (const auto n = node["delay"]) in.delay = rd.get_range(n, key_path(path, "delay"), kMaxDelay);
  if (const auto n = node["numerator"])
    in.numerator = rd.get_range(n, key_path(path, "numerator"), kMaxNumerator);
  if (const auto n = node["denominator"])
    in.denominator = rd.get_range(n, key_path(path, "denominator"), kMaxDenominator);
  if (const auto n = node["optional"]) in.optional = rd.get_bool(n, key_path(path, "optional"));
  if (const auto n = node["future"])
    in.future = rd.get_enum<FutureMode>(n, key_path(path, "future"));
  if (const auto n = node["known_steps"]) {
    in.known_steps = rd.get_int(n, key_path(path, "known_steps"));
    if (in.future != FutureMode::forecast)
      rd.fail(n, key_path(path, "known_steps"), "only used with `future: forecast`");
  }
  if (const auto n = node["model"]) {
    const auto mpath = key_path(path, "model");
    if (in.future != FutureMode::forecast)
      rd.fail(n, mpath, "an input's own model is only used with `future: forecast`");
    rd.check_map(n, mpath, {"ar", "ma"});
    auto order = [&](const char* key) -> std::optional<int> {
      if (!n[key]) return std::nullopt;
      const int v = rd.get_int(n[key], key_path(mpath, key));
      if (v > 5)
        rd.fail(n[key], key_path(mpath, key), fmt::format("{} is above the limit of 5", v));
      return v;
    };
    in.own_model.p = order("ar");
    in.own_model.q = order("ma");
  }
}

void read_noise(const Reader& rd, const YAML::Node& node, NoiseConfig& noise) {
  const std::string path = "noise";
  rd.check_map(node, path, {"ar", "ma", "seasonal_ar", "seasonal_ma", "period", "constant"});
  if (const auto n = node["ar"]) noise.ar = rd.get_range(n, "noise.ar", kMaxArma);
  if (const auto n = node["ma"]) noise.ma = rd.get_range(n, "noise.ma", kMaxArma);
  if (const auto n = node["seasonal_ar"])
    noise.seasonal_ar = rd.get_range(n, "noise.seasonal_ar", kMaxSeasonalArma);
  if (const auto n = node["seasonal_ma"])
    noise.seasonal_ma = rd.get_range(n, "noise.seasonal_ma", kMaxSeasonalArma);
  if (const auto n = node["period"]) noise.period = rd.get_int(n, "noise.period", 1);
  if (const auto n = node["constant"])
    noise.constant = rd.get_enum<ConstantMode>(n, "noise.constant");
  if ((noise.seasonal_ar.max > 0 || noise.seasonal_ma.max > 0) && noise.period < 2 &&
      !node["period"])
    return;  // from the data's frequency (load.h)
  if ((noise.seasonal_ar.max > 0 || noise.seasonal_ma.max > 0) && noise.period < 2)
    rd.fail(node["period"] ? node["period"] : node, "noise.period",
            "seasonal AR/MA terms need a period of at least 2; set `noise.period` or "
            "`differencing.period`");
}

void read_search(const Reader& rd, const YAML::Node& node, SearchConfig& search) {
  rd.check_map(node, "search", {"strategy", "criterion", "budget", "threads"});
  if (const auto n = node["strategy"])
    search.strategy = rd.get_enum<Strategy>(n, "search.strategy");
  if (const auto n = node["criterion"])
    search.criterion = rd.get_enum<Criterion>(n, "search.criterion");
  if (const auto n = node["budget"]) search.budget = rd.get_int(n, "search.budget", 1);
  if (const auto n = node["threads"])
    search.threads = rd.get_int(n, "search.threads", 0, kMaxThreads);
}

void read_backtest(const Reader& rd, const YAML::Node& node, BacktestConfig& bt) {
  bt.enabled = true;
  if (node.IsNull()) return;  // `backtest:` alone switches it on with the defaults
  rd.check_map(node, "backtest",
               {"first_origin", "step", "horizon", "window", "window_length", "refit", "shortlist",
                "levels", "score", "selection", "selection_level", "chosen_statuses",
                 "leader_statuses"});
  if (const auto n = node["first_origin"]) bt.first_origin = rd.get_int(n, "backtest.first_origin");
  if (const auto n = node["step"]) bt.step = rd.get_int(n, "backtest.step", 1);
  if (const auto n = node["horizon"])
    bt.horizon = rd.get_int(n, "backtest.horizon", 1, kMaxHorizon);
  if (const auto n = node["window"]) bt.window = rd.get_enum<WindowKind>(n, "backtest.window");
  if (const auto n = node["window_length"]) {
    bt.window_length = rd.get_int(n, "backtest.window_length");
    if (bt.window != WindowKind::sliding)
      rd.fail(n, "backtest.window_length", "only used with `window: sliding`");
  }
  if (const auto n = node["refit"]) bt.refit = rd.get_int(n, "backtest.refit");
  if (const auto n = node["shortlist"]) bt.shortlist = rd.get_int(n, "backtest.shortlist", 1);
  if (const auto n = node["levels"]) bt.levels = rd.get_levels(n, "backtest.levels");
  if (const auto n = node["score"]) {
    const std::vector<std::string> scores{"mase", "rmse", "mae", "interval_score"};
    bt.score = rd.get_string(n, "backtest.score");
    if (std::find(scores.begin(), scores.end(), bt.score) == scores.end()) {
      const auto guess = closest_match(bt.score, scores);
      rd.fail(n, "backtest.score",
              fmt::format("unknown value '{}'; {}choose one of: {}", bt.score,
                          guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess),
                          join_comma(scores)));
    }
  }
  if (const auto n = node["selection"]) {
    const std::vector<std::string> rules{"simplest_within_noise", "best_score"};
    bt.selection = rd.get_string(n, "backtest.selection");
    if (std::find(rules.begin(), rules.end(), bt.selection) == rules.end())
      rd.fail(
          n, "backtest.selection",
          fmt::format("unknown value '{}'; choose one of: {}", bt.selection, join_comma(rules)));
  }
  if (const auto n = node["selection_level"]) {
    bt.selection_level = rd.get_double(n, "backtest.selection_level");
    if (!(bt.selection_level > 0.0 && bt.selection_level < 0.5))
      rd.fail(n, "backtest.selection_level", "must lie strictly between 0 and 0.5 (default 0.05)");
  }
  // `leader_statuses` is the legacy spelling, read for one release.
  if (node["chosen_statuses"] && node["leader_statuses"])
    rd.fail(node["leader_statuses"], "backtest.leader_statuses",
            "is the legacy name of backtest.chosen_statuses; give only chosen_statuses");
  const std::string statuses_key = node["chosen_statuses"] ? "chosen_statuses" : "leader_statuses";  // legacy
  if (const auto n = node[statuses_key]) {
    const std::vector<std::string> allowed{"ok", "no_convergence", "boundary"};
    bt.chosen_statuses.clear();
    for (size_t i = 0; i < n.size(); ++i) {
      const std::string v = rd.get_string(n[i], fmt::format("backtest.{}[{}]", statuses_key, i));
      if (std::find(allowed.begin(), allowed.end(), v) == allowed.end())
        rd.fail(n[i], "backtest." + statuses_key,
                fmt::format("'{}' cannot lead; choose among: {}", v, join_comma(allowed)));
      bt.chosen_statuses.push_back(v);
    }
  }
}

void read_fit(const Reader& rd, const YAML::Node& node, FitConfig& fc) {
  rd.check_map(node, "fit", {"filter_start", "estimation"});
  if (const auto n = node["filter_start"])
    fc.filter_start = rd.get_enum<FilterStart>(n, "fit.filter_start");
  if (const auto n = node["estimation"])
    fc.estimation = rd.get_enum<Estimation>(n, "fit.estimation");
}

void read_forecast(const Reader& rd, const YAML::Node& node, ForecastConfig& fc) {
  rd.check_map(node, "forecast", {"horizon", "levels", "parameter_uncertainty"});
  if (const auto n = node["horizon"])
    fc.horizon = rd.get_int(n, "forecast.horizon", 1, kMaxHorizon);
  if (const auto n = node["levels"]) fc.levels = rd.get_levels(n, "forecast.levels");
  if (const auto n = node["parameter_uncertainty"])
    fc.parameter_uncertainty = rd.get_bool(n, "forecast.parameter_uncertainty");
}

void read_outliers(const Reader& rd, const YAML::Node& node, OutliersConfig& oc) {
  oc.enabled = true;
  if (node.IsNull()) return;  // `outliers:` alone switches detection on with the defaults
  rd.check_map(node, "outliers", {"detect", "critical", "max", "decay"});
  if (const auto n = node["detect"]) {
    if (!n.IsSequence())
      rd.fail(n, "outliers.detect",
              fmt::format("expected a list such as [additive, level_shift, temporary], got {}",
                          Reader::describe(n)));
    oc.detect.clear();
    for (size_t i = 0; i < n.size(); ++i) {
      const auto type = rd.get_enum<OutlierType>(n[i], fmt::format("outliers.detect[{}]", i));
      if (std::find(oc.detect.begin(), oc.detect.end(), type) != oc.detect.end())
        rd.fail(n[i], fmt::format("outliers.detect[{}]", i),
                fmt::format("'{}' is listed twice", to_string(type)));
      oc.detect.push_back(type);
    }
    if (oc.detect.empty()) oc.enabled = false;  // `detect: []` switches detection off
  }
  if (const auto n = node["critical"]) {
    if (n.IsScalar() && n.Scalar() == "auto") {
      oc.critical = 0.0;
    } else {
      oc.critical = rd.get_double(n, "outliers.critical");
      if (!(oc.critical >= 2.0 && oc.critical <= 10.0))
        rd.fail(n, "outliers.critical",
                fmt::format("{} is outside [2, 10]; give a |t| threshold such as 3.5, or `auto` "
                            "for the rule that depends on the series length",
                            oc.critical));
    }
  }
  if (const auto n = node["max"]) oc.max = rd.get_int(n, "outliers.max", 1);
  if (const auto n = node["decay"]) {
    oc.decay = rd.get_double(n, "outliers.decay");
    if (!(oc.decay > 0.0 && oc.decay < 1.0))
      rd.fail(n, "outliers.decay",
              fmt::format("{} is outside (0, 1); a temporary change decays as decay^(t - T)",
                          oc.decay));
  }
}

}  // namespace

RunConfig parse_config(std::string_view yaml_text, const fs::path& config_file,
                       std::vector<InputError>* problems) {
  const Reader rd(config_file.string());
  // Collecting: each section (and each input) is read on its own, its first problem recorded and
  // its defaults kept, so one pass names a problem in every section that has one.
  auto part = [&](const auto& read) {
    if (!problems) return read();
    try {
      read();
    } catch (const InputError& e) {
      problems->push_back(e);
    }
  };
  YAML::Node root;
  try {
    root = YAML::Load(std::string(yaml_text));
  } catch (const YAML::Exception& e) {
    throw InputError(fmt::format("{}:{}: YAML syntax error: {}; check indentation and quoting",
                                 config_file.string(), e.mark.is_null() ? 0 : e.mark.line + 1,
                                 e.msg));
  }
  if (!root || root.IsNull())
    throw InputError(fmt::format("{}: the config is empty; it needs at least `data` and `target`",
                                 config_file.string()));
  const std::vector<std::string> sections = {
      "data",     "target", "differencing", "inputs",   "events",     "noise", "search",
      "backtest", "fit",    "forecast",     "outliers", "revalidate", "output"};
  if (!problems || !root.IsMap()) {
    rd.check_map(root, "", sections);
  } else {
    for (const auto& kv : root) {  // every unknown top-level key, not only the first
      YAML::Node one(YAML::NodeType::Map);
      one[kv.first] = kv.second;
      part([&] { rd.check_map(one, "", sections); });
    }
  }

  RunConfig cfg;
  cfg.config_file = config_file;
  cfg.text = std::string(yaml_text);
  const fs::path base = config_file.parent_path();
  bool data_ok = true;
  for (const char* key : {"data", "target"})
    part([&] {
      if (!root[key]) {
        data_ok = false;
        rd.fail(root, "", fmt::format("missing section `{}`", key));
      }
    });
  const size_t before = problems ? problems->size() : 0;
  if (root["data"]) part([&] { read_data(rd, root["data"], base, cfg.data); });
  if (root["target"]) part([&] { read_target(rd, root["target"], cfg.target); });
  if (problems && problems->size() > before) data_ok = false;
  if (const auto n = root["differencing"])
    part([&] { read_differencing(rd, n, cfg.differencing); });
  if (data_ok && !cfg.data.series_key.empty())
    part([&] {
      if (cfg.target.columns.size() != 1)
        rd.fail(root["target"], "target.columns",
                "with `data.series_key` (long format) the target is one column: give "
                "`target.column`; each key value of the data is a series");
      if (cfg.target.columns.front() == cfg.data.series_key)
        rd.fail(root["data"]["series_key"], "data.series_key",
                fmt::format("'{}' is also the target column", cfg.data.series_key));
    });

  if (const auto n = root["inputs"]; n && !n.IsNull())
    part([&] {
      if (!n.IsSequence())
        rd.fail(n, "inputs",
                fmt::format("expected a list of inputs (each `- column: ...` or "
                            "`- event: ...`), got {}",
                            Reader::describe(n)));
      std::set<std::string> names;
      for (size_t i = 0; i < n.size(); ++i)
        part([&] {
          const auto path = fmt::format("inputs[{}]", i);
          InputConfig in;
          read_input(rd, n[i], path, in);
          if (!names.insert(in.name).second)
            rd.fail(n[i], path, fmt::format("input '{}' is listed twice", in.name));
          if (!in.is_event && in.name == cfg.data.series_key)
            rd.fail(n[i], path + ".column",
                    fmt::format("'{}' is data.series_key, which names the series; it is not a "
                                "number to model",
                                in.name));
          for (const auto& t : cfg.target.columns)
            if (!in.is_event && t == in.name)
              rd.fail(n[i], path + ".column",
                      fmt::format("'{}' is the target; a series cannot explain itself", in.name));
          cfg.inputs.push_back(std::move(in));
        });
    });

  if (const auto n = root["events"]) part([&] { read_event_file(rd, n, base, cfg.inputs); });
  cfg.noise.period = cfg.differencing.period;  // default, overridden by noise.period
  if (const auto n = root["noise"]) part([&] { read_noise(rd, n, cfg.noise); });
  // Seasonal terms without any period: the period comes from the data's frequency.
  cfg.differencing_period_from_data = cfg.differencing.seasonal > 0 && cfg.differencing.period < 2;
  cfg.noise_period_from_data =
      (cfg.noise.seasonal_ar.max > 0 || cfg.noise.seasonal_ma.max > 0) && cfg.noise.period < 2;
  if (const auto n = root["search"]) part([&] { read_search(rd, n, cfg.search); });
  if (const auto n = root["backtest"]) part([&] { read_backtest(rd, n, cfg.backtest); });
  if (const auto n = root["fit"]) part([&] { read_fit(rd, n, cfg.fit); });
  if (const auto n = root["forecast"]) part([&] { read_forecast(rd, n, cfg.forecast); });
  if (const auto n = root["outliers"]) part([&] { read_outliers(rd, n, cfg.outliers); });
  if (const auto n = root["revalidate"])
    part([&] {
      rd.check_map(n, "revalidate", {"min_new_rows"});
      if (const auto m = n["min_new_rows"])
        cfg.revalidate.min_new_rows = rd.get_int(m, "revalidate.min_new_rows", 1, 1000000);
    });
  if (const auto n = root["output"])
    part([&] {
      rd.check_map(n, "output", {"dir"});
      if (n["dir"]) cfg.output.dir = rd.get_string(n["dir"], "output.dir");
    });
  cfg.output.dir = resolve(base, cfg.output.dir.string());
  return cfg;
}

RunConfig load_config(const fs::path& config_file, std::vector<InputError>* problems) {
  std::error_code ec;
  if (!fs::exists(config_file, ec))
    throw InputError(
        fmt::format("config file '{}' does not exist; check the path", config_file.string()));
  if (fs::is_directory(config_file, ec))
    throw InputError(
        fmt::format("config file '{}' is a folder; give the YAML file", config_file.string()));
  std::ifstream in(config_file, std::ios::binary);
  if (!in)
    throw InputError(
        fmt::format("cannot read config file '{}'; check its permissions", config_file.string()));
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return parse_config(buffer.str(), config_file, problems);
}

long long saturating_product(long long total, long long k) {
  constexpr long long kCap = std::numeric_limits<long long>::max();
  if (k <= 0 || total <= 0) return 0;
  return total > kCap / k ? kCap : total * k;
}

long long candidate_grid_size(const RunConfig& config) {
  long long total = 1;
  auto times = [&](long long k) {
    if (k > 0) total = saturating_product(total, k);
  };
  auto width = [](const IntRange& r) { return static_cast<long long>(r.max) - r.min + 1; };
  for (const auto& in : config.inputs)
    times(width(in.delay) * width(in.numerator) * width(in.denominator) + (in.optional ? 1 : 0));
  const auto& nz = config.noise;
  times(width(nz.ar));
  times(width(nz.ma));
  times(width(nz.seasonal_ar));
  times(width(nz.seasonal_ma));
  if (nz.constant == ConstantMode::automatic) times(2);
  return total;
}

}  // namespace lagsieve
