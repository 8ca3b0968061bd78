// Rolling-origin backtest: equivalence with direct forecasts, interval coverage of the true
// model, and the value of an input (Diebold-Mariano).
#include <gtest/gtest.h>

#include <atomic>
#include <cmath>

#include "backtest/backtest.h"
#include "core/error.h"
#include "forecast/forecast.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

SimulationSpec two_input_truth(int n, std::uint64_t seed) {
  SimulationSpec s;
  s.n = n;
  s.seed = seed;
  s.constant = 1.0;
  SimulatedInput x1;
  x1.name = "x1";
  x1.order = {1, 0, 1};
  x1.params = {{2.0}, {0.5}};
  x1.ar = 0.6;
  SimulatedInput x2;
  x2.name = "x2";
  x2.order = {0, 0, 0};
  x2.params = {{0.8}, {}};
  x2.ar = 0.3;
  s.inputs = {x1, x2};
  s.noise = {1, 0, 0, 0, 1};
  s.phi = {0.5};
  s.sigma = 1.0;
  return s;
}

ModelSpec true_spec() {
  ModelSpec spec;
  spec.inputs = {{"x1", {1, 0, 1}}, {"x2", {0, 0, 0}}};
  spec.noise = {1, 0, 0, 0, 1};
  spec.constant = true;
  return spec;
}

FittedModel true_model() {
  FittedModel m;
  m.spec = true_spec();
  m.params = zero_params(m.spec);
  m.params.constant = 1.0;
  m.params.inputs[0] = {{2.0}, {0.5}};
  m.params.inputs[1] = {{0.8}, {}};
  m.params.phi = {0.5};
  m.params.sigma2 = 1.0;
  for (const auto& t : m.spec.inputs) {
    InputUse use;
    use.name = t.name;
    m.inputs.push_back(use);
  }
  m.start = minimum_start(m.spec);
  return m;
}

// Both inputs as plain columns whose future is known.
RunConfig two_input_config() {
  RunConfig config;
  for (const auto* name : {"x1", "x2"}) {
    InputConfig ic;
    ic.name = name;
    config.inputs.push_back(ic);
  }
  return config;
}

TEST(Backtest, RefitNeverEqualsDirectForecastsFromTheFirstFit) {
  const SeriesData data = simulate(two_input_truth(260, 3));
  BacktestOptions o;
  o.first_origin = 200;
  o.step = 7;
  o.horizon = 5;
  o.refit = 0;
  o.threads = 1;
  const RunConfig config = two_input_config();
  const auto candidate = candidate_from_spec("truth", true_spec(), config);
  const auto result = run_backtest(data, {candidate}, o);
  ASSERT_EQ(result.models.size(), 1u);
  ASSERT_EQ(result.models[0].failed_origins, 0) << result.models[0].note;

  // The same by hand: one fit on the first window, then forecasts re-filtered at each origin.
  SeriesData first = data;
  first.target.resize(200);
  for (auto& u : first.inputs) u.resize(200);
  first.time.resize(200);
  FitOptions fo;
  fo.standard_errors = false;
  fo.diagnostics = false;
  const FitResult fit = fit_model(make_problem(first, true_spec(), -1), fo);
  FittedModel model = true_model();
  model.params = fit.params;
  model.start = fit.start;
  size_t checked = 0;
  for (int origin : result.origins) {
    SeriesData window = data;
    window.target.resize(origin);
    window.time.resize(origin);
    for (auto& u : window.inputs) u.resize(origin);
    const int h = std::min(5, data.rows() - origin);
    std::vector<InputFuture> futures;
    for (int i = 0; i < 2; ++i)
      futures.push_back({data.input_names[i], {data.inputs[i].begin() + origin, data.inputs[i].begin() + origin + h}});
    ForecastOptions fopt;
    fopt.horizon = h;
    const auto f = forecast(model, window, futures, fopt);
    for (const auto& rec : result.models[0].production.records)
      if (rec.origin == origin) {
        EXPECT_NEAR(rec.forecast, f.median[rec.horizon - 1], 1e-10);
        EXPECT_NEAR(rec.upper[1], f.upper[1][rec.horizon - 1], 1e-10);
        ++checked;
      }
  }
  EXPECT_EQ(checked, result.models[0].production.records.size());
  EXPECT_GT(checked, 30u);
}

TEST(Backtest, TrueModelCoverageAndTheValueOfItsMainInput) {
  const SeriesData data = simulate(two_input_truth(1400, 11));
  BacktestOptions o;
  o.first_origin = 300;
  o.step = 1;
  o.horizon = 3;
  o.refit = 0;
  const auto truth = candidate_from_model("truth", true_model());
  const auto result = run_backtest(data, {truth}, o);
  const auto& acc = result.models[0].production_accuracy.overall;
  ASSERT_GT(acc.count, 3000);
  // Inputs known and parameters true: the intervals are exact, so coverage is nominal up to
  // sampling error (about 1 point here).
  EXPECT_NEAR(acc.coverage[0], 0.80, 0.03);
  EXPECT_NEAR(acc.coverage[1], 0.95, 0.03);

  // Leaving out x1 (the main input) must cost accuracy, significantly.
  const RunConfig config = two_input_config();
  BacktestOptions coarse = o;
  coarse.step = 5;
  coarse.refit = 40;
  const auto fitted = candidate_from_spec("truth refitted", true_spec(), config);
  const auto both = run_backtest(data, {fitted}, coarse);
  const auto values = input_value(data, fitted, both.models[0], coarse);
  ASSERT_EQ(values.size(), 2u);
  EXPECT_EQ(values[0].input, "x1");
  EXPECT_GT(values[0].score_without, values[0].score_with);
  EXPECT_LT(values[0].test.p_value, 0.05);
}

// BacktestOptions::cancel: set midway (here after the third origin), the backtest stops before
// the next origin and throws Cancelled instead of returning a partial result; set beforehand, no
// origin runs; a flag that stays clear changes nothing.
BacktestOptions cancel_options() {
  BacktestOptions o;
  o.first_origin = 200;
  o.step = 5;
  o.horizon = 3;
  o.refit = 1;
  o.threads = 1;
  return o;
}

TEST(Backtest, ASetCancelFlagStopsBeforeTheNextOrigin) {
  const SeriesData data = simulate(two_input_truth(260, 5));
  const auto candidate = candidate_from_spec("truth", true_spec(), two_input_config());
  std::atomic<bool> cancel{false};
  int done = 0;
  BacktestOptions o = cancel_options();
  o.cancel = &cancel;
  o.origin_done = [&] {
    if (++done == 3) cancel = true;
  };
  EXPECT_THROW(run_backtest(data, {candidate}, o), Cancelled);
  EXPECT_EQ(done, 3);  // of 12 origins

  done = 0;
  EXPECT_THROW(input_value(data, candidate, ModelBacktest{}, o), Cancelled);
  EXPECT_EQ(done, 0);  // the flag was already set: not one origin ran
}

TEST(Backtest, AClearCancelFlagChangesNothing) {
  const SeriesData data = simulate(two_input_truth(260, 5));
  const auto candidate = candidate_from_spec("truth", true_spec(), two_input_config());
  const BacktestOptions plain = cancel_options();
  std::atomic<bool> cancel{false};
  int done = 0;
  BacktestOptions watched = plain;
  watched.cancel = &cancel;
  watched.origin_done = [&] { ++done; };
  const std::vector<BacktestCandidate> candidates{candidate, seasonal_naive_candidate(1)};
  const auto a = run_backtest(data, candidates, plain);
  const auto b = run_backtest(data, candidates, watched);
  ASSERT_EQ(a.origins.size(), 12u);
  EXPECT_EQ(done, 24);  // every origin of both candidates
  EXPECT_EQ(a.origins, b.origins);
  ASSERT_EQ(a.models.size(), b.models.size());
  for (size_t i = 0; i < a.models.size(); ++i) {
    EXPECT_EQ(a.models[i].score, b.models[i].score);
    ASSERT_EQ(a.models[i].production.records.size(), b.models[i].production.records.size());
    for (size_t r = 0; r < a.models[i].production.records.size(); ++r)
      EXPECT_EQ(a.models[i].production.records[r].forecast,
                b.models[i].production.records[r].forecast);
  }
}

}  // namespace
}  // namespace lagsieve
