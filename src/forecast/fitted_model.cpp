#include "forecast/fitted_model.h"

#include <cmath>
#include <fmt/format.h>
#include <cstdint>
#include <fstream>
#include <limits>
#include <sstream>

#include "core/error.h"
#include "data/time_index.h"
#include "data/transform.h"
#include "model/likelihood.h"

namespace lagsieve {

std::string text_fingerprint(std::string_view text) {
  std::uint64_t hash = 1469598103934665603ULL;
  for (unsigned char c : text) {
    hash ^= c;
    hash *= 1099511628211ULL;
  }
  return fmt::format("fnv1a64:{:016x}", hash);
}

std::string data_fingerprint(const SeriesData& data, int rows,
                             const std::vector<std::string>& input_names) {
  std::string text;
  auto feed_column = [&](const std::vector<double>& column) {
    for (int t = 0; t < rows && t < static_cast<int>(column.size()); ++t)
      text += fmt::format("{:.17g};", column[t]);
    text += '|';
  };
  feed_column(data.target);
  for (const auto& name : input_names) {
    const int index = data.input_index(name);
    if (index >= 0) feed_column(data.inputs[index]);
  }
  return text_fingerprint(text);
}

TrainingRows training_rows(const SeriesData& data, const std::vector<std::string>& input_names) {
  TrainingRows out;
  out.time = data.time;
  out.time.resize(static_cast<size_t>(data.rows()));
  out.columns.push_back(data.target_name);
  out.values.push_back(data.target);
  out.filled.push_back(data.target_filled);
  for (const auto& name : input_names) {
    const int index = data.input_index(name);
    if (index < 0) continue;
    out.columns.push_back(name);
    out.values.push_back(data.inputs[index]);
    out.filled.push_back(static_cast<size_t>(index) < data.input_filled.size()
                             ? data.input_filled[index]
                             : std::vector<unsigned char>());
  }
  return out;
}

InputModel fit_input_model(const std::string& name, const std::vector<double>& input,
                           const Differencing& diff, std::optional<int> p, std::optional<int> q) {
  LikelihoodProblem problem;
  problem.w = difference(input, diff);
  problem.spec.constant = true;
  problem.start = 0;
  FitOptions options;
  options.standard_errors = false;
  options.diagnostics = false;
  InputModel best;
  best.input = name;
  best.aic = std::numeric_limits<double>::infinity();
  const bool given = p.has_value() && q.has_value();
  for (int ip = p.value_or(0); ip <= p.value_or(2); ++ip)
    for (int iq = q.value_or(0); iq <= q.value_or(2); ++iq) {
      problem.spec.noise = {ip, iq, 0, 0, 1};
      if (problem.n_obs() < problem.n_params() + 10) continue;
      const auto fit = fit_model(problem, options);
      if (!fit.usable() || !(fit.aic < best.aic)) continue;
      best.p = ip;
      best.q = iq;
      best.mean = fit.params.constant;
      best.phi = fit.params.phi;
      best.theta = fit.params.theta;
      best.sigma2 = fit.sigma2;
      best.aic = fit.aic;
    }
  if (!std::isfinite(best.aic))
    throw InputError(
        fmt::format("input '{}': its own ARMA model could not be fitted (too few "
                    "observations or a constant series)",
                    name));
  best.chosen_by_aic = !given;
  // Small-sample bias of an AR(1) with unknown mean: E[phi_hat] - phi = -(1 + 3 phi) / n + O(n^-2)
  // for the least-squares estimate (Kendall 1954, Biometrika 41; Marriott & Pope 1954,
  // Biometrika 41), which the Gaussian ML estimate shares to that order. Left in, it shrinks the
  // input's forecast persistence and with it the input share of the forecast variance, so
  // intervals with a forecast input under-cover at n = 150. The estimate is moved by the bias
  // where that stays well inside the stationary region.
  if (best.p == 1 && best.q == 0) {
    const double n = problem.n_obs();
    const double corrected = best.phi[0] + (1.0 + 3.0 * best.phi[0]) / n;
    if (std::abs(corrected) < 0.99) best.phi[0] = corrected;
  }
  // The chosen order once more with standard errors: the covariance of its estimates, ordered
  // phi, theta (nonlinear) then the mean (linear), as forecasts use it.
  problem.spec.noise = {best.p, best.q, 0, 0, 1};
  options.standard_errors = true;
  const auto chosen = fit_model(problem, options);
  if (chosen.usable() && chosen.covariance.rows() == best.p + best.q + 1)
    best.covariance = chosen.covariance;
  return best;
}

FittedModel make_fitted_model(const FitResult& fit, const RunConfig& config, const SeriesData& data,
                              const std::vector<OutlierEffect>& effects) {
  FittedModel model;
  model.spec = fit.spec;
  model.params = fit.params;
  for (const auto& e : fit.estimates) model.param_names.push_back(e.name);
  model.covariance = fit.covariance;
  model.loglik = fit.loglik;
  model.aic = fit.aic;
  model.aicc = fit.aicc;
  model.bic = fit.bic;
  model.n_obs = fit.n_obs;
  model.n_params = fit.n_params;
  model.start = fit.start;
  model.fit_status = std::string(to_string(fit.status));
  for (const auto& term : fit.spec.inputs) {
    InputUse use;
    use.name = term.name;
    for (const auto& e : effects) {
      if (e.name != term.name) continue;
      use.is_event = true;
      use.effect = e;
      use.shape = e.type == OutlierType::level_shift ? EventShape::step : EventShape::pulse;
      use.at = e.time.empty() ? fmt::format("{}", e.row) : e.time;
      use.future = FutureMode::known;
    }
    for (const auto& ic : config.inputs) {
      if (ic.name != term.name) continue;
      use.is_event = ic.is_event;
      use.shape = ic.shape;
      use.at = ic.at;
      use.future = ic.is_event ? FutureMode::known : ic.future;
      use.known_steps = ic.known_steps;
      if (!ic.is_event && ic.future == FutureMode::forecast) {
        const int index = data.input_index(term.name);
        model.input_models.push_back(fit_input_model(
            term.name, data.inputs[index], fit.spec.differencing, ic.own_model.p, ic.own_model.q));
      }
    }
    model.inputs.push_back(use);
  }
  auto& tr = model.training;
  tr.source_file = data.source_file;
  tr.target_column = data.target_name;
  tr.rows = data.rows();
  if (!data.time.empty()) {
    tr.first_time = data.time.front();
    tr.last_time = data.time.back();
  }
  tr.frequency = data.frequency;
  tr.time_format = data.time_format;
  tr.missing_target = data.target_missing();
  // Every input column of the data (not just the model's), so any revision is noticed.
  std::vector<std::string> all_columns;
  for (const auto& ic : config.inputs)
    if (!ic.is_event) all_columns.push_back(ic.name);
  tr.fingerprint = data_fingerprint(data, data.rows(), all_columns);
  tr.data = training_rows(data, all_columns);
  tr.config_file = config.config_file.string();
  if (!config.text.empty()) {
    tr.config_text = config.text;
  } else if (std::ifstream in(config.config_file); in) {
    std::stringstream text;
    text << in.rdbuf();
    tr.config_text = text.str();
  }
  return model;
}

}  // namespace lagsieve
