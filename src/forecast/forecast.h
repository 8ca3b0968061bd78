#pragma once
// k-step forecasts of a transfer-function model with intervals.
//
// Forecast errors come from three independent sources: the noise innovations (with the
// uncertainty of the filtered state at the origin), and, for every input whose future is
// forecast, its own innovations passed through the input's impulse response. The covariance of
// the integrated errors is accumulated step by step (marginal variances only, so the cost is
// linear in the horizon; the state error at the origin enters through G_s P G_s'). For a long
// history this equals the classical
//   V(k) = sigma^2 sum_{j<k} psi_j^2 + sum_i sigma_i^2 sum_{j<k} (sum_{l<=j} v_{i,l}
//   psibar_{i,j-l})^2
// (Box, Jenkins, Reinsel & Ljung, transfer-function forecasting), and it is exact for short ones.
// On top, by default, the estimation uncertainty of the parameters by the delta method:
// Var_par(k) = J_k C J_k', J_k the derivative of the k-step point forecast (transformed scale) in
// the model's parameters (nonlinear then linear, the fit's covariance C), by central differences
// with steps of 1e-3 s.e.; likewise for each forecast input's own ARMA (phi, theta, mean) with its
// covariance. Estimation error is taken as independent of the future shocks. With the model's
// part included and its sample size known, sigma^2 is taken as SSR / (n - k) instead of the ML
// SSR / n and the quantiles are Student t with n - k df (k: the estimated coefficients). The
// intervals with inputs known (`*_known`) include the model's parameter part but not the input
// models'.
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "core/series.h"
#include "forecast/fitted_model.h"

namespace lagsieve {

// Future values of one input on its original scale. Empty: the input's own model forecasts it.
// Fewer values than the horizon: known for those steps, forecast after (needs an own model).
struct InputFuture {
  std::string name;
  std::vector<double> values;
};

struct ForecastOptions {
  int horizon = 12;
  std::vector<double> levels{0.8, 0.95};
  // Every input treated as known over the whole horizon (values must be supplied): the oracle
  // forecasts of the backtest.
  bool oracle_inputs = false;
  // Add the estimation uncertainty of the model's parameters and of each forecast input's own
  // ARMA model (delta method with their covariances; see forecast.cpp). Parts without a usable
  // covariance (a fit without standard errors) are left out and named in the result.
  bool parameter_uncertainty = true;
};

struct ForecastResult {
  int origin = 0;                       // rows of history used (forecasts are for rows origin..)
  std::vector<std::string> time;        // stamps of the forecast rows ("" without a time column)
  std::vector<double> level;            // forecast on the transformed scale (integrated)
  std::vector<double> se;               // its standard error, all sources
  std::vector<double> se_known_inputs;  // the same with every input's future taken as known
  std::vector<double> median;           // back-transformed point forecast
  std::vector<double> mean;             // bias-adjusted back-transformed mean (= median for none)
  std::vector<double> levels;
  std::vector<std::vector<double>> lower, upper;              // [level][h], original scale
  std::vector<std::vector<double>> lower_known, upper_known;  // intervals with inputs known
  std::vector<std::string>
      input_treatment;  // per input: "known", "forecast", "known 3, then forecast"
  // Shares of the forecast variance (transformed scale) per step: the inputs' own innovations,
  // and the estimation of the parameters (model and own input models); the rest is the noise.
  std::vector<double> share_inputs, share_parameters;
  std::string parameter_uncertainty;  // "off", or "delta method: " and the parts included
};

// Forecasts rows history.rows() .. history.rows() + horizon - 1. `history` holds the target and
// every input of the model (events are regenerated); the model is re-filtered, not re-fitted.
// Missing target values inside the history are predicted through (the filter skips them). When
// the history ends with missing target values (a ragged edge), the forecast starts after the
// last usable row instead (`origin` says where; the steps cover the missing rows too, and the
// input values of those rows are used as known future values).
ForecastResult forecast(const FittedModel& model, const SeriesData& history,
                        const std::vector<InputFuture>& futures, const ForecastOptions& options);

// The forecast as JSON: time, median, mean, bounds per level (inputs as treated and inputs
// known), standard errors on the transformed scale, how each input was treated.
nlohmann::json forecast_to_json(const ForecastResult& f);

// Covariance over the horizon of the errors of an ARMA forecast (units of sigma^2): noise with
// expanded AR `ar`, MA `ma`, state covariance `p_origin` at the origin.
Eigen::MatrixXd arma_forecast_covariance(const std::vector<double>& ar,
                                         const std::vector<double>& ma,
                                         const Eigen::MatrixXd& p_origin, int horizon);

}  // namespace lagsieve
