// Backtests on a target with missing and interpolated values: no forecast is ever scored
// against a value that was not observed, every model and the benchmark are scored on the same
// (origin, horizon) pairs, and origins inside a missing stretch forecast from the last observed
// value (the ragged edge).
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <set>

#include "backtest/backtest.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

TEST(MissingBacktest, FilledAndMissingValuesAreNeverScored) {
  SimulationSpec sim;
  sim.n = 160;
  sim.seed = 77;
  sim.constant = 5.0;
  sim.noise = {1, 0, 0, 0, 1};
  sim.phi = {0.6};
  SimulatedInput x;
  x.name = "x";
  x.order = {0, 0, 0};
  x.params.omega = {1.5};
  x.ar = 0.4;
  sim.inputs = {x};
  SeriesData data = simulate(sim);
  // Rows 125-126 were interpolated (filled, flagged), rows 131, 140-142 missing (skip): an
  // origin at 141 or 142 sits inside a missing stretch.
  const std::set<int> filled{125, 126}, missing{131, 140, 141, 142};
  data.target_filled.assign(data.target.size(), 0);
  for (int t : filled) {
    data.target[t] = 0.5 * (data.target[t - 1] + data.target[t + 1]);
    data.target_filled[t] = 1;
  }
  for (int t : missing) data.target[t] = std::numeric_limits<double>::quiet_NaN();

  ModelSpec spec;
  spec.inputs = {{"x", {0, 0, 0}}};
  spec.noise = {1, 0, 0, 0, 1};
  RunConfig config;
  config.inputs.push_back(InputConfig{});
  config.inputs.back().name = "x";
  BacktestOptions o;
  o.first_origin = 120;
  o.horizon = 4;
  o.threads = 1;
  o.levels = {0.9};
  const auto result = run_backtest(
      data, {candidate_from_spec("model", spec, config), seasonal_naive_candidate(1)}, o);
  ASSERT_EQ(result.models.size(), 2u);
  int expected = 0;
  for (int origin : result.origins)
    for (int h = 0; h < 4 && origin + h < data.rows(); ++h)
      expected += filled.count(origin + h) || missing.count(origin + h) ? 0 : 1;
  for (const auto& m : result.models) {
    SCOPED_TRACE(m.name);
    EXPECT_EQ(m.failed_origins, 0) << m.note;
    EXPECT_EQ(static_cast<int>(m.production.records.size()), expected);
    EXPECT_EQ(static_cast<int>(m.oracle.records.size()), expected);
    for (const auto& r : m.production.records) {
      const int row = r.origin + r.horizon - 1;
      EXPECT_FALSE(filled.count(row)) << "scored a filled value at row " << row;
      EXPECT_FALSE(missing.count(row)) << "scored a missing value at row " << row;
      EXPECT_TRUE(std::isfinite(r.actual) && std::isfinite(r.forecast)) << row;
    }
  }
  // The origin at 142 (rows 140-141 missing before it) still forecasts row 143 onwards.
  bool origin_142 = false;
  for (const auto& r : result.models[0].production.records)
    origin_142 = origin_142 || (r.origin == 142 && r.horizon == 2);
  EXPECT_TRUE(origin_142);
}

}  // namespace
}  // namespace lagsieve
