// Seeded simulations with planted effects: a transfer-function model with ARMA(1,1) noise, one to
// three effects per series (additive outliers, level shifts and temporary changes in turn) at a
// given size in units of the innovation standard deviation. Detection is run at the default
// critical value and scored against the truth: detected with the right type within +-1 row,
// detected as another type, missed; and on clean series, the false alarms per series.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <vector>

#include "core/random.h"
#include "model/simulate.h"
#include "outliers/detect.h"

namespace lagsieve {
namespace {

// Truth: x enters through 2.0 B / (1 - 0.5 B); noise (1 - 0.5 B) n_t = (1 + 0.3 B) a_t, sigma 1,
// constant 10.
SimulationSpec true_model(int n, std::uint64_t seed) {
  SimulationSpec sim;
  sim.n = n;
  sim.seed = seed;
  sim.constant = 10.0;
  sim.sigma = 1.0;
  sim.noise = {1, 1, 0, 0, 1};
  sim.phi = {0.5};
  sim.theta = {0.3};
  SimulatedInput x;
  x.name = "x";
  x.order = {1, 0, 1};
  x.params.omega = {2.0};
  x.params.delta = {0.5};
  x.ar = 0.6;
  sim.inputs = {x};
  return sim;
}

ModelSpec fitted_spec() {
  ModelSpec spec;
  spec.inputs = {{"x", {1, 0, 1}}};
  spec.noise = {1, 1, 0, 0, 1};
  spec.constant = true;
  return spec;
}

struct Planted {
  OutlierType type;
  int row;
};

// One to three effects (1 + seed % 3), types in turn from `first_type`, at rows at least 25 apart
// and 10 from either end, signs random.
std::vector<Planted> plant(SeriesData& data, std::uint64_t seed, double size, int* type_cursor) {
  Random rng(seed * 7919 + 17);
  const int n = data.rows();
  const int count = 1 + static_cast<int>(seed % 3);
  std::vector<Planted> out;
  while (static_cast<int>(out.size()) < count) {
    const int row = 10 + static_cast<int>(rng.uniform() * (n - 20));
    bool clear = true;
    for (const auto& p : out) clear = clear && std::abs(p.row - row) >= 25;
    if (!clear) continue;
    OutlierEffect e;
    e.type = static_cast<OutlierType>((*type_cursor)++ % 3);
    e.row = row;
    e.decay = 0.7;
    const double sign = rng.uniform() < 0.5 ? -1.0 : 1.0;
    const auto v = effect_values(e, n);
    for (int t = 0; t < n; ++t) data.target[t] += sign * size * v[t];
    out.push_back({e.type, row});
  }
  return out;
}

struct Rates {
  int planted = 0, right_type = 0, other_type = 0, false_alarms = 0, series = 0;
  double mae_with = 0.0, mae_clean = 0.0;  // transfer-function parameters against the truth
};

double tf_error(const FitResult& fit) {
  double e = 0.0;
  for (const auto& est : fit.estimates) {
    if (est.name == "x.omega0") e += std::abs(est.value - 2.0);
    if (est.name == "x.delta1") e += std::abs(est.value - 0.5);
  }
  return e;
}

Rates run_case(int n, double size, int seeds) {
  Rates r;
  int cursor = 0;
  OutlierOptions options;
  options.fit.diagnostics = false;
  for (int s = 1; s <= seeds; ++s) {
    const auto seed = static_cast<std::uint64_t>(1000 * n + s);
    auto data = simulate(true_model(n, seed));
    const auto clean = data;
    const auto planted = plant(data, seed, size, &cursor);
    const auto result = fit_with_outliers(data, fitted_spec(), options);
    ++r.series;
    r.planted += static_cast<int>(planted.size());
    std::vector<bool> matched(result.effects.size(), false);
    for (const auto& p : planted) {
      int hit = -1;
      for (size_t i = 0; i < result.effects.size(); ++i)
        if (!matched[i] && std::abs(result.effects[i].row - p.row) <= 1 &&
            (hit < 0 || result.effects[i].type == p.type))
          hit = static_cast<int>(i);
      if (hit < 0) continue;
      matched[hit] = true;
      if (result.effects[hit].type == p.type)
        ++r.right_type;
      else
        ++r.other_type;
    }
    for (bool m : matched) r.false_alarms += m ? 0 : 1;
    r.mae_with += tf_error(result.fit);
    const auto base = fit_with_effects(clean, fitted_spec(), {}, options.fit);
    r.mae_clean += tf_error(base.fit);
  }
  r.mae_with /= seeds;
  r.mae_clean /= seeds;
  return r;
}

void report(const char* name, const Rates& r) {
  std::printf(
      "%s: %d series, %d planted: right type %.3f, other type %.3f, missed %.3f, "
      "false alarms per series %.3f; TF mean abs error %.4f (clean %.4f)\n",
      name, r.series, r.planted, double(r.right_type) / r.planted, double(r.other_type) / r.planted,
      1.0 - double(r.right_type + r.other_type) / r.planted, double(r.false_alarms) / r.series,
      r.mae_with, r.mae_clean);
}

Rates run_clean(int n, int seeds) {
  Rates r;
  OutlierOptions options;
  options.fit.diagnostics = false;
  for (int s = 1; s <= seeds; ++s) {
    const auto data = simulate(true_model(n, static_cast<std::uint64_t>(500000 + 1000 * n + s)));
    const auto result = fit_with_outliers(data, fitted_spec(), options);
    ++r.series;
    r.false_alarms += static_cast<int>(result.effects.size());
  }
  return r;
}

TEST(OutlierSimulation, FiveSigmaN200) {
  const auto r = run_case(200, 5.0, 30);
  report("n=200 5 sigma", r);
  EXPECT_GE(double(r.right_type) / r.planted, 0.9);
  EXPECT_LE(r.mae_with, 1.10 * r.mae_clean);
}

TEST(OutlierSimulation, FiveSigmaN500) {
  const auto r = run_case(500, 5.0, 30);
  report("n=500 5 sigma", r);
  EXPECT_GE(double(r.right_type) / r.planted, 0.9);
  EXPECT_LE(r.mae_with, 1.10 * r.mae_clean);
}

TEST(OutlierSimulation, ThreeAndSixSigma) {
  const auto r3 = run_case(200, 3.0, 30);
  report("n=200 3 sigma", r3);
  const auto r6 = run_case(200, 6.0, 30);
  report("n=200 6 sigma", r6);
  EXPECT_GE(double(r6.right_type) / r6.planted, double(r3.right_type) / r3.planted);
}

TEST(OutlierSimulation, FalseAlarmsOnCleanSeries) {
  const auto r200 = run_clean(200, 40);
  const auto r500 = run_clean(500, 20);
  std::printf("clean: n=200 %.3f false alarms per series (%d series), n=500 %.3f (%d series)\n",
              double(r200.false_alarms) / r200.series, r200.series,
              double(r500.false_alarms) / r500.series, r500.series);
  EXPECT_LE(double(r200.false_alarms) / r200.series, 0.1);
}

TEST(OutlierSimulation, ShiftAtTheLastObservationIsReportedAmbiguous) {
  auto data = simulate(true_model(200, 77));
  data.target.back() += 8.0;
  OutlierOptions options;
  options.fit.diagnostics = false;
  const auto result = fit_with_outliers(data, fitted_spec(), options);
  ASSERT_FALSE(result.effects.empty());
  const auto& last = result.effects.back();
  EXPECT_EQ(last.row, 199);
  EXPECT_EQ(last.ambiguous_with.size(), 2u);  // every type is one value at the last row
}

}  // namespace
}  // namespace lagsieve
