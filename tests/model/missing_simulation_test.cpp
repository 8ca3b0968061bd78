// Seeded simulation with 10 % of target values missing at random: the exact likelihood of the
// observed values keeps the estimates unbiased and the intervals (parameter and forecast) at
// their nominal coverage. The yardstick is the truth the data were drawn from.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include "forecast/forecast.h"
#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

constexpr int kSeeds = 200;
constexpr int kLength = 300;
constexpr int kHorizon = 3;

// Truth: y_t = 1 + 2 x_{t-1} + n_t, (1 - 0.7 B) n_t = a_t, sigma = 1; x is AR(1) with 0.5.
SimulationSpec true_model(std::uint64_t seed) {
  SimulationSpec sim;
  sim.n = kLength + kHorizon;
  sim.seed = seed;
  sim.constant = 1.0;
  sim.sigma = 1.0;
  sim.noise = {1, 0, 0, 0, 1};
  sim.phi = {0.7};
  SimulatedInput x;
  x.name = "x";
  x.order = {1, 0, 0};
  x.params.omega = {2.0};
  x.ar = 0.5;
  sim.inputs = {x};
  return sim;
}

TEST(MissingSimulation, TenPercentMissingAtRandomKeepsEstimatesUnbiasedAndCoverage) {
  const std::vector<std::pair<std::string, double>> truth = {
      {"phi1", 0.7}, {"constant", 1.0}, {"x.omega0", 2.0}};
  ModelSpec spec;
  spec.inputs = {{"x", {1, 0, 0}}};
  spec.noise = {1, 0, 0, 0, 1};
  std::vector<double> sum(3, 0.0), sum_se(3, 0.0);
  int covered = 0, intervals = 0, forecast_covered = 0, forecasts = 0, missing_total = 0;
  for (int seed = 1; seed <= kSeeds; ++seed) {
    const SeriesData all = simulate(true_model(static_cast<std::uint64_t>(seed)));
    SeriesData data = slice_rows(all, 0, kLength);
    std::mt19937_64 rng(1000 + static_cast<std::uint64_t>(seed));
    std::bernoulli_distribution drop(0.10);
    for (int t = 2; t < kLength - 1; ++t)  // the last value stays observed: a plain origin
      if (drop(rng)) {
        data.target[t] = std::numeric_limits<double>::quiet_NaN();
        ++missing_total;
      }
    const auto fit = fit_model(make_problem(data, spec));
    ASSERT_TRUE(fit.usable()) << "seed " << seed << ": " << fit.message;
    ASSERT_EQ(fit.estimates.size(), 3u);
    for (size_t i = 0; i < 3; ++i) {
      const auto& e = fit.estimates[i];
      ASSERT_EQ(e.name, truth[i].first);
      sum[i] += e.value;
      sum_se[i] += e.std_error;
      covered += std::abs(e.value - truth[i].second) <= 1.959964 * e.std_error ? 1 : 0;
      ++intervals;
    }
    FittedModel model;
    model.spec = fit.spec;
    model.params = fit.params;
    model.start = fit.start;
    InputUse use;
    use.name = "x";
    model.inputs = {use};
    ForecastOptions fo;
    fo.horizon = kHorizon;
    fo.levels = {0.95};
    const std::vector<InputFuture> future = {
        {"x", std::vector<double>(all.inputs[0].begin() + kLength, all.inputs[0].end())}};
    const auto f = forecast(model, data, future, fo);
    for (int h = 0; h < kHorizon; ++h) {
      const double actual = all.target[kLength + h];
      forecast_covered += actual >= f.lower[0][h] && actual <= f.upper[0][h] ? 1 : 0;
      ++forecasts;
    }
  }
  std::printf("%d seeds, n = %d, %.1f %% missing\n", kSeeds, kLength,
              100.0 * missing_total / (kSeeds * (kLength - 3.0)));
  for (size_t i = 0; i < 3; ++i) {
    const double mean = sum[i] / kSeeds, se = sum_se[i] / kSeeds;
    std::printf("  %-9s truth %.3f mean %.4f  mean s.e. %.4f  bias/s.e. %+.3f\n",
                truth[i].first.c_str(), truth[i].second, mean, se, (mean - truth[i].second) / se);
    EXPECT_LT(std::abs(mean - truth[i].second), 0.5 * se) << truth[i].first;
  }
  const double coverage = 100.0 * covered / intervals;
  const double fcoverage = 100.0 * forecast_covered / forecasts;
  std::printf("  95 %% parameter intervals cover %.1f %%, 95 %% forecast intervals %.1f %%\n",
              coverage, fcoverage);
  EXPECT_NEAR(coverage, 95.0, 3.0);
  EXPECT_NEAR(fcoverage, 95.0, 3.0);
}

}  // namespace
}  // namespace lagsieve
