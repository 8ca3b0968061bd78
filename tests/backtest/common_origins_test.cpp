// Every model and benchmark of one backtest is scored on the same origins: an origin some
// candidate cannot forecast from (an event after it: the window cannot estimate the event) is
// dropped for all, with a warning naming the cause, the count and the first origin that works.
#include <gtest/gtest.h>

#include <set>

#include "backtest/backtest.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

// y = 5 + 1.5 x + 4 step(t >= 230) + AR(1) noise; n = 300.
constexpr int kEventRow = 230;

SeriesData event_data(std::uint64_t seed) {
  SimulationSpec s;
  s.n = 300;
  s.seed = seed;
  s.constant = 5.0;
  SimulatedInput x;
  x.name = "x";
  x.order = {0, 0, 0};
  x.params = {{1.5}, {}};
  x.ar = 0.5;
  SimulatedInput shift;
  shift.name = "shift";
  shift.is_event = true;
  shift.shape = EventShape::step;
  shift.at_row = kEventRow;
  shift.order = {0, 0, 0};
  shift.params = {{4.0}, {}};
  s.inputs = {x, shift};
  s.noise = {1, 0, 0, 0, 1};
  s.phi = {0.5};
  s.sigma = 1.0;
  return simulate(s);
}

RunConfig event_config() {
  RunConfig config;
  config.config_file = "common_origins.yaml";
  InputConfig x;
  x.name = "x";
  InputConfig shift;
  shift.name = "shift";
  shift.is_event = true;
  shift.shape = EventShape::step;
  shift.at = std::to_string(kEventRow + 1);  // the simulated time stamps are 1-based rows
  config.inputs = {x, shift};
  return config;
}

ModelSpec spec_with(bool event) {
  ModelSpec spec;
  spec.inputs = {{"x", {0, 0, 0}}};
  if (event) spec.inputs.push_back({"shift", {0, 0, 0}});
  spec.noise = {1, 0, 0, 0, 1};
  spec.constant = true;
  return spec;
}

TEST(BacktestCommonOrigins, AnEventAfterTheFirstOriginDropsTheSameOriginsForEveryModel) {
  const SeriesData data = event_data(77);
  const RunConfig config = event_config();
  BacktestOptions o;
  o.first_origin = 200;
  o.step = 5;
  o.horizon = 4;
  o.threads = 2;
  auto with = candidate_from_spec("with event", spec_with(true), config);
  auto without = candidate_from_spec("without event", spec_with(false), config);
  without.benchmark = true;
  const auto result = run_backtest(data, {with, without, seasonal_naive_candidate(1)}, o);

  // Origins 200..295 every 5; those up to 230 hold no active event row: 200..230 are dropped.
  const std::vector<int> dropped{200, 205, 210, 215, 220, 225, 230};
  EXPECT_EQ(result.dropped_origins, dropped);
  ASSERT_EQ(result.origins.size(), 13u);
  EXPECT_EQ(result.origins.front(), 235);
  ASSERT_EQ(result.models.size(), 3u);
  EXPECT_EQ(result.models[0].failed_origins, 7);
  EXPECT_EQ(result.models[1].failed_origins, 0);
  for (const auto& m : result.models) {
    std::set<int> origins;
    for (const auto& r : m.production.records) origins.insert(r.origin);
    EXPECT_EQ(origins, std::set<int>(result.origins.begin(), result.origins.end())) << m.name;
    EXPECT_EQ(m.production_accuracy.overall.count,
              result.models[0].production_accuracy.overall.count)
        << m.name;
    ASSERT_EQ(m.production_accuracy.by_horizon.size(), 4u);
    for (int h = 0; h < 4; ++h)
      EXPECT_EQ(m.production_accuracy.by_horizon[h].count,
                result.models[0].production_accuracy.by_horizon[h].count)
          << m.name << " h " << h + 1;
  }
  // 13 origins, the last (295) with 4 of 4 steps inside 300 rows: 13 * 4 = 52 forecasts each.
  EXPECT_EQ(result.models[2].production_accuracy.overall.count, 52);
  for (const auto& c : result.comparisons)
    if (c.tested) {
      EXPECT_EQ(c.test.n, 13) << c.challenger << " h " << c.horizon;
    }

  ASSERT_EQ(result.warnings.size(), 1u);
  EXPECT_EQ(result.warnings[0].code, "backtest_origins_dropped");
  EXPECT_EQ(result.warnings[0].number("dropped"), 7);
  EXPECT_EQ(result.warnings[0].number("origins"), 20);
  EXPECT_EQ(result.warnings[0].number("suggested_first_origin"), 235);
  const std::string& w = result.warnings[0].message;
  EXPECT_NE(w.find("7 of 20 origins (200..230 every 5) dropped for every model and benchmark"),
            std::string::npos)
      << w;
  EXPECT_NE(w.find("with event (7 origins) could not forecast from them: input 'shift'"),
            std::string::npos)
      << w;
  EXPECT_NE(w.find("set backtest.first_origin: 235"), std::string::npos) << w;

  // Said in advance (validate): windows before origin 231 cannot estimate the step at row 231.
  const auto bounds = event_origin_bounds(config, data, o.first_origin);
  ASSERT_EQ(bounds.size(), 1u);
  EXPECT_EQ(bounds[0].event, "shift");
  EXPECT_EQ(bounds[0].event_row, kEventRow + 1);
  EXPECT_EQ(bounds[0].first_origin, kEventRow + 1);
  EXPECT_TRUE(event_origin_bounds(config, data, 240).empty());
}

TEST(BacktestCommonOrigins, NothingIsDroppedWhenEveryModelForecastsFromEveryOrigin) {
  const SeriesData data = event_data(78);
  BacktestOptions o;
  o.first_origin = 240;
  o.step = 5;
  o.horizon = 3;
  o.threads = 1;
  const auto result =
      run_backtest(data,
                   {candidate_from_spec("with event", spec_with(true), event_config()),
                    seasonal_naive_candidate(1)},
                   o);
  EXPECT_TRUE(result.dropped_origins.empty());
  EXPECT_TRUE(result.warnings.empty());
  EXPECT_EQ(result.origins.size(), 12u);
  // origin_times: the origin's own (last window) row, 1-based row n = 0-based index n - 1.
  EXPECT_EQ(result.origin_times.front(), data.time[239]);
}

}  // namespace
}  // namespace lagsieve
