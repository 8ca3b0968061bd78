// A fit at its edges: a small evaluation budget caps every start (the extra starts of the
// multi-start included), and a regressor of zeros ends a fit with a status that names it.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

// ARMA(1,1) noise, phi = 0.7, theta = -0.4: the fit has two ARMA coefficients, so it starts
// three times (regression start, neutral point, MA root mirrored).
LikelihoodProblem arma11_problem() {
  SimulationSpec sim;
  sim.n = 200;
  sim.seed = 11;
  sim.sigma = 1.0;
  sim.noise = {1, 1, 0, 0, 1};
  sim.phi = {0.7};
  sim.theta = {-0.4};
  ModelSpec spec;
  spec.noise = {1, 1, 0, 0, 1};
  return make_problem(simulate(sim), spec);
}

TEST(FitLimits, ASmallBudgetCapsTheExtraStartsToo) {
  const auto problem = arma11_problem();
  FitOptions options;
  options.max_evaluations = 15;
  options.standard_errors = false;
  const auto fit = fit_model(problem, options);
  EXPECT_EQ(fit.starts, 3);
  // The first start spends at most 15; each extra start at most a third of it (5), plus at most
  // 15 more where it is polished. Left at their own default (100 + 50 per parameter) the two
  // coarse runs alone would take tens of evaluations each.
  EXPECT_LE(fit.evaluations, 15 + 2 * (5 + 15)) << fit.message;
}

TEST(FitLimits, ADefaultBudgetLetsTheFitConverge) {
  // The same problem with the default budget converges, all three starts agreeing.
  const auto fit = fit_model(arma11_problem(), FitOptions{});
  EXPECT_EQ(fit.status, FitStatus::ok) << fit.message;
  EXPECT_EQ(fit.starts, 3);
  EXPECT_EQ(fit.lower_optima, 0);
}

TEST(FitLimits, AZeroInputEndsTheFitWithAStatusNamingIt) {
  // A fit handed a problem whose input is zero at every row (as the fuzz target does; make_problem
  // would refuse it first) cannot estimate its effect: the status says so and names the input,
  // where the check that names it once crashed on a column with nothing before it.
  LikelihoodProblem problem;
  problem.spec.noise.p = 1;
  problem.spec.inputs = {{"x", {0, 0, 0}}};
  for (int t = 0; t < 24; ++t) problem.w.push_back(0.1 * ((t * 7) % 11) - 0.5);
  problem.u = {std::vector<double>(24, 0.0)};
  problem.start = minimum_start(problem.spec);
  const auto fit = fit_model(problem, FitOptions{});
  EXPECT_EQ(fit.status, FitStatus::numerical_failure);
  EXPECT_NE(fit.message.find("input 'x' is zero at every row of the estimation sample"),
            std::string::npos)
      << fit.message;
}

}  // namespace
}  // namespace lagsieve
