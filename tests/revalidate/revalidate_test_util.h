#pragma once
// Helpers of the re-validation tests: one simulated truth, a config around it, the deployed model
// fitted on the training rows, and new rows from the same or a changed process.
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>

#include <fmt/format.h>

#include "core/config.h"
#include "core/series.h"
#include "forecast/fitted_model.h"
#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"
#include "run_binary.h"

namespace lagsieve::testing {

inline constexpr int kTrainingRows = 300;
inline constexpr int kNewRows = 100;

// y = 10 + [omega / (1 - 0.5 B)] B^b x + n,  n AR(1) 0.5,  x AR(1) 0.5, sd 1.
inline SimulationSpec truth(std::uint64_t seed, double omega = 2.0, int delay = 2) {
  SimulationSpec sim;
  sim.n = kTrainingRows + kNewRows;
  sim.seed = seed;
  sim.constant = 10.0;
  sim.sigma = 1.0;
  sim.noise = {1, 0, 0, 0, 1};
  sim.phi = {0.5};
  SimulatedInput x;
  x.name = "x";
  x.order = {delay, 0, 1};
  x.params.omega = {omega};
  x.params.delta = {0.5};
  x.ar = 0.5;
  x.sd = 1.0;
  sim.inputs.push_back(x);
  return sim;
}

// The training rows of `before`, then the new rows of `after` (same seed: the input and the noise
// are the same draws, only the transfer function changes at row kTrainingRows).
inline SeriesData spliced(const SeriesData& before, const SeriesData& after) {
  SeriesData out = before;
  for (int t = kTrainingRows; t < out.rows(); ++t) out.target[t] = after.target[t];
  return out;
}

// The first `rows` rows.
inline SeriesData head(const SeriesData& data, int rows) { return slice_rows(data, 0, rows); }

// A small grid around the truth; backtest of horizon 3 re-fitted every 10th origin.
inline RunConfig small_config() {
  RunConfig config;
  config.config_file = "revalidate_test.yaml";  // only named in messages (no such file)
  config.target.columns = {"y"};
  InputConfig x;
  x.name = "x";
  x.delay = {1, 3};
  x.numerator = {0, 0};
  x.denominator = {0, 1};
  config.inputs.push_back(x);
  config.noise.ar = {0, 1};
  config.noise.ma = {0, 0};
  config.noise.constant = ConstantMode::yes;
  config.search.strategy = Strategy::exhaustive;
  config.search.criterion = Criterion::bic;
  config.search.threads = 1;
  config.backtest.enabled = true;
  config.backtest.horizon = 3;
  config.backtest.refit = 10;
  config.backtest.shortlist = 3;
  return config;
}

// The deployed model: the true structure fitted on the training rows.
inline FittedModel deployed_model(const SeriesData& training, const RunConfig& config) {
  ModelSpec spec;
  spec.inputs = {{"x", {2, 0, 1}}};
  spec.noise = {1, 0, 0, 0, 1};
  spec.constant = true;
  const FitResult fit = fit_model(make_problem(training, spec));
  return make_fitted_model(fit, config, training);
}

}  // namespace lagsieve::testing
