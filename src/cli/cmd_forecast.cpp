// `lagsieve forecast MODEL --data CSV --horizon K [--future [NAME=]CSV ...]`: forecasts from a
// model file, re-filtered (not re-fitted) on the history given, one column set per scenario.
#include <fmt/format.h>

#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "cli/commands.h"
#include "cli/common.h"
#include "core/error.h"
#include "data/load.h"
#include "data/time_index.h"
#include "forecast/forecast.h"
#include "forecast/forecast_table.h"
#include "forecast/model_file.h"
#include "io/config.h"
#include "io/csv.h"

namespace lagsieve::cli {
namespace {

struct ForecastArgs {
  std::string model;
  std::string data;
  int horizon = 12;
  std::vector<std::string> futures;
  std::vector<double> levels{0.8, 0.95};
  bool json = false;
  bool fixed_parameters = false;  // leave the parameters' estimation uncertainty out
};

struct Scenario {
  std::string name;
  std::vector<InputFuture> inputs;
};

// Reads a future-input file: the model's input columns (others ignored), time stamps (when the
// file has the history's time column) checked to continue the history.
Scenario read_future(const std::string& spec, const FittedModel& model, const RunConfig& config,
                     const SeriesData& history, int horizon) {
  Scenario s;
  std::string path = spec;
  if (const auto eq = spec.find('='); eq != std::string::npos) {
    s.name = spec.substr(0, eq);
    path = spec.substr(eq + 1);
  } else {
    s.name = std::filesystem::path(spec).stem().string();
  }
  require_file(path, "--future");
  const CsvTable table = read_csv(path);
  const int time_col = config.data.time.empty() ? -1 : table.column_index(config.data.time);
  if (time_col >= 0) {
    const auto expected = next_time_stamps(history.time, table.row_count(), history.time_format);
    for (int r = 0; r < table.row_count(); ++r)
      if (table.rows[r][time_col] != expected[r])
        throw InputError(fmt::format(
            "{}: time stamp '{}' does not continue the history (expected '{}' after the last "
            "history stamp '{}'); the future file must start right after the history",
            table.where(r), table.rows[r][time_col], expected[r], history.time.back()));
  }
  bool any = false;
  for (const auto& use : model.inputs) {
    if (use.is_event) continue;
    const int col = table.column_index(use.name);
    if (col < 0) continue;
    any = true;
    InputFuture f{use.name, {}};
    for (int r = 0; r < table.row_count() && r < horizon; ++r) {
      const std::string& cell = table.rows[r][col];
      char* end = nullptr;
      const double v = std::strtod(cell.c_str(), &end);
      if (cell.empty() || *end != '\0' || !std::isfinite(v))
        throw InputError(fmt::format("{}: column '{}' holds '{}', not a finite number",
                                     table.where(r), use.name, cell));
      f.values.push_back(v);
    }
    s.inputs.push_back(std::move(f));
  }
  if (!any)
    throw InputError(fmt::format("{}: none of the model's input columns are in this file", path));
  return s;
}

int run_forecast(const ForecastArgs& args) {
  const FittedModel model = load_model(args.model);
  if (model.training.config_text.empty())
    throw InputError(
        fmt::format("{}: the model file holds no config text to read data with", args.model));
  const RunConfig config = parse_config(model.training.config_text, model.training.config_file);
  require_file(args.data, "--data");
  // A model of one series of a long-format panel reads that series' rows of the --data file.
  const SeriesData history =
      config.data.series_key.empty()
          ? load_series_from_csv(config, args.data, model.training.target_column)
          : load_panel_history(config, args.data, model.training.target_column);
  std::vector<Scenario> scenarios;
  for (const auto& f : args.futures)
    scenarios.push_back(read_future(f, model, config, history, args.horizon));
  if (scenarios.empty()) scenarios.push_back({"baseline", {}});
  ForecastOptions options;
  options.horizon = args.horizon;
  options.levels = args.levels;
  options.parameter_uncertainty = !args.fixed_parameters && config.forecast.parameter_uncertainty;
  std::vector<ForecastResult> results;
  for (const auto& s : scenarios) results.push_back(forecast(model, history, s.inputs, options));
  // With scenarios, the baseline beside them: every input forecast by its own model. A model
  // with a known input and no own model for it has none.
  std::optional<ForecastResult> baseline;
  std::string no_baseline;
  if (!args.futures.empty()) {
    try {
      baseline = forecast(model, history, {}, options);
    } catch (const InputError& e) {
      no_baseline = e.what();
    }
  }

  if (args.json) {
    nlohmann::json j;
    j["model"] = args.model;
    j["target"] = model.training.target_column;
    j["origin_rows"] = results.front().origin;
    j["horizon"] = args.horizon;
    j["point"] =
        "median: the back-transformed mean of the transformed scale; `mean` is bias-adjusted";
    j["scenarios"] = nlohmann::json::array();
    for (size_t k = 0; k < scenarios.size(); ++k) {
      auto s = forecast_to_json(results[k]);
      s["name"] = scenarios[k].name;
      j["scenarios"].push_back(s);
    }
    if (baseline) {
      j["baseline"] = forecast_to_json(*baseline);
      j["baseline"]["name"] = "baseline (inputs forecast)";
    } else if (!no_baseline.empty()) {
      j["baseline_note"] = no_baseline;
    }
    fmt::print("{}\n", j.dump(2));
    return kExitOk;
  }
  const int origin = results.front().origin;
  fmt::print("{} · forecast from row {} ({}), {} steps\n", model.training.target_column, origin,
             history.time.empty() ? "" : history.time[origin - 1],
             static_cast<int>(results.front().median.size()));
  if (origin < history.rows())
    fmt::print(
        "the target's last {} value{} missing (a ragged edge): the forecast starts after "
        "the last usable value and uses the inputs of those rows as known\n",
        history.rows() - origin, history.rows() - origin == 1 ? " is" : "s are");
  std::vector<NamedForecast> named;
  for (size_t k = 0; k < scenarios.size(); ++k) {
    const auto& r = results[k];
    fmt::print("\nscenario {} — inputs:", scenarios[k].name);
    for (size_t i = 0; i < model.inputs.size(); ++i)
      fmt::print(" {} {};", model.inputs[i].name, r.input_treatment[i]);
    fmt::print("\n  parameter uncertainty: {}\n", r.parameter_uncertainty);
    named.push_back({scenarios[k].name, r});
  }
  fmt::print("\n");
  if (args.futures.empty()) {
    fmt::print("{}", forecast_table(results.front()));
  } else {
    fmt::print("{}", scenario_table(baseline ? &*baseline : nullptr, named));
    if (!baseline) fmt::print("  ({})\n", no_baseline);
    for (const auto& n : named) fmt::print("\nscenario {}:\n{}", n.name, forecast_table(n.result));
  }
  return kExitOk;
}

}  // namespace

void register_forecast(CLI::App& app) {
  auto* cmd = app.add_subcommand("forecast", "Forecast 1..K steps from a model file");
  auto args = std::make_shared<ForecastArgs>();
  cmd->add_option("MODEL", args->model, "Model file written by fit or search")->required();
  cmd->add_option("--data", args->data, "History up to the forecast origin (CSV)")->required();
  cmd->add_option("--horizon", args->horizon, "Steps ahead K")->default_val(12);
  cmd->add_option("--future", args->futures,
                  "Future input values, [NAME=]CSV; repeat for named scenarios side by side");
  cmd->add_option("--levels", args->levels, "Interval levels")
      ->default_val(std::vector<double>{0.8, 0.95})
      ->delimiter(',');
  cmd->add_flag("--json", args->json, "Print JSON");
  cmd->add_flag("--fixed-parameters", args->fixed_parameters,
                "Treat the estimated parameters as known: intervals without their estimation "
                "uncertainty (also `forecast: parameter_uncertainty: false` in the config)");
  cmd->callback([args] { finish(run_command([&] { return run_forecast(*args); })); });
}

}  // namespace lagsieve::cli
