// The delta-method parameter part of the forecast variance against the textbook closed form:
// for a regression with white noise and known future regressors, the prediction variance is
// s^2 (1 + x0' (X'X)^-1 x0) (e.g. Greene, Econometric Analysis, the forecast-error variance of
// the linear model; standard, quoted from memory), with Cov(beta) = s^2 (X'X)^-1.
#include <gtest/gtest.h>

#include <Eigen/Dense>
#include <cmath>

#include "core/random.h"
#include "forecast/forecast.h"
#include "model/likelihood.h"

namespace lagsieve {
namespace {

TEST(ForecastParameters, RegressionMatchesClassicalPredictionVariance) {
  constexpr int kRows = 60, kHorizon = 5;
  Random rng(11);
  SeriesData history;
  history.target_name = "y";
  history.input_names = {"x"};
  history.inputs.resize(1);
  for (int t = 0; t < kRows; ++t) {
    const double x = 2.0 + rng.normal();
    history.inputs[0].push_back(x);
    history.target.push_back(1.0 + 0.7 * x + 0.5 * rng.normal());
    history.time.push_back("");
  }
  std::vector<double> future;
  for (int h = 0; h < kHorizon; ++h) future.push_back(2.0 + 3.0 * rng.normal());
  Eigen::MatrixXd x(kRows, 2);
  Eigen::VectorXd y(kRows);
  for (int t = 0; t < kRows; ++t)
    x(t, 0) = 1.0, x(t, 1) = history.inputs[0][t], y(t) = history.target[t];
  const Eigen::VectorXd beta = (x.transpose() * x).ldlt().solve(x.transpose() * y);
  const double s2 = (y - x * beta).squaredNorm() / kRows;
  const Eigen::MatrixXd xtx_inv = (x.transpose() * x).inverse();

  FittedModel model;
  model.spec.inputs = {{"x", {0, 0, 0}}};
  model.params = zero_params(model.spec);
  model.params.constant = beta(0);
  model.params.inputs[0].omega = {beta(1)};
  model.params.sigma2 = s2;
  model.param_names = {"constant", "x.omega0"};
  model.covariance = s2 * xtx_inv;  // order: linear parameters, constant first
  InputUse use;
  use.name = "x";
  model.inputs = {use};
  model.start = minimum_start(model.spec);
  ForecastOptions options;
  options.horizon = kHorizon;
  const auto with = forecast(model, history, {{"x", future}}, options);
  options.parameter_uncertainty = false;
  const auto without = forecast(model, history, {{"x", future}}, options);
  EXPECT_EQ(without.parameter_uncertainty, "off");
  EXPECT_EQ(with.parameter_uncertainty, "delta method: model");
  for (int h = 0; h < kHorizon; ++h) {
    Eigen::Vector2d x0(1.0, future[h]);
    const double classical = s2 * (1.0 + x0.dot(xtx_inv * x0));
    EXPECT_NEAR(with.se[h] * with.se[h], classical, 1e-10 * classical) << h;
    EXPECT_NEAR(without.se[h] * without.se[h], s2, 1e-12 * s2) << h;
    EXPECT_NEAR(with.share_parameters[h], 1.0 - s2 / classical, 1e-9);
    EXPECT_NEAR(with.share_inputs[h], 0.0, 1e-12);
    EXPECT_NEAR(with.level[h], beta(0) + beta(1) * future[h], 1e-10);
  }
}

// With the sample size known (a fitted model's n_obs and n_params), the parameter-uncertainty
// intervals carry the degrees-of-freedom correction: the same regression's textbook prediction
// interval yhat +- t_{n-k, 1-a/2} s sqrt(1 + x0' (X'X)^-1 x0), s^2 = SSR / (n - k), k = 2 here
// (same sources). Leaving the parameter uncertainty out keeps the ML sigma^2 and normal quantiles.
TEST(ForecastParameters, DegreesOfFreedomGiveTheRegressionPredictionInterval) {
  constexpr int kRows = 40, kHorizon = 3;
  Random rng(23);
  SeriesData history;
  history.target_name = "y";
  history.input_names = {"x"};
  history.inputs.resize(1);
  for (int t = 0; t < kRows; ++t) {
    const double x = 1.0 + rng.normal();
    history.inputs[0].push_back(x);
    history.target.push_back(0.5 - 0.3 * x + 0.8 * rng.normal());
    history.time.push_back("");
  }
  const std::vector<double> future{0.2, 1.5, 4.0};
  Eigen::MatrixXd x(kRows, 2);
  Eigen::VectorXd y(kRows);
  for (int t = 0; t < kRows; ++t)
    x(t, 0) = 1.0, x(t, 1) = history.inputs[0][t], y(t) = history.target[t];
  const Eigen::VectorXd beta = (x.transpose() * x).ldlt().solve(x.transpose() * y);
  const double ssr = (y - x * beta).squaredNorm();
  const Eigen::MatrixXd xtx_inv = (x.transpose() * x).inverse();

  FittedModel model;
  model.spec.inputs = {{"x", {0, 0, 0}}};
  model.params = zero_params(model.spec);
  model.params.constant = beta(0);
  model.params.inputs[0].omega = {beta(1)};
  model.params.sigma2 = ssr / kRows;  // the ML estimate, as a fit stores it
  model.param_names = {"constant", "x.omega0"};
  model.covariance = ssr / kRows * xtx_inv;
  model.n_obs = kRows;
  model.n_params = 3;  // constant, omega, sigma^2
  InputUse use;
  use.name = "x";
  model.inputs = {use};
  model.start = minimum_start(model.spec);
  ForecastOptions options;
  options.horizon = kHorizon;
  options.levels = {0.9};
  const auto with = forecast(model, history, {{"x", future}}, options);
  options.parameter_uncertainty = false;
  const auto without = forecast(model, history, {{"x", future}}, options);
  // qt(0.95, 38) from R 4.2.2 and qnorm(0.95).
  const double t38 = 1.6859544601667369, z = 1.6448536269514715;
  const double s2 = ssr / (kRows - 2);
  for (int h = 0; h < kHorizon; ++h) {
    Eigen::Vector2d x0(1.0, future[h]);
    const double se = std::sqrt(s2 * (1.0 + x0.dot(xtx_inv * x0)));
    const double yhat = beta(0) + beta(1) * future[h];
    EXPECT_NEAR(with.se[h], se, 1e-9 * se) << h;
    EXPECT_NEAR(with.lower[0][h], yhat - t38 * se, 1e-8) << h;
    EXPECT_NEAR(with.upper[0][h], yhat + t38 * se, 1e-8) << h;
    const double se_ml = std::sqrt(ssr / kRows);
    EXPECT_NEAR(without.upper[0][h], yhat + z * se_ml, 1e-9) << h;
  }
}

}  // namespace
}  // namespace lagsieve
