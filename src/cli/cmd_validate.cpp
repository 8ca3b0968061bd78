// `lagsieve validate CONFIG`: reads the config and the data, runs every check a real run would
// make before fitting, and prints what the run would work on. Writes nothing.
#include <fmt/format.h>

#include <memory>
#include <optional>
#include <string>

#include "backtest/backtest.h"
#include "batch/batch.h"
#include "cli/batch_run.h"
#include "cli/commands.h"
#include "cli/common.h"
#include "core/error.h"
#include "core/names.h"
#include "core/warning.h"
#include "data/events.h"
#include "data/load.h"
#include "io/config.h"
#include "model/likelihood.h"
#include "model/spec_from_config.h"
#include "search/candidates.h"

namespace lagsieve::cli {
namespace {

std::string range(const IntRange& r) {
  return r.min == r.max ? std::to_string(r.min) : fmt::format("{}..{}", r.min, r.max);
}

// The one model of a fit config must be buildable (throws InputError as `fit` would); for a
// search, the candidate with every input at its shortest lags is tried and a failure is a warning.
std::optional<Warning> shortest_lags_warning(const RunConfig& c, const SeriesData& s,
                                             const std::optional<ModelSpec>& single) {
  if (single) {
    (void)make_problem(s, *single);
    return std::nullopt;
  }
  ModelSpec spec;
  spec.transform = c.target.transform;
  spec.differencing = c.differencing;
  spec.filter_start = c.fit.filter_start;
  spec.estimation = c.fit.estimation;
  for (const auto& in : c.inputs)
    spec.inputs.push_back({in.name, {in.delay.min, in.numerator.min, in.denominator.min}});
  spec.noise = {c.noise.ar.min, c.noise.ma.min, c.noise.seasonal_ar.min, c.noise.seasonal_ma.min,
                c.noise.period};
  spec.constant = c.noise.constant != ConstantMode::no;
  try {
    (void)make_problem(s, spec, common_start(c));
  } catch (const InputError& e) {
    return Warning{"shortest_lags_unfittable",
                   fmt::format("series {}: candidates with every input at its shortest lags "
                               "cannot be fitted: {}",
                               s.target_name, e.what()),
                   {},
                   {{"series", s.target_name}}};
  }
  return std::nullopt;
}

std::optional<ModelSpec> single_spec_or_none(const RunConfig& c) {
  try {
    return single_spec(c);
  } catch (const InputError&) {
    return std::nullopt;  // a search config
  }
}

nlohmann::json problem_json(const InputError& e, const std::string& series = "") {
  auto j = input_error_json(e);
  if (!series.empty()) j["series"] = series;
  return j;
}

nlohmann::json series_json(const std::string& name, int rows, const std::string& first,
                           const std::string& last, const std::vector<Warning>& warnings) {
  return {{"series", name},
          {"rows", rows},
          {"first_time", first.empty() ? nlohmann::json(nullptr) : nlohmann::json(first)},
          {"last_time", last.empty() ? nlohmann::json(nullptr) : nlohmann::json(last)},
          {"warnings", warning_texts(warnings)},
          {"warning_codes", warnings_json(warnings)}};
}

// `validate --json`: every problem found, not only the first (one per config section and input,
// one per series of the data), then what a run would work on.
int validate_json(const std::string& path, const std::vector<std::string>& only) {
  std::vector<InputError> config_problems;
  RunConfig c = load_config(path, &config_problems);
  nlohmann::json problems = nlohmann::json::array();
  for (const auto& e : config_problems) problems.push_back(problem_json(e));
  // The data are read only when the sections that say where they are were read.
  bool data_readable = true;
  for (const auto& e : config_problems)
    if (e.key().starts_with("data") || e.key().starts_with("target") ||
        std::string_view(e.what()).find("missing section") != std::string_view::npos)
      data_readable = false;
  nlohmann::json series = nlohmann::json::array();
  std::vector<Warning> warnings;
  std::vector<SeriesData> loaded;
  bool panel = !c.data.series_key.empty();
  if (data_readable) {
    try {
      if (panel) {
        const auto parts = load_panel(c, only);
        for (const auto& s : check_panel(c, parts)) {
          if (s.status != SeriesStatus::ok) {
            problems.push_back(problem_json(InputError(s.reason), s.series));
            continue;
          }
          series.push_back(series_json(s.series, s.rows, s.first_time, s.last_time, s.warnings));
        }
      } else {
        select_target_columns(c, only);
        for (const auto& column : c.target.columns) {
          RunConfig one = c;
          one.target.columns = {column};
          try {
            for (auto& s : load_series(one)) loaded.push_back(std::move(s));
          } catch (const InputError& e) {
            problems.push_back(problem_json(e, column));
          }
        }
        for (const auto& s : loaded)
          series.push_back(series_json(s.target_name, s.rows(),
                                       s.time.empty() ? "" : s.time.front(),
                                       s.time.empty() ? "" : s.time.back(), missing_warnings(s)));
        if (!loaded.empty()) apply_seasonal_default(c, loaded.front());
      }
    } catch (const InputError& e) {
      problems.push_back(problem_json(e));
    }
  }
  // The model checks need a whole config and the data.
  if (config_problems.empty() && !loaded.empty()) {
    const auto single = single_spec_or_none(c);
    for (const auto& s : loaded) try {
        if (auto w = shortest_lags_warning(c, s, single)) warnings.push_back(std::move(*w));
      } catch (const InputError& e) {
        problems.push_back(problem_json(e, s.target_name));
      }
    if (c.backtest.enabled) {
      const SeriesData& first = loaded.front();
      const BacktestOptions bo = backtest_options(c, first.rows());
      for (const auto& e : event_origin_bounds(c, first, bo.first_origin))
        warnings.push_back({"event_after_first_origin",
                            fmt::format("backtest: event '{}' starts at row {}, after the first "
                                        "origin {}; set backtest.first_origin: {} to start where "
                                        "every candidate can be fitted",
                                        e.event, e.event_row, bo.first_origin, e.first_origin),
                            {{"event_row", e.event_row},
                             {"first_origin", bo.first_origin},
                             {"suggested_first_origin", e.first_origin}},
                            {{"event", e.event}}});
    }
  }
  nlohmann::json j = {{"command", "validate"},
                      {"config", path},
                      {"valid", problems.empty()},
                      {"problems", problems},
                      {"warnings", warning_texts(warnings)},
                      {"warning_codes", warnings_json(warnings)},
                      {"data", c.data.file.string()},
                      {"panel", panel},
                      {"series_count", series.size()},
                      {"series", series},
                      {"backtest", c.backtest.enabled},
                      {"output_dir", c.output.dir.string()}};
  if (config_problems.empty()) {
    j["grid_size"] = candidate_grid_size(c);
    j["min_rows"] = min_rows_needed(c);
  }
  return print_json_result(j, problems.empty() ? kExitOk : kExitBadInput);
}

int validate(const std::string& path, const std::vector<std::string>& only) {
  {
    const RunConfig config = load_config(path);
    if (!config.data.series_key.empty()) return validate_panel_command(config, only);
  }
  const LoadedRun run = load_run(path, only);
  const RunConfig& c = run.config;
  const SeriesData& first = run.series.front();
  fmt::print("config     {}\n", c.config_file.string());
  fmt::print("data       {} ({} rows, time: {}, {})\n", c.data.file.string(), first.rows(),
             c.data.time.empty() ? "row index" : c.data.time, first.frequency);
  if (!c.data.time.empty())
    fmt::print("span       {} .. {}\n", first.time.front(), first.time.back());
  for (const auto& s : run.series) {
    int target_missing = 0, target_filled = 0, input_missing = 0, input_filled = 0;
    for (const auto& f : s.fills) {
      (f.is_target ? target_missing : input_missing) += f.missing;
      (f.is_target ? target_filled : input_filled) += f.interpolated;
    }
    fmt::print(
        "series     {} ({} rows; target: {} missing, {} interpolated; inputs: {} missing, "
        "{} interpolated)\n",
        s.target_name, s.rows(), target_missing, target_filled, input_missing, input_filled);
    for (const auto& line : describe_missing(s)) fmt::print("missing    {}\n", line);
  }
  fmt::print("transform  {}{}; differencing d={} D={} period={}\n",
             to_string(c.target.transform.kind),
             c.target.transform.kind == TransformKind::boxcox
                 ? fmt::format(" (lambda {})", c.target.transform.lambda)
                 : "",
             c.differencing.regular, c.differencing.seasonal, c.differencing.period);
  for (const auto& in : c.inputs) {
    std::string kind = "column";
    if (in.is_event && is_recurring(in))
      kind = fmt::format("{} event at {} ({} occurrences or windows)", to_string(in.shape), in.at,
                         std::count(in.at.begin(), in.at.end(), ';') + 1);
    else if (in.is_event)
      kind = fmt::format("{} event at {} (row {})", to_string(in.shape), in.at,
                         event_row(in, first.time, c.config_file.string(), first.time_format) + 1);
    fmt::print("input      {}: {}; delay {}, numerator {}, denominator {}{}, future {}\n", in.name,
               kind, range(in.delay), range(in.numerator), range(in.denominator),
               in.optional ? ", optional" : "", to_string(in.future));
  }
  fmt::print("noise      ar {}, ma {}, seasonal ar {}, seasonal ma {}, period {}, constant {}\n",
             range(c.noise.ar), range(c.noise.ma), range(c.noise.seasonal_ar),
             range(c.noise.seasonal_ma), c.noise.period, to_string(c.noise.constant));
  if (!c.seasonal_note.empty()) fmt::print("period     {}\n", c.seasonal_note);
  fmt::print("grid       {} candidate models; the largest needs {} rows\n", candidate_grid_size(c),
             min_rows_needed(c));
  if (c.backtest.enabled) {
    const BacktestOptions bo = backtest_options(c, first.rows());
    const int last = bo.first_origin + (first.rows() - 1 - bo.first_origin) / bo.step * bo.step;
    fmt::print(
        "backtest   origins {}..{} every {} (origin n: the window is rows 1..n), horizon {}\n",
        bo.first_origin, last, bo.step, bo.horizon);
    for (const auto& e : event_origin_bounds(c, first, bo.first_origin))
      fmt::print(
          "warning    backtest: event '{}' starts at row {}{}, after the first origin {}: windows "
          "before origin {} cannot estimate it, so those origins will be dropped for every model "
          "and benchmark; set backtest.first_origin: {} to start where every candidate can be "
          "fitted\n",
          e.event, e.event_row, e.event_time.empty() ? "" : " (" + e.event_time + ")",
          bo.first_origin, e.first_origin, e.first_origin);
  }
  // The checks a fit makes on its regressors (an input that copies another, or is a linear
  // combination of others and the constant over the sample): for the one model of a fit config
  // they are errors, as in `fit`; for a search, the candidate holding every input at its shortest
  // lags is checked and a failure is reported (other candidates may still be fitted).
  const std::optional<ModelSpec> single = single_spec_or_none(c);
  for (const auto& s : run.series)
    if (const auto w = shortest_lags_warning(c, s, single))
      fmt::print("warning    {}\n", w->message);
  fmt::print("output     {}\n", c.output.dir.string());
  fmt::print("valid\n");
  return kExitOk;
}

}  // namespace

void register_validate(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "validate", "Check a config and its data without fitting anything; print a summary");
  auto path = std::make_shared<std::string>();
  auto only = std::make_shared<std::vector<std::string>>();
  auto json = std::make_shared<bool>(false);
  cmd->add_option("CONFIG", *path, "Run configuration (YAML)")->required();
  cmd->add_option("--series", *only, "Check only this series (key or target column); repeatable")
      ->expected(1)
      ->take_all();
  cmd->add_flag("--json", *json,
                "Print one JSON object listing every problem found (not only the first)");
  cmd->callback([path, only, json] {
    finish(run_command_json(*json, "validate", *path, [&] {
      return *json ? validate_json(*path, *only) : validate(*path, *only);
    }));
  });
}

}  // namespace lagsieve::cli
