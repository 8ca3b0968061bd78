#include "forecast/forecast.h"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "core/error.h"
#include "data/events.h"
#include "data/time_index.h"
#include "data/transform.h"
#include "evaluation/distributions.h"
#include "model/arma_filter.h"
#include "model/likelihood.h"
#include "model/polynomial.h"

namespace lagsieve {

namespace {

// Row vectors g_s = Z T^s for s = 0..count-1 (as rows of the result).
Eigen::MatrixXd powers_of_t(const std::vector<double>& ar, int m, int count) {
  Eigen::MatrixXd g = Eigen::MatrixXd::Zero(count, m);
  if (count == 0) return g;
  g(0, 0) = 1.0;
  // (g T)(0) = sum_i g(i) ar_i and (g T)(j) = g(j - 1): T(i, 0) = ar_i, T(i, i + 1) = 1.
  for (int s = 1; s < count; ++s) {
    double first = 0.0;
    for (size_t i = 0; i < ar.size(); ++i) first += g(s - 1, i) * ar[i];
    g(s, 0) = first;
    for (int j = 1; j < m; ++j) g(s, j) = g(s - 1, j - 1);
  }
  return g;
}

int state_dim(const std::vector<double>& ar, const std::vector<double>& ma) {
  return static_cast<int>(std::max(ar.size(), ma.size() + 1));
}

// Point forecasts (deviation from the mean) of an ARMA process for `horizon` steps from the
// predicted state at the origin, and the error covariance (units of sigma^2).
struct ArmaPath {
  std::vector<double> mean;
  Eigen::MatrixXd cov;
};

ArmaPath arma_path(const std::vector<double>& ar, const std::vector<double>& ma,
                   const std::vector<double>& history, int horizon) {
  ArmaFilterWorkspace ws;
  const auto end = arma_end_state(ar, ma, history, ws);
  ArmaPath path;
  const int m = state_dim(ar, ma);
  const Eigen::MatrixXd g = powers_of_t(ar, m, horizon);
  path.mean.resize(horizon);
  for (int s = 0; s < horizon; ++s) path.mean[s] = g.row(s).dot(end.state);
  path.cov = arma_forecast_covariance(ar, ma, end.cov, horizon);
  return path;
}

// Lower-triangular Toeplitz matrix of weights: M(s, j) = w_{s-j}.
Eigen::MatrixXd toeplitz_lower(const std::vector<double>& w, int n) {
  Eigen::MatrixXd out = Eigen::MatrixXd::Zero(n, n);
  for (int s = 0; s < n; ++s)
    for (int j = 0; j <= s; ++j) out(s, j) = w[s - j];
  return out;
}

}  // namespace

Eigen::MatrixXd arma_forecast_covariance(const std::vector<double>& ar, const std::vector<double>& ma,
                                         const Eigen::MatrixXd& p_origin, int horizon) {
  const int m = state_dim(ar, ma);
  const Eigen::MatrixXd g = powers_of_t(ar, m, horizon);
  const auto psi = psi_weights(ar, ma, horizon);
  Eigen::MatrixXd cov = g * p_origin * g.transpose();
  for (int s1 = 0; s1 < horizon; ++s1)
    for (int s2 = 0; s2 < horizon; ++s2)
      for (int j = 1; j <= std::min(s1, s2); ++j) cov(s1, s2) += psi[s1 - j] * psi[s2 - j];
  return cov;
}

ForecastResult forecast(const FittedModel& model, const SeriesData& history,
                        const std::vector<InputFuture>& futures, const ForecastOptions& options) {
  const ModelSpec& spec = model.spec;
  const int horizon = options.horizon;
  if (horizon < 1)
    throw InputError(fmt::format("the horizon must be at least 1 (got {})", horizon));
  const int rows = history.rows();
  const int lost = spec.differencing.lost();
  ForecastResult out;
  out.origin = rows;
  out.time = next_time_stamps(history.time, horizon);
  out.levels = options.levels;

  const auto z = apply_transform(history.target, spec.transform, history.target_name.c_str());
  const auto w = difference(z, spec.differencing);
  const int nw = static_cast<int>(w.size());
  if (nw <= minimum_start(spec) + 1)
    throw InputError(fmt::format("the history has {} rows: too short for this model (it needs "
                                 "more than {} rows)",
                                 rows, lost + minimum_start(spec) + 1));

  Eigen::MatrixXd cov_inputs = Eigen::MatrixXd::Zero(horizon, horizon);
  std::vector<std::vector<double>> x_paths;  // transfer-function output over nw + horizon
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& term = spec.inputs[i];
    const InputUse& use = model.inputs[i];
    std::vector<double> original;
    int known = 0;
    const InputFuture* supplied = nullptr;
    for (const auto& f : futures)
      if (f.name == term.name) supplied = &f;
    // An event is regenerated from its definition, unless the caller supplies its column and its
    // future (the backtest does, so origins before the event need no time stamps after them).
    const bool event_given = use.is_event && history.input_index(term.name) >= 0 && supplied &&
                             static_cast<int>(supplied->values.size()) >= horizon;
    if (use.is_event && !event_given) {
      InputConfig ic;
      ic.name = use.name;
      ic.is_event = true;
      ic.shape = use.shape;
      ic.at = use.at;
      const int row = event_row(ic, history.time, model.training.config_file);
      if (use.effect) {
        OutlierEffect effect = *use.effect;
        effect.row = row;
        original = effect_values(effect, rows + horizon);
      } else {
        original = event_values(use.shape, row, rows + horizon);
      }
      known = horizon;
      out.input_treatment.push_back("known (event)");
    } else {
      const int index = history.input_index(term.name);
      if (index < 0)
        throw InputError(fmt::format("the history has no column '{}', an input of the model",
                                     term.name));
      original = history.inputs[index];
      const InputFuture* future = supplied;
      const int given = future ? static_cast<int>(future->values.size()) : 0;
      known = std::min(given, horizon);
      if (options.oracle_inputs && known < horizon)
        throw InputError(fmt::format("input '{}': oracle forecasts need its values for all {} "
                                     "steps, {} given",
                                     term.name, horizon, given));
      if (known > 0) original.insert(original.end(), future->values.begin(),
                                     future->values.begin() + known);
      if (known < horizon && !model.input_model(term.name))
        throw InputError(fmt::format(
            "input '{}' is known in the future (future: known) but {} of the {} future values "
            "were given; supply them for the whole horizon, or set `future: forecast`",
            term.name, known, horizon));
      out.input_treatment.push_back(known == horizon ? "known"
                                    : known == 0     ? "forecast"
                                                     : fmt::format("known {}, then forecast", known));
    }
    auto u = difference(original, spec.differencing);  // nw + known values
    if (known < horizon) {
      const InputModel& im = *model.input_model(term.name);
      std::vector<double> centred(u.begin(), u.end());
      for (auto& v : centred) v -= im.mean;
      const auto path = arma_path(im.phi, im.theta, centred, horizon - known);
      for (double v : path.mean) u.push_back(im.mean + v);
      // Errors of the differenced input at steps known..horizon-1, through the impulse response.
      Eigen::MatrixXd cov_u = Eigen::MatrixXd::Zero(horizon, horizon);
      cov_u.bottomRightCorner(horizon - known, horizon - known) = im.sigma2 * path.cov;
      const auto v = impulse_response(term.order, model.params.inputs[i], horizon);
      const Eigen::MatrixXd vm = toeplitz_lower(v, horizon);
      cov_inputs += vm * cov_u * vm.transpose();
    }
    x_paths.push_back(transfer_response(u, term.order, model.params.inputs[i]));
  }

  // Noise over the history, filtered from the model's sample start; its forecast path.
  std::vector<double> noise(w.begin(), w.end());
  for (auto& v : noise) v -= model.params.constant;
  for (const auto& x : x_paths)
    for (int t = 0; t < nw; ++t) noise[t] -= x[t];
  const int start = std::clamp(model.start, 0, std::max(nw - 2, 0));
  const auto ar = expand_ar(model.params.phi, model.params.seasonal_phi, spec.noise.period);
  const auto ma = expand_ma(model.params.theta, model.params.seasonal_theta, spec.noise.period);
  const auto noise_path =
      arma_path(ar, ma, std::vector<double>(noise.begin() + start, noise.end()), horizon);

  std::vector<double> w_hat(horizon);
  for (int s = 0; s < horizon; ++s) {
    double v = model.params.constant + noise_path.mean[s];
    for (const auto& x : x_paths) v += x[nw + s];
    w_hat[s] = v;
  }
  const Eigen::MatrixXd cov_known = model.params.sigma2 * noise_path.cov;
  const Eigen::MatrixXd cov_all = cov_known + cov_inputs;

  // Back through the differencing: y = w + sum_k c_k y_{t-k}.
  const std::vector<double> head(z.end() - lost, z.end());
  const auto integrated = undifference(head, w_hat, spec.differencing);
  out.level.assign(integrated.end() - horizon, integrated.end());
  const auto xi = psi_weights(differencing_lags(spec.differencing), {}, horizon);
  const Eigen::MatrixXd l = toeplitz_lower(xi, horizon);
  const Eigen::VectorXd var_all = (l * cov_all * l.transpose()).diagonal();
  const Eigen::VectorXd var_known = (l * cov_known * l.transpose()).diagonal();

  const auto& tr = spec.transform;
  out.se.resize(horizon);
  out.se_known_inputs.resize(horizon);
  out.median.resize(horizon);
  out.mean.resize(horizon);
  for (int s = 0; s < horizon; ++s) {
    out.se[s] = std::sqrt(std::max(var_all(s), 0.0));
    out.se_known_inputs[s] = std::sqrt(std::max(var_known(s), 0.0));
    const double mu = out.level[s];
    const double v = out.se[s] * out.se[s];
    out.median[s] = invert_transform(mu, tr);
    switch (tr.kind) {
      case TransformKind::none:
        out.mean[s] = mu;
        break;
      case TransformKind::log:
        out.mean[s] = std::exp(mu + 0.5 * v);
        break;
      case TransformKind::boxcox:
        // Second-order bias adjustment of the back-transform.
        out.mean[s] = tr.lambda == 0.0
                          ? std::exp(mu + 0.5 * v)
                          : out.median[s] * (1.0 + v * (1.0 - tr.lambda) /
                                                       (2.0 * std::pow(tr.lambda * mu + 1.0, 2)));
        break;
    }
  }
  for (double level : options.levels) {
    const double zq = normal_quantile(0.5 + level / 2.0);
    std::vector<double> lo(horizon), hi(horizon), lo_k(horizon), hi_k(horizon);
    for (int s = 0; s < horizon; ++s) {
      lo[s] = invert_transform(out.level[s] - zq * out.se[s], tr);
      hi[s] = invert_transform(out.level[s] + zq * out.se[s], tr);
      lo_k[s] = invert_transform(out.level[s] - zq * out.se_known_inputs[s], tr);
      hi_k[s] = invert_transform(out.level[s] + zq * out.se_known_inputs[s], tr);
    }
    out.lower.push_back(std::move(lo));
    out.upper.push_back(std::move(hi));
    out.lower_known.push_back(std::move(lo_k));
    out.upper_known.push_back(std::move(hi_k));
  }
  return out;
}

}  // namespace lagsieve

namespace lagsieve {

nlohmann::json forecast_to_json(const ForecastResult& r) {
  nlohmann::json s = {{"origin_rows", r.origin},
                      {"time", r.time},
                      {"median", r.median},
                      {"mean", r.mean},
                      {"se_transformed", r.se},
                      {"se_transformed_inputs_known", r.se_known_inputs},
                      {"input_treatment", r.input_treatment},
                      {"levels", r.levels}};
  for (size_t l = 0; l < r.levels.size(); ++l) {
    const std::string key = fmt::format("{:g}", r.levels[l]);
    s["lower"][key] = r.lower[l];
    s["upper"][key] = r.upper[l];
    s["lower_inputs_known"][key] = r.lower_known[l];
    s["upper_inputs_known"][key] = r.upper_known[l];
  }
  return s;
}

}  // namespace lagsieve
