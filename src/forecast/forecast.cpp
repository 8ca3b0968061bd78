#include "forecast/forecast.h"

#include <fmt/format.h>
#include <algorithm>
#include <cmath>
#include <functional>
#include <limits>
#include <span>

#include "core/error.h"
#include "data/events.h"
#include "data/time_index.h"
#include "data/transform.h"
#include "evaluation/distributions.h"
#include "io/config.h"
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
// predicted state at the origin, and that state's covariance (units of sigma^2).
struct ArmaPath {
  std::vector<double> mean;
  Eigen::MatrixXd p_origin;
};

ArmaPath arma_path(const std::vector<double>& ar, const std::vector<double>& ma,
                   const std::vector<double>& history, int horizon, const std::string& what) {
  ArmaFilterWorkspace ws;
  const auto end = arma_end_state(ar, ma, history, ws);
  ArmaPath path;
  const int m = state_dim(ar, ma);
  // A non-stationary AR polynomial has no stationary start: the filter returns an empty state.
  if (end.cov.rows() != m || end.state.size() != m || !end.cov.allFinite())
    throw InputError(fmt::format("{} has a non-stationary AR polynomial; it cannot be forecast "
                                 "(re-fit the model)",
                                 what));
  const Eigen::MatrixXd g = powers_of_t(ar, m, horizon);
  path.mean.resize(horizon);
  for (int s = 0; s < horizon; ++s) path.mean[s] = g.row(s).dot(end.state);
  path.p_origin = end.cov;
  return path;
}

// A linear filter applied to a sequence that is zero before its first value (the integration
// through the differencing, after an input's transfer function where there is one).
using SequenceFilter = std::function<std::vector<double>(const std::vector<double>&)>;

// Marginal variances (units of the innovation variance) of F applied to the errors of an ARMA
// forecast over n steps. The error at step k is g_k e + sum_{j=1..k} psi_{k-j} a_j (state error
// e at the origin with covariance p_origin, future innovations a_j), so F's output at step s is
// G_s e + sum_{j=1..s} W_{s-j} a_j with G = F(g) column by column and W = F(psi); its variance is
// G_s P G_s' + sum_{j<s} W_j^2. O(n) for a recursive F, where the full covariance over the
// horizon costs O(n^3); only marginal intervals are asked for, so this is all that is needed.
std::vector<double> filtered_arma_variance(const std::vector<double>& ar,
                                           const std::vector<double>& ma,
                                           const Eigen::MatrixXd& p_origin, int n,
                                           const SequenceFilter& f) {
  const int m = state_dim(ar, ma);
  const Eigen::MatrixXd g = powers_of_t(ar, m, n);
  Eigen::MatrixXd big_g(n, m);
  std::vector<double> column(n);
  for (int c = 0; c < m; ++c) {
    for (int s = 0; s < n; ++s) column[s] = g(s, c);
    const auto filtered = f(column);
    for (int s = 0; s < n; ++s) big_g(s, c) = filtered[s];
  }
  const auto w = f(psi_weights(ar, ma, n));
  std::vector<double> var(n);
  double innovations = 0.0;
  for (int s = 0; s < n; ++s) {
    var[s] = big_g.row(s) * p_origin * big_g.row(s).transpose() + innovations;
    innovations += w[s] * w[s];
  }
  return var;
}

}  // namespace

Eigen::MatrixXd arma_forecast_covariance(const std::vector<double>& ar,
                                         const std::vector<double>& ma,
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

namespace {

// The point forecast on the transformed scale (integrated) and, when asked, the marginal error
// variances of the integrated forecasts over the horizon: noise (with the state at the origin)
// and the inputs' own innovations. Re-run with perturbed parameters for the delta method.
struct Paths {
  std::vector<double> level;
  std::vector<double> var_known, var_inputs;  // integrated marginal variances
  std::vector<std::string> input_treatment;
};

Paths compute_paths(const FittedModel& model, const SeriesData& history,
                    const std::vector<InputFuture>& futures, const ForecastOptions& options,
                    bool covariances) {
  const ModelSpec& spec = model.spec;
  const int horizon = options.horizon;
  const int rows = history.rows();
  const int lost = spec.differencing.lost();
  Paths out;

  const auto z = apply_transform(history.target, spec.transform, history.target_name.c_str());
  const auto w = difference(z, spec.differencing);
  const int nw = static_cast<int>(w.size());
  if (nw <= minimum_start(spec) + 1)
    throw InputError(
        fmt::format("the history has {} rows: too short for this model (it needs "
                    "more than {} rows)",
                    rows, lost + minimum_start(spec) + 1));

  // Back through the differencing: y = w + sum_k c_k y_{t-k}, zero before the origin for errors.
  const auto lags = differencing_lags(spec.differencing);
  const SequenceFilter integrate = [&lags](std::vector<double> x) {
    for (size_t s = 0; s < x.size(); ++s)
      for (size_t k = 1; k <= lags.size() && k <= s; ++k) x[s] += lags[k - 1] * x[s - k];
    return x;
  };
  if (covariances) out.var_inputs.assign(horizon, 0.0);  // summed over forecast inputs
  // The model's sample start in this history: the noise is filtered from here and the filter's
  // estimated start states apply here, so the transfer function continues from them.
  const int start = std::clamp(model.start, 0, std::max(nw - 2, 0));
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
      if (use.effect) {
        OutlierEffect effect = *use.effect;
        effect.row =
            event_row(ic, history.time, model.training.config_file, history.time_format);
        original = effect_values(effect, rows + horizon);
      } else {
        auto time = history.time;
        const auto ahead = next_time_stamps(history.time, horizon, history.time_format);
        time.insert(time.end(), ahead.begin(), ahead.end());
        original = event_column(ic, time, rows, model.training.config_file, history.time_format);
      }
      known = horizon;
      out.input_treatment.push_back("known (event)");
    } else {
      const int index = history.input_index(term.name);
      if (index < 0)
        throw InputError(
            fmt::format("the history has no column '{}', an input of the model", term.name));
      original = history.inputs[index];
      const InputFuture* future = supplied;
      const int given = future ? static_cast<int>(future->values.size()) : 0;
      known = std::min(given, horizon);
      if (options.oracle_inputs && known < horizon)
        throw InputError(
            fmt::format("input '{}': oracle forecasts need its values for all {} "
                        "steps, {} given",
                        term.name, horizon, given));
      if (known > 0)
        original.insert(original.end(), future->values.begin(), future->values.begin() + known);
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
      const auto path = arma_path(im.phi, im.theta, centred, horizon - known,
                                  fmt::format("the own model of input '{}'", term.name));
      for (double v : path.mean) u.push_back(im.mean + v);
      if (!covariances) {
        x_paths.push_back(transfer_output(u, term.order, model.params.inputs[i], start));
        continue;
      }
      // Errors of the differenced input from step `known` on, through the transfer function and
      // the integration (independent of the noise and of the other inputs).
      const InputOrder& order = term.order;
      const InputParams& params = model.params.inputs[i];
      const SequenceFilter through = [&](const std::vector<double>& x) {
        return integrate(transfer_response(x, order, params));
      };
      const auto var =
          filtered_arma_variance(im.phi, im.theta, path.p_origin, horizon - known, through);
      for (int s = known; s < horizon; ++s) out.var_inputs[s] += im.sigma2 * var[s - known];
    }
    x_paths.push_back(transfer_output(u, term.order, model.params.inputs[i], start));
  }

  // Noise over the history, filtered from the model's sample start; its forecast path.
  std::vector<double> noise(w.begin(), w.end());
  for (auto& v : noise) v -= model.params.constant;
  for (const auto& x : x_paths)
    for (int t = 0; t < nw; ++t) noise[t] -= x[t];
  const auto ar = expand_ar(model.params.phi, model.params.seasonal_phi, spec.noise.period);
  const auto ma = expand_ma(model.params.theta, model.params.seasonal_theta, spec.noise.period);
  const auto noise_path =
      arma_path(ar, ma, std::vector<double>(noise.begin() + start, noise.end()), horizon,
                "the noise model");

  std::vector<double> w_hat(horizon);
  for (int s = 0; s < horizon; ++s) {
    double v = model.params.constant + noise_path.mean[s];
    for (const auto& x : x_paths) v += x[nw + s];
    w_hat[s] = v;
  }
  if (covariances) {
    out.var_known = filtered_arma_variance(ar, ma, noise_path.p_origin, horizon, integrate);
    for (auto& v : out.var_known) v *= model.params.sigma2;
  }
  const std::vector<double> head(z.end() - lost, z.end());
  const auto integrated = undifference(head, w_hat, spec.differencing);
  out.level.assign(integrated.end() - horizon, integrated.end());
  return out;
}

// Central-difference derivative of the level path in each coordinate of `values`, the step a
// thousandth of the coordinate's standard error (the scale on which the delta method is used);
// `rebuild` maps perturbed values to a model. Returns J (horizon x size); a zero column where the
// variance is not positive.
template <class Rebuild>
Eigen::MatrixXd level_jacobian(const std::vector<double>& values, const Eigen::MatrixXd& cov,
                               int horizon, Rebuild&& rebuild) {
  const int k = static_cast<int>(values.size());
  Eigen::MatrixXd jac = Eigen::MatrixXd::Zero(horizon, k);
  for (int j = 0; j < k; ++j) {
    if (!(cov(j, j) > 0.0)) continue;
    const double step = 1e-3 * std::sqrt(cov(j, j));
    std::vector<double> up(values), down(values);
    up[j] += step;
    down[j] -= step;
    const auto hi = rebuild(up);
    const auto lo = rebuild(down);
    for (int s = 0; s < horizon; ++s) jac(s, j) = (hi[s] - lo[s]) / (2.0 * step);
  }
  return jac;
}

bool usable_covariance(const Eigen::MatrixXd& cov, size_t size) {
  return size > 0 && cov.rows() == static_cast<Eigen::Index>(size) &&
         cov.cols() == static_cast<Eigen::Index>(size) && cov.allFinite();
}

ForecastResult forecast_complete(const FittedModel& model, const SeriesData& history,
                                 const std::vector<InputFuture>& futures,
                                 const ForecastOptions& options) {
  const ModelSpec& spec = model.spec;
  const int horizon = options.horizon;
  if (horizon < 1 || horizon > kMaxHorizon)
    throw InputError(
        fmt::format("the horizon must be between 1 and {} steps (got {})", kMaxHorizon, horizon));
  ForecastResult out;
  out.origin = history.rows();
  out.time = next_time_stamps(history.time, horizon, history.time_format);
  out.levels = options.levels;
  Paths base = compute_paths(model, history, futures, options, true);
  out.input_treatment = std::move(base.input_treatment);
  out.level = base.level;

  // Parameter uncertainty by the delta method: Var = J Cov J' with J the derivative of the level
  // path in the parameters (central differences) and Cov the fit's covariance.
  Eigen::VectorXd var_param_model = Eigen::VectorXd::Zero(horizon);
  Eigen::VectorXd var_param_inputs = Eigen::VectorXd::Zero(horizon);
  bool model_part = false;  // the model's parameter part is included
  out.parameter_uncertainty = "off";
  if (options.parameter_uncertainty) {
    const auto nonlinear = pack_nonlinear(spec, model.params);
    const auto linear = pack_linear(spec, model.params);
    std::vector<double> all(nonlinear);
    all.insert(all.end(), linear.begin(), linear.end());
    std::vector<std::string> parts;
    if (usable_covariance(model.covariance, all.size())) {
      FittedModel perturbed = model;
      const auto jac =
          level_jacobian(all, model.covariance, horizon, [&](const std::vector<double>& v) {
            perturbed.params =
                unpack(spec, std::span<const double>(v.data(), nonlinear.size()),
                       std::span<const double>(v.data() + nonlinear.size(), linear.size()),
                       model.params.sigma2);
            return compute_paths(perturbed, history, futures, options, false).level;
          });
      var_param_model = (jac * model.covariance * jac.transpose()).diagonal();
      parts.push_back("model");
      model_part = true;
    } else if (!all.empty()) {
      parts.push_back("model left out (no usable covariance)");
    }
    for (size_t m = 0; m < model.input_models.size(); ++m) {
      const InputModel& im = model.input_models[m];
      const int i = [&] {
        for (size_t k = 0; k < spec.inputs.size(); ++k)
          if (spec.inputs[k].name == im.input) return static_cast<int>(k);
        return -1;
      }();
      if (i < 0 || out.input_treatment[i] == "known" || out.input_treatment[i] == "known (event)")
        continue;
      // Order of the input model's covariance: phi, theta, then the mean.
      std::vector<double> values(im.phi);
      values.insert(values.end(), im.theta.begin(), im.theta.end());
      values.push_back(im.mean);
      if (!usable_covariance(im.covariance, values.size())) {
        parts.push_back(fmt::format("input '{}' left out (no covariance)", im.input));
        continue;
      }
      FittedModel perturbed = model;
      const auto jac =
          level_jacobian(values, im.covariance, horizon, [&](const std::vector<double>& v) {
            InputModel& pm = perturbed.input_models[m];
            pm.phi.assign(v.begin(), v.begin() + im.p);
            pm.theta.assign(v.begin() + im.p, v.begin() + im.p + im.q);
            pm.mean = v.back();
            return compute_paths(perturbed, history, futures, options, false).level;
          });
      var_param_inputs += (jac * im.covariance * jac.transpose()).diagonal();
      parts.push_back(fmt::format("input '{}'", im.input));
    }
    out.parameter_uncertainty = "delta method";
    for (size_t k = 0; k < parts.size(); ++k)
      out.parameter_uncertainty += (k == 0 ? ": " : ", ") + parts[k];
  }

  // Degrees of freedom, with the model's parameter part included: sigma^2 is the ML estimate
  // SSR / n, low by (n - k) / n on average with k estimated coefficients (every parameter but
  // sigma^2, start states included), and normal quantiles treat it as known. The model's parts
  // (noise and its parameter estimates, both proportional to sigma^2 to first order) are scaled
  // by n / (n - k) and the quantiles are Student t with n - k degrees of freedom: for a regression
  // with white noise this is the textbook prediction interval. A model without its sample size
  // (n_obs = 0: built by hand) or without a covariance keeps the plain intervals.
  double model_scale = 1.0;
  double quantile_df = std::numeric_limits<double>::infinity();
  if (model_part && model.n_obs > 0) {
    const int k = std::max(model.n_params - 1, 0);
    if (model.n_obs - k >= 1) {
      model_scale = double(model.n_obs) / (model.n_obs - k);
      quantile_df = model.n_obs - k;
      out.parameter_uncertainty +=
          fmt::format("; {} degrees of freedom (sigma^2 as SSR / (n - k), Student t quantiles)",
                      model.n_obs - k);
    }
  }

  var_param_model *= model_scale;
  const Eigen::VectorXd var_noise =
      model_scale * Eigen::Map<const Eigen::VectorXd>(base.var_known.data(), horizon);
  const Eigen::VectorXd var_all =
      var_noise + Eigen::Map<const Eigen::VectorXd>(base.var_inputs.data(), horizon) +
      var_param_model + var_param_inputs;
  const Eigen::VectorXd var_known = var_noise + var_param_model;
  out.share_inputs.resize(horizon);
  out.share_parameters.resize(horizon);
  for (int s = 0; s < horizon; ++s) {
    const double total = var_all(s) > 0.0 ? var_all(s) : 1.0;
    out.share_parameters[s] = (var_param_model(s) + var_param_inputs(s)) / total;
    out.share_inputs[s] =
        std::max(var_all(s) - var_noise(s) - var_param_model(s) - var_param_inputs(s), 0.0) / total;
  }

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
    const double zq = std::isfinite(quantile_df)
                          ? student_t_quantile(0.5 + level / 2.0, quantile_df)
                          : normal_quantile(0.5 + level / 2.0);
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

}  // namespace

ForecastResult forecast(const FittedModel& model, const SeriesData& history,
                        const std::vector<InputFuture>& futures, const ForecastOptions& options) {
  // The ragged edge: the forecast starts after the last row from which the model can start
  // (the target and the `lost` values before it observed, so the differencing can be undone);
  // the input values of the rows after it are known future values.
  const int lost = model.spec.differencing.lost();
  const int rows = history.rows();
  int end = rows;  // rows of history used
  auto usable_end = [&](int e) {
    for (int t = e - std::max(lost, 1); t < e; ++t)
      if (t < 0 || std::isnan(history.target[t])) return false;
    return true;
  };
  while (end > 0 && !usable_end(end)) --end;
  if (end == rows || end == 0) return forecast_complete(model, history, futures, options);
  const int trailing = rows - end;
  const SeriesData head = slice_rows(history, 0, end);
  std::vector<InputFuture> extended;
  for (const auto& use : model.inputs) {
    const int index = history.input_index(use.name);
    const InputFuture* supplied = nullptr;
    for (const auto& f : futures)
      if (f.name == use.name) supplied = &f;
    if (index < 0) {
      if (supplied) extended.push_back(*supplied);
      continue;
    }
    InputFuture f{use.name, std::vector<double>(history.inputs[index].begin() + end,
                                                history.inputs[index].end())};
    if (supplied) f.values.insert(f.values.end(), supplied->values.begin(), supplied->values.end());
    extended.push_back(std::move(f));
  }
  ForecastOptions o = options;
  o.horizon = options.horizon + trailing;
  return forecast_complete(model, head, extended, o);
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
                      {"parameter_uncertainty", r.parameter_uncertainty},
                      {"variance_share_inputs", r.share_inputs},
                      {"variance_share_parameters", r.share_parameters},
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
