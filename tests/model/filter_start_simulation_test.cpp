// Seeded simulation of a Series-M-like transfer-function model (delay 3, r = 1, MA(1) noise,
// differenced, n = 150): the estimated filter start (fit.filter_start: estimated) against the
// zero start, and exact ML against the restricted objective (fit.estimation). The data are drawn
// after a burn-in, so the filter's state before the sample is not zero and a zero start
// misattributes its decaying effect to the noise.
//
// Yardsticks: the truth the data were drawn from, the spread of the estimates over seeds (for
// the standard errors), and the small-sample behaviour of the MA estimate without any input:
// the same noise fitted as a pure ARIMA(0,1,1) by our code, and, independently, by R's
// stats::arima on its own simulations (tests/reference/filter_start/, make_filter_start.R).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <vector>

#include "fixture.h"
#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

constexpr int kSeeds = 240;
constexpr double kTheta = -0.55;

SimulationSpec series_m_like(std::uint64_t seed, bool with_input) {
  SimulationSpec sim;
  sim.n = 150;
  sim.seed = seed;
  sim.constant = 0.035;
  sim.sigma = 0.22;
  sim.noise = {0, 1, 0, 0, 1};
  sim.theta = {kTheta};
  sim.integrate = {1, 0, 1};
  SimulatedInput lead;
  lead.name = "lead";
  lead.order = {3, 0, 1};
  lead.params.omega = {with_input ? 4.8 : 0.0};
  lead.params.delta = {0.72};
  lead.mean = 0.02;
  lead.ar = 0.3;
  lead.sd = 0.3;
  sim.inputs = {lead};
  return sim;
}

struct Summary {
  double mean = 0.0, spread = 0.0, rms_se = 0.0;
};

Summary summarise(const std::vector<double>& values, const std::vector<double>& se) {
  Summary s;
  const double n = static_cast<double>(values.size());
  for (size_t i = 0; i < values.size(); ++i) {
    s.mean += values[i] / n;
    s.rms_se += se[i] * se[i] / n;
  }
  s.rms_se = std::sqrt(s.rms_se);
  double ss = 0.0;
  for (double v : values) ss += (v - s.mean) * (v - s.mean);
  s.spread = std::sqrt(ss / (n - 1.0));
  return s;
}

// MA estimates (and their s.e.) over the seeds: with the input and a given filter start, or the
// noise alone (omega = 0 in the simulation, which leaves the random draws unchanged) as
// ARIMA(0,1,1).
Summary ma_estimates(bool with_input, FilterStart start, double* first_residual = nullptr,
                     Estimation estimation = Estimation::ml) {
  std::vector<double> theta, se;
  double first = 0.0;
  for (int seed = 1; seed <= kSeeds; ++seed) {
    const auto data = simulate(series_m_like(static_cast<std::uint64_t>(seed), with_input));
    ModelSpec spec;
    if (with_input) spec.inputs = {{"lead", {3, 0, 1}}};
    spec.noise = {0, 1, 0, 0, 1};
    spec.differencing = {1, 0, 1};
    spec.filter_start = start;
    spec.estimation = estimation;
    FitOptions options;
    options.diagnostics = false;
    // The same sample with and without the input (the first 3 differenced rows are lags).
    const auto problem = make_problem(data, spec, 3);
    const auto fit = fit_model(problem, options);
    EXPECT_TRUE(fit.usable()) << seed << ": " << fit.message;
    if (!fit.usable()) continue;
    theta.push_back(fit.params.theta[0]);
    se.push_back(fit.estimates[with_input ? 1 : 0].std_error);
    LikelihoodWorkspace ws;
    first += std::abs(model_residuals(problem, fit.params, ws).front()) / kSeeds;
  }
  if (first_residual) *first_residual = first;
  return summarise(theta, se);
}

TEST(FilterStartSimulation, EstimatedStartRecoversTheMaParameterOfASeriesMLikeModel) {
  double first_estimated = 0.0, first_zero = 0.0;
  const Summary estimated = ma_estimates(true, FilterStart::estimated, &first_estimated);
  const Summary zero = ma_estimates(true, FilterStart::zero, &first_zero);
  const Summary restricted =
      ma_estimates(true, FilterStart::estimated, nullptr, Estimation::restricted);
  const Summary alone = ma_estimates(false, FilterStart::estimated);
  const auto ref = testing::load_fixture("filter_start/filter_start_r.json");
  const double r_mean = ref["ma_mean"].get<double>();
  const double r_spread = ref["ma_sd"].get<double>();
  const int r_reps = ref["replications"].get<int>();
  std::printf(
      "MA(1) estimate over %d seeds, truth %.2f (mean, sd over seeds, rms s.e.; mean |first "
      "residual|)\n",
      kSeeds, kTheta);
  std::printf("  estimated start, ml  %.4f  %.4f  %.4f   %.3f\n", estimated.mean, estimated.spread,
              estimated.rms_se, first_estimated);
  std::printf("  estimated, restricted %.4f  %.4f  %.4f\n", restricted.mean, restricted.spread,
              restricted.rms_se);
  std::printf("  zero start, ml       %.4f  %.4f  %.4f   %.3f\n", zero.mean, zero.spread,
              zero.rms_se, first_zero);
  std::printf("  noise alone (ours)   %.4f  %.4f  %.4f\n", alone.mean, alone.spread, alone.rms_se);
  std::printf("  noise alone (R, %d)  %.4f  %.4f\n", r_reps, r_mean, r_spread);

  // Our ML on the noise alone shows the small-sample bias R's arima shows (within the Monte
  // Carlo error of the two means, 4 standard errors of their difference).
  const double mc = std::sqrt(alone.spread * alone.spread / kSeeds + r_spread * r_spread / r_reps);
  EXPECT_NEAR(alone.mean, r_mean, 4.0 * mc);
  // Exact ML with the estimated start: the MA estimate keeps that bias plus -0.030 from
  // estimating the transfer function and the start state at n = 146 (-0.012 at n = 300, -0.005 at
  // n = 600): mean -0.599 = 0.69 s.e. from the truth, against -0.108 (6 s.e.) with a zero start.
  // No seed stops at a local optimum (a 39 x 66 grid over (delta, theta) finds nothing higher).
  EXPECT_LT(std::abs(estimated.mean - alone.mean), 0.045);
  EXPECT_LT(std::abs(estimated.mean - kTheta), 1.0 * estimated.rms_se);
  EXPECT_GT(zero.mean - kTheta, 4.0 * zero.rms_se);
  EXPECT_NEAR(estimated.rms_se / estimated.spread, 1.0, 0.2);
  // The restricted objective (fit.estimation: restricted) integrates the constant, the omega and
  // the start state out, which removes the bias their estimation puts on theta: mean -0.569,
  // 0.26 s.e. from the truth, and the s.e. 0.93 of the spread (the targets: within 0.5 s.e. and
  // 15 %). Integrating out only the start state (a diffuse start) moved the mean to -0.592.
  EXPECT_LT(std::abs(restricted.mean - kTheta), 0.5 * restricted.rms_se);
  EXPECT_NEAR(restricted.rms_se / restricted.spread, 1.0, 0.15);
  // The first residuals are no longer inflated by the missing start.
  EXPECT_LT(first_estimated, 0.2 * first_zero);
}

}  // namespace
}  // namespace lagsieve
