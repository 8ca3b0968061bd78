#pragma once
// A fitted model with everything needed to forecast from new history with no other file:
// what the model file (model_file.h) holds.
#include <Eigen/Core>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "core/spec.h"
#include "model/fit.h"
#include "model/params.h"

namespace lagsieve {

// Own model of an input whose future must be forecast: ARMA(p, q) with mean on the input after
// the model's differencing (so its forecasts enter the transfer function directly).
struct InputModel {
  std::string input;
  int p = 0;
  int q = 0;
  double mean = 0.0;
  std::vector<double> phi, theta;
  double sigma2 = 0.0;
  double aic = 0.0;
  bool chosen_by_aic = false;  // false: orders given in the config
  // Estimation covariance of (phi_1..phi_p, theta_1..theta_q, mean) from the fit's curvature;
  // empty when not available (then forecasts leave this model's parameter uncertainty out).
  Eigen::MatrixXd covariance;
};

// How the future of one included input is obtained when forecasting.
struct InputUse {
  std::string name;
  bool is_event = false;
  EventShape shape = EventShape::pulse;  // events: regenerated from `at` on any history
  std::string at;
  FutureMode future = FutureMode::known;
  int known_steps = 0;                   // future: forecast, with the first m steps known
};

struct TrainingInfo {
  std::string source_file;
  std::string target_column;
  int rows = 0;                          // rows of the training data
  std::string first_time, last_time;     // "" without a time column
  std::string frequency;                 // inferred from the time column ("monthly", ...)
  std::string time_format;               // data.time_format ("" = a recognised form)
  int missing_target = 0;                // target values missing in the training rows
  std::string fingerprint;               // of the training rows (data_fingerprint)
  std::string config_text;               // the YAML the model came from (re-validation)
  std::string config_file;
};

struct FittedModel {
  ModelSpec spec;
  ModelParams params;
  std::vector<std::string> param_names;  // order of `covariance`
  Eigen::MatrixXd covariance;
  std::vector<InputUse> inputs;          // one per spec.inputs, same order
  std::vector<InputModel> input_models;  // for inputs whose future is forecast
  double loglik = 0.0, aic = 0.0, aicc = 0.0, bic = 0.0;
  int n_obs = 0, n_params = 0, start = 0;
  std::string fit_status;
  TrainingInfo training;
  nlohmann::json backtest;               // accuracy at training time (null when not run)

  const InputModel* input_model(const std::string& name) const {
    for (const auto& m : input_models)
      if (m.input == name) return &m;
    return nullptr;
  }
};

// FNV-1a (64 bit) digest of a text, as "fnv1a64:<16 hex digits>".
std::string text_fingerprint(std::string_view text);

// Digest of the target and the named inputs over the first `rows` rows (FNV-1a over the values
// printed with 17 significant digits): equal data give equal fingerprints on every platform.
std::string data_fingerprint(const SeriesData& data, int rows,
                             const std::vector<std::string>& input_names);

// Fits the own ARMA model of an input (differenced by `diff`): orders given, or chosen by AIC
// over p, q in 0..2 when absent.
InputModel fit_input_model(const std::string& name, const std::vector<double>& input,
                           const Differencing& diff, std::optional<int> p, std::optional<int> q);

// Assembles a FittedModel from a fit, the config and the training data: input uses from the
// config, own models fitted for every input whose future is forecast.
FittedModel make_fitted_model(const FitResult& fit, const RunConfig& config, const SeriesData& data);

}  // namespace lagsieve
