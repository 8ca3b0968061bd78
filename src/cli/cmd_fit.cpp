// `lagsieve fit CONFIG`: exact maximum-likelihood fit of the one model a config describes.
#include <fmt/format.h>

#include <cmath>
#include <memory>
#include <optional>
#include <string>

#include "cli/commands.h"
#include "cli/common.h"
#include "cli/fit_run.h"
#include "cli/print.h"
#include "core/error.h"
#include "data/load.h"
#include "forecast/model_file.h"
#include "model/collinearity.h"
#include "model/fit.h"
#include "model/past.h"
#include "model/spec_from_config.h"
#include "outliers/detect.h"
#include "outliers/json.h"

namespace lagsieve::cli {

FitRun fit_single(const RunConfig& config, const SeriesData& data, const std::string& config_name) {
  const ModelSpec spec = single_spec(config);
  const auto problem = make_problem(data, spec);
  FitRun out;
  if (config.outliers.enabled) {
    out.detected = fit_with_outliers(data, spec, outlier_options(config.outliers));
    out.fit = out.detected->fit;
  } else {
    out.fit = fit_model(problem);
  }
  // A fit that fails because inputs are nearly collinear failed on bad input, not numerically.
  if (!out.fit.usable())
    if (auto why = collinear_inputs(problem, kNearCollinearTolerance); !why.empty())
      throw InputError(
          fmt::format("{}: {}; the fit failed numerically because of it", config_name, why));
  return out;
}

FittedModel fitted_model_of(const FitRun& run, const RunConfig& config, const SeriesData& data) {
  return run.detected
             ? make_fitted_model(run.fit, config, run.detected->data, run.detected->effects)
             : make_fitted_model(run.fit, config, data);
}

namespace {

struct FitArgs {
  std::string config;
  std::string series;
  std::string save;
  bool json = false;
};

int run_fit(const FitArgs& args) {
  const LoadedRun run = load_run_one(args.config, args.series);
  const SeriesData& data = pick_series(run, args.series);
  const FitRun fitted = fit_single(run.config, data, args.config);
  const FitResult& fit = fitted.fit;
  const std::optional<OutlierFit>& detected = fitted.detected;
  if (!args.save.empty() && fit.usable())
    save_model(args.save, fitted_model_of(fitted, run.config, data));
  if (args.json) {
    auto j = fit_to_json(fit);
    j["series"] = data.target_name;
    j["frequency"] = data.frequency;
    j["missing"] = describe_missing(data);  // what was missing, filled or inserted, per column
    if (!run.config.seasonal_note.empty()) j["seasonal_note"] = run.config.seasonal_note;
    if (detected) j["outliers"] = outliers_to_json(*detected);
    if (fit.usable())
      j["past"] = past_to_json(
          explain_past(detected ? detected->data : data, fit.spec, fit.params, fit.start));
    fmt::print("{}\n", j.dump(2));
  } else {
    print_fit(fit, data);
    if (detected) print_outliers(*detected);
    if (!run.config.seasonal_note.empty()) fmt::print("\nnote: {}\n", run.config.seasonal_note);
    if (!args.save.empty() && fit.usable()) fmt::print("\nmodel file written: {}\n", args.save);
  }
  return fit.usable() ? kExitOk : kExitInternal;
}

}  // namespace

void register_fit(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "fit", "Fit the one model a config describes (every range a single value) by exact ML");
  auto args = std::make_shared<FitArgs>();
  cmd->add_option("CONFIG", args->config, "Run configuration (YAML)")->required();
  cmd->add_option("--series", args->series, "Target column to fit (default: the first)");
  cmd->add_option("--save", args->save, "Write the fitted model file (JSON) here");
  cmd->add_flag("--json", args->json, "Print one JSON object instead of the summary");
  cmd->callback([args] { finish(run_command([&] { return run_fit(*args); })); });
}

}  // namespace lagsieve::cli
