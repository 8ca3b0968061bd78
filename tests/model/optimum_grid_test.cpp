// The optimum of every candidate of a grid of regression-with-ARMA-errors models on one sample
// reaches the better of R's and statsmodels' optima (fixtures tests/reference/optimum_grid,
// scripts beside them): lag windows of three regressors x (p, q) in 0..2, n = 500.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "fixture.h"
#include "model/fit.h"
#include "model/likelihood.h"

namespace lagsieve {
namespace {

using testing::load_fixture;
using testing::to_vector;

TEST(OptimumGrid, EveryCandidateReachesTheBestReferenceOptimum) {
  const auto r = load_fixture("optimum_grid/optimum_grid_r.json");
  const auto sm = load_fixture("optimum_grid/optimum_grid_statsmodels.json");
  ASSERT_EQ(r["cases"].size(), sm["cases"].size());
  SeriesData data;
  data.target_name = "y";
  data.target = to_vector(r["y"]);
  data.input_names = {"x1", "x2", "x3"};
  for (const auto& name : data.input_names) data.inputs.push_back(to_vector(r[name]));
  int checked = 0, multi = 0, worst_index = -1;
  double worst = 1e300;
  for (size_t c = 0; c < r["cases"].size(); ++c) {
    const auto& k = r["cases"][c];
    const std::string id = k["id"];
    SCOPED_TRACE(id);
    ASSERT_EQ(sm["cases"][c]["id"], id);
    ModelSpec spec;
    spec.inputs = {{"x1", {0, k["s1"].get<int>(), 0}},
                   {"x2", {1, k["s2"].get<int>(), 0}},
                   {"x3", {2, k["s3"].get<int>(), 0}}};
    spec.noise = {k["p"].get<int>(), k["q"].get<int>(), 0, 0, 1};
    // The common sample of the grid: R's rows 4..500.
    const auto problem = make_problem(data, spec, 3);
    ASSERT_EQ(problem.n_obs(), 497);
    FitOptions options;
    options.diagnostics = false;
    const auto fit = fit_model(problem, options);
    ASSERT_TRUE(fit.usable()) << fit.message;
    double best = -1e300;
    if (k["ok"].get<bool>()) best = k["loglik"].get<double>();
    if (sm["cases"][c]["ok"].get<bool>())
      best = std::max(best, sm["cases"][c]["loglik"].get<double>());
    EXPECT_GE(fit.loglik, best - 1e-4) << fit.message;
    if (fit.loglik - best < worst) {
      worst = fit.loglik - best;
      worst_index = static_cast<int>(c);
    }
    if (fit.starts > 1) ++multi;
    ++checked;
  }
  EXPECT_EQ(checked, 108);
  std::printf("worst loglik - best reference: %.3g (%s); %d fits used more than one start\n", worst,
              r["cases"][worst_index]["id"].get<std::string>().c_str(), multi);
}

}  // namespace
}  // namespace lagsieve
