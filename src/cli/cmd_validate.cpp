// `lagsieve validate CONFIG`: reads the config and the data, runs every check a real run would
// make before fitting, and prints what the run would work on. Writes nothing.
#include <fmt/format.h>

#include <memory>
#include <optional>
#include <string>

#include "backtest/backtest.h"
#include "cli/batch_run.h"
#include "cli/commands.h"
#include "cli/common.h"
#include "core/error.h"
#include "core/names.h"
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
  std::optional<ModelSpec> single;
  try {
    single = single_spec(c);
  } catch (const InputError&) {
    // a search config
  }
  for (const auto& s : run.series) {
    if (single) {
      (void)make_problem(s, *single);
      continue;
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
      fmt::print(
          "warning    series {}: candidates with every input at its shortest lags cannot be "
          "fitted: {}\n",
          s.target_name, e.what());
    }
  }
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
  cmd->add_option("CONFIG", *path, "Run configuration (YAML)")->required();
  cmd->add_option("--series", *only, "Check only this series (key or target column); repeatable")
      ->expected(1)
      ->take_all();
  cmd->callback([path, only] { finish(run_command([&] { return validate(*path, *only); })); });
}

}  // namespace lagsieve::cli
