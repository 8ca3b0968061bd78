// Monte Carlo check of the forecast intervals: from a known 2-input model where one input must be
// forecast, empirical coverage equals nominal; leaving the input uncertainty out under-covers.
#include <gtest/gtest.h>

#include <cstdio>

#include "forecast/forecast.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

TEST(ForecastCoverage, InputUncertaintyMakesIntervalsHonest) {
  constexpr int kHistory = 150;
  constexpr int kHorizon = 12;
  constexpr int kReplications = 4000;
  SimulationSpec sim;
  sim.n = kHistory + kHorizon;
  sim.constant = 2.0;
  SimulatedInput known;  // future known (planned)
  known.name = "plan";
  known.order = {0, 0, 0};
  known.params = {{1.0}, {}};
  known.ar = 0.3;
  SimulatedInput unknown;  // future forecast by its own AR(1)
  unknown.name = "weather";
  unknown.order = {1, 0, 1};
  unknown.params = {{1.5}, {0.5}};
  unknown.ar = 0.6;
  unknown.sd = 1.0;
  sim.inputs = {known, unknown};
  sim.noise = {1, 0, 0, 0, 1};
  sim.phi = {0.4};
  sim.sigma = 1.0;

  FittedModel model;
  model.spec.inputs = {{"plan", known.order}, {"weather", unknown.order}};
  model.spec.noise = sim.noise;
  model.params = zero_params(model.spec);
  model.params.constant = 2.0;
  model.params.inputs = {known.params, unknown.params};
  model.params.phi = {0.4};
  model.params.sigma2 = 1.0;
  InputUse plan_use, weather_use;
  plan_use.name = "plan";
  weather_use.name = "weather";
  weather_use.future = FutureMode::forecast;
  model.inputs = {plan_use, weather_use};
  InputModel own;
  own.input = "weather";
  own.p = 1;
  own.phi = {0.6};
  own.sigma2 = 1.0;
  model.input_models = {own};
  model.start = minimum_start(model.spec);

  const int checked[] = {1, 4, 12};
  int hits[3][2] = {}, hits_known[3][2] = {};
  ForecastOptions options;
  options.horizon = kHorizon;
  for (int rep = 0; rep < kReplications; ++rep) {
    sim.seed = 1000 + static_cast<std::uint64_t>(rep);
    const SeriesData all = simulate(sim);
    SeriesData history = all;
    history.target.resize(kHistory);
    history.time.resize(kHistory);
    for (auto& u : history.inputs) u.resize(kHistory);
    const std::vector<double> plan(all.inputs[0].begin() + kHistory, all.inputs[0].end());
    const auto f = forecast(model, history, {{"plan", plan}}, options);
    for (int c = 0; c < 3; ++c) {
      const int h = checked[c] - 1;
      const double y = all.target[kHistory + h];
      for (int l = 0; l < 2; ++l) {
        hits[c][l] += (y >= f.lower[l][h] && y <= f.upper[l][h]) ? 1 : 0;
        hits_known[c][l] += (y >= f.lower_known[l][h] && y <= f.upper_known[l][h]) ? 1 : 0;
      }
    }
  }
  const double nominal[] = {0.8, 0.95};
  for (int c = 0; c < 3; ++c)
    for (int l = 0; l < 2; ++l) {
      const double cover = double(hits[c][l]) / kReplications;
      const double cover_known = double(hits_known[c][l]) / kReplications;
      std::printf("h=%2d level %.2f: coverage %.4f (input uncertainty left out: %.4f)\n", checked[c],
                  nominal[l], cover, cover_known);
      EXPECT_NEAR(cover, nominal[l], 0.02) << "h=" << checked[c];
      if (checked[c] > 1) {  // for h <= b the input adds nothing
        EXPECT_LT(cover_known, nominal[l] - 0.02) << "h=" << checked[c];
      }
    }
}

}  // namespace
}  // namespace lagsieve
