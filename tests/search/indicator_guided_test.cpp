// A step given as a plain data column (no event in the config) is recognised by the screen as an
// indicator and screened without prewhitening, so the `guided` strategy keeps it (optional input,
// seeded simulation with a step at row 250 entering with delay 2).
#include <gtest/gtest.h>

#include "core/config.h"
#include "model/simulate.h"
#include "search/search.h"

namespace lagsieve {
namespace {

TEST(SearchIndicator, GuidedKeepsAStepDataColumn) {
  SimulationSpec sim;
  sim.n = 400;
  sim.seed = 7000;
  sim.noise.p = 1;
  sim.phi = {0.5};
  sim.sigma = 1.0;
  sim.constant = 0.2;
  sim.integrate.regular = 0;  // levels: the step stays a step after the differencing
  SimulatedInput x;
  x.name = "x";
  x.order = {1, 0, 0};
  x.params.omega = {1.0};
  SimulatedInput law;
  law.name = "law";
  law.is_event = true;  // generated as a step; the config below sees it as a data column
  law.shape = EventShape::step;
  law.at_row = 250;
  law.order = {2, 0, 0};
  law.params.omega = {6.0};  // about five s.d. of the AR(1) noise
  sim.inputs = {x, law};
  const SeriesData data = simulate(sim);

  RunConfig config;
  config.config_file = "indicator.yaml";
  config.target.columns = {"y"};

  InputConfig cx;
  cx.name = "x";
  cx.delay = {0, 3};
  cx.numerator = {0, 1};
  cx.denominator = {0, 1};
  InputConfig cl;
  cl.name = "law";
  cl.delay = {0, 4};
  cl.numerator = {0, 1};
  cl.denominator = {0, 0};
  cl.optional = true;
  config.inputs = {cx, cl};
  config.noise.ar = {0, 1};
  config.noise.ma = {0, 1};
  config.noise.constant = ConstantMode::yes;
  config.search.strategy = Strategy::guided;
  config.search.criterion = Criterion::bic;
  config.search.threads = 2;
  SearchOptions options;
  options.threads = 2;
  const SearchResult result = run_search(data, config, options);
  ASSERT_TRUE(result.screen.has_value());
  EXPECT_EQ(result.screen->inputs[1].indicator.shape, IndicatorShape::step);
  EXPECT_TRUE(result.screen->inputs[1].relevant);
  ASSERT_FALSE(result.rows.empty());
  const auto& top = result.rows.front().spec;
  const InputTerm* kept = nullptr;
  for (const auto& term : top.inputs)
    if (term.name == "law") kept = &term;
  ASSERT_NE(kept, nullptr) << "the guided chosen model dropped the step column";
  EXPECT_EQ(kept->order.delay, 2);
  ASSERT_TRUE(result.has_chosen());
  // The chosen model's estimate of the jump (the omega of `law`) is near the true 6.
  int checked = 0;
  for (const auto& e : result.chosen.estimates) {
    if (e.name != "law.omega0") continue;
    EXPECT_NEAR(e.value, 6.0, 3.0 * e.std_error);
    ++checked;
  }
  EXPECT_EQ(checked, 1);
}

}  // namespace
}  // namespace lagsieve
