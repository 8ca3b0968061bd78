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
  bool json = false;
};

nlohmann::json number_or_null(double x) {
  return std::isfinite(x) ? nlohmann::json(x) : nlohmann::json(nullptr);
}

nlohmann::json backtest_json(const BacktestArgs& args, const SeriesData& data,
                             const BacktestOptions& options, const BacktestResult& result,
                             const std::filesystem::path& out) {
  nlohmann::json models = nlohmann::json::array();
  for (size_t i = 0; i < result.models.size(); ++i) {
    const auto& m = result.models[i];
    const bool none = m.production.records.empty();
    models.push_back({{"name", m.name},
                      {"status", none ? "no_forecast" : "ok"},
                      {"note", m.note},
                      {"chosen", static_cast<int>(i) == result.chosen},
                      {"score", number_or_null(m.score)},
                      {"mae", number_or_null(m.production_accuracy.overall.mae)},
                      {"rmse", number_or_null(m.production_accuracy.overall.rmse)},
                      {"oracle_mae", number_or_null(m.oracle_accuracy.overall.mae)},
                      {"failed_origins", m.failed_origins}});
  }
  nlohmann::json input_value = nlohmann::json::array();
  for (const auto& v : result.input_value)
    input_value.push_back({{"input", v.input},
                           {"score_with", number_or_null(v.score_with)},
                           {"score_without", number_or_null(v.score_without)},
                           {"p_value", number_or_null(v.test.p_value)}});
  auto file = [&](const char* name) {
    std::error_code ec;
    const auto p = out / name;
    return std::filesystem::exists(p, ec) ? nlohmann::json(std::filesystem::absolute(p).string())
                                          : nlohmann::json(nullptr);
  };
  return {{"command", "backtest"},
          {"config", args.config},
          {"series", data.target_name},
          {"ran",
           {{"models", result.models.size()},
            {"model_files", args.models.size()},
            {"origins", result.origins.size()},
            {"dropped_origins", result.dropped_origins.size()},
            {"first_origin", options.first_origin},
            {"step", options.step},
            {"horizon", options.horizon},
            {"window", to_string(options.window)},
            {"refit", options.refit}}},
          {"models", models},
          {"chosen", result.chosen >= 0 ? nlohmann::json(result.models[result.chosen].name)
                                        : nlohmann::json(nullptr)},
          {"input_value", input_value},
          {"warnings", warning_texts(result.warnings)},
          {"warning_codes", warnings_json(result.warnings)},
          {"files",
           {{"run_folder", std::filesystem::absolute(out).string()},
            {"backtest_csv", file(run_files::kBacktest)},
            {"accuracy_csv", file(run_files::kAccuracy)},
            {"comparisons_csv", file(run_files::kComparisons)},
            {"input_value_csv", file(run_files::kInputValue)},
            {"report", file(run_files::kReport)}}}};
}

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
  if (args.json) {
    auto j = backtest_json(args, data, options, result, out);
    return print_json_result(j, kExitOk);
  }

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
  cmd->add_flag("--json", args->json,
                "Print one JSON object (models, scores, warnings, files) instead of the table");
  cmd->callback([args] {
    finish(run_command_json(args->json, "backtest", args->config,
                            [&] { return run_backtest_command(*args); }));
  });
}

}  // namespace lagsieve::cli
