// `lagsieve backtest CONFIG [--models FILE...] --out DIR`: rolling-origin backtest of explicit
// model files side by side (e.g. the deployed model against challengers), or of the one model
// the config describes, with a naive benchmark.
#include <fmt/format.h>

#include <cmath>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "backtest/backtest.h"
#include "cli/commands.h"
#include "cli/common.h"
#include "cli/print.h"
#include "core/error.h"
#include "core/names.h"
#include "forecast/fitted_model.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "model/spec_from_config.h"
#include "report/report.h"
#include "search/run_dir.h"
#include "search/run_folder.h"

namespace lagsieve::cli {
namespace {

struct BacktestArgs {
  std::string config;
  std::vector<std::string> models;
  std::optional<std::string> out;  // absent: <output.dir>/backtest
  std::string series;
  std::optional<int> threads;
};

int run_backtest_command(const BacktestArgs& args) {
  const LoadedRun run = load_run_one(args.config, args.series);
  const RunConfig& config = run.config;
  if (!config.backtest.enabled)
    throw InputError(fmt::format("{}: the config has no `backtest:` section; add one (first_origin, "
                                 "step, horizon, ...)",
                                 config.config_file.string()));
  const SeriesData& data = pick_series(run, args.series);
  BacktestOptions options = backtest_options(config, data.rows());
  options.threads = checked_threads(args.threads, config.search.threads);
  if (args.out && args.out->empty()) check_run_dir_path("", "--out");
  // A backtest writes a run folder of its own: by default beside the search's files, never over
  // them. Locked, staged and swapped in whole like every run folder, so a refused or failed
  // backtest writes nothing.
  const std::filesystem::path out =
      args.out ? std::filesystem::path(*args.out) : config.output.dir / "backtest";
  std::vector<BacktestCandidate> candidates;
  for (const auto& path : args.models) {
    const FittedModel model = load_model(path);
    auto c = candidate_from_model(std::filesystem::path(path).stem().string() + ": " + model_label(model.spec), model);
    // With refitting, each model's structure is re-fitted at the origins like any candidate;
    // with `refit: 0` its own parameters are used throughout (re-filtered, never re-fitted).
    if (options.refit > 0) c.fixed.reset();
    candidates.push_back(std::move(c));
  }
  if (candidates.empty()) {
    const ModelSpec spec = single_spec(config);
    candidates.push_back(candidate_from_spec(model_label(spec), spec, config));
  }
  candidates.push_back(seasonal_naive_candidate(options.season));
  std::string fingerprint = config.config_file.string();
  for (const auto& m : args.models) fingerprint += "|" + m;
  RunDir dir(out, {"backtest", text_fingerprint(fingerprint), false,
                   args.out ? "--out" : "the default folder <output.dir>/backtest"});
  for (const auto& note : dir.notes()) fmt::print(stderr, "lagsieve: note: {}\n", note);
  const std::filesystem::path& stage = dir.staging();
  BacktestResult result = run_backtest(data, candidates, options);
  if (result.chosen >= 0)
    result.input_value = input_value(data, candidates[result.chosen], result.models[result.chosen], options);

  write_file_atomic(stage / run_files::kBacktest, backtest_csv(result));
  write_file_atomic(stage / run_files::kAccuracy, accuracy_csv(result));
  write_file_atomic(stage / run_files::kComparisons, comparisons_csv(result));
  write_file_atomic(stage / run_files::kInputValue, input_value_csv(result));
  ReportOptions report_options;
  report_options.folder_name = dir.out().filename().string();
  write_report(stage, report_options);
  dir.commit();

  fmt::print("{} · {} origins from row {} by {}, horizons 1..{}, {} window, refit {}\n", data.target_name,
             result.origins.size(), options.first_origin, options.step, options.horizon,
             to_string(options.window),
             options.refit == 0 ? "never" : fmt::format("every {} origin(s)", options.refit));
  fmt::print("  {:<50} {:>9} {:>9} {:>9} {:>10}  {}\n", "model", "score", "MAE", "RMSE", "oracle MAE", "failed origins");
  for (size_t i = 0; i < result.models.size(); ++i) {
    const auto& m = result.models[i];
    fmt::print("{} {:<50} {:>9.4f} {:>9.4g} {:>9.4g} {:>10.4g}  {}\n",
               static_cast<int>(i) == result.chosen ? "*" : " ", m.name, m.score,
               m.production_accuracy.overall.mae, m.production_accuracy.overall.rmse,
               m.oracle_accuracy.overall.mae, m.failed_origins);
  }
  for (const auto& v : result.input_value)
    fmt::print("input value · {}: score {:.4f} with, {:.4f} without (p = {:.3g})\n", v.input, v.score_with,
               v.score_without, v.test.p_value);
  fmt::print("run folder: {} (report: {})\n", out.string(), (out / run_files::kReport).string());
  return kExitOk;
}

}  // namespace

void register_backtest(CLI::App& app) {
  auto* cmd = app.add_subcommand("backtest", "Rolling-origin backtest of model files (or the config's model)");
  auto args = std::make_shared<BacktestArgs>();
  cmd->add_option("CONFIG", args->config, "Run configuration with a backtest section (YAML)")->required();
  cmd->add_option("--models", args->models, "Model files to compare side by side");
  cmd->add_option(
      "--out", args->out,
      "Output folder, a run folder of its own (default: <output.dir of the config>/backtest)");
  cmd->add_option("--series", args->series, "Target column (default: the first)");
  cmd->add_option("--threads", args->threads, "Worker threads (0 = all cores)");
  cmd->callback([args] { finish(run_command([&] { return run_backtest_command(*args); })); });
}

}  // namespace lagsieve::cli
