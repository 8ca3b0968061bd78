// Standard errors of regression with ARMA errors where the regressors are strongly collinear or
// trending: against R's arima (fixture tests/reference/standard_errors, script beside it), and
// invariant under rescaling the target and each input (a correct s.e. scales with its estimate).
#include <gtest/gtest.h>

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
using testing::relative_difference;
using testing::to_vector;

struct Case {
  std::string id;
  std::vector<double> y;
  std::vector<std::vector<double>> x;
  NoiseOrder noise;
};

Case read_case(const nlohmann::json& k) {
  Case c;
  c.id = k["id"];
  c.y = to_vector(k["y"]);
  for (const auto& col : k["xreg"]) c.x.push_back(to_vector(col));
  c.noise = NoiseOrder{k["p"], k["q"], 0, 0, 1};
  return c;
}

// Regressors enter at lag 0 (b = s = r = 0), as R's xreg does.
LikelihoodProblem problem_of(const Case& c, double y_scale = 1.0,
                             const std::vector<double>& x_scale = {}) {
  LikelihoodProblem problem;
  problem.w = c.y;
  for (auto& v : problem.w) v *= y_scale;
  problem.u = c.x;
  for (size_t i = 0; i < x_scale.size(); ++i)
    for (auto& v : problem.u[i]) v *= x_scale[i];
  problem.spec.noise = c.noise;
  problem.spec.constant = true;
  for (size_t i = 0; i < c.x.size(); ++i)
    problem.spec.inputs.push_back({"x" + std::to_string(i + 1), {}});
  return problem;
}

// Our estimate names for R's coefficient names (ar, ma, intercept, then the xreg columns).
std::vector<std::string> our_names(const nlohmann::json& k) {
  std::vector<std::string> names;
  int x = 0;
  for (const auto& r : k["coef_names"]) {
    const std::string name = r;
    const bool arma = name.size() == 3 && (name.rfind("ar", 0) == 0 || name.rfind("ma", 0) == 0);
    if (arma)  // R's ar1, ma1 are our phi1, theta1
      names.push_back(current_parameter_name(name));
    else if (name == "intercept")
      names.push_back("constant");
    else
      names.push_back("x" + std::to_string(++x) + ".omega0");
  }
  return names;
}

const ParamEstimate& estimate(const FitResult& fit, const std::string& name) {
  for (const auto& e : fit.estimates)
    if (e.name == name) return e;
  throw std::runtime_error("no estimate " + name);
}

TEST(StandardErrors, CollinearAndTrendingRegressorsMatchR) {
  const auto fx = load_fixture("standard_errors/standard_errors_r.json");
  int checked = 0;
  for (const auto& k : fx["cases"]) {
    const Case c = read_case(k);
    SCOPED_TRACE(c.id);
    const auto fit = fit_model(problem_of(c));
    ASSERT_EQ(fit.status, FitStatus::ok) << fit.message;
    EXPECT_GE(fit.loglik, k["loglik"].get<double>() - 1e-6);
    const auto names = our_names(k);
    const auto coef = to_vector(k["coef"]);
    const auto se = to_vector(k["se"]);
    const auto se_hessian = to_vector(k["se_own_hessian"]);
    // R's var.coef comes from optim's Hessian at fixed steps; where it and the script's own
    // curvature-scaled Hessian of R's likelihood disagree by more than 0.5 % (longley: 1.2 %),
    // var.coef is held to 2 % and the independent Hessian to 1 %.
    const double tol_var_coef =
        k["max_rel_diff_se_vs_own_hessian"].get<double>() < 5e-3 ? 1e-2 : 2e-2;
    for (size_t i = 0; i < names.size(); ++i) {
      const auto& e = estimate(fit, names[i]);
      EXPECT_LT(std::abs(e.value - coef[i]), 1e-3 * std::max(1.0, se[i])) << names[i];
      EXPECT_LT(relative_difference(e.std_error, se[i]), tol_var_coef)
          << names[i] << ": " << e.std_error << " vs R " << se[i];
      EXPECT_LT(relative_difference(e.std_error, se_hessian[i]), 1e-2)
          << names[i] << ": " << e.std_error << " vs R's likelihood Hessian " << se_hessian[i];
      if (c.id == "freeny_ar1")
        std::printf("freeny %s: %.6g (R %.6g)\n", names[i].c_str(), e.std_error, se[i]);
      ++checked;
    }
  }
  EXPECT_GE(checked, 20);
}

TEST(StandardErrors, InvariantUnderRescalingTargetAndEachInput) {
  const auto fx = load_fixture("standard_errors/standard_errors_r.json");
  for (const auto& k : fx["cases"]) {
    const Case c = read_case(k);
    SCOPED_TRACE(c.id);
    const auto base = fit_model(problem_of(c));
    ASSERT_EQ(base.status, FitStatus::ok) << base.message;
    // The target times 100, then each input in turn times 1000 and times 1/1000.
    std::vector<std::pair<double, std::vector<double>>> scalings{{100.0, {}}, {0.01, {}}};
    for (size_t i = 0; i < c.x.size(); ++i)
      for (double s : {1e3, 1e-3}) {
        std::vector<double> xs(c.x.size(), 1.0);
        xs[i] = s;
        scalings.emplace_back(1.0, xs);
      }
    for (const auto& [ys, xs] : scalings) {
      const auto fit = fit_model(problem_of(c, ys, xs));
      ASSERT_EQ(fit.status, FitStatus::ok) << fit.message;
      ASSERT_EQ(fit.estimates.size(), base.estimates.size());
      for (size_t j = 0; j < fit.estimates.size(); ++j) {
        const auto& name = base.estimates[j].name;
        // ARMA s.e. do not move; the constant's scales with y, an omega's with y / its input.
        double factor = 1.0;
        if (name == "constant") factor = ys;
        if (name.find(".omega0") != std::string::npos) {
          const int input = std::stoi(name.substr(1, name.find('.') - 1)) - 1;
          factor = ys / (xs.empty() ? 1.0 : xs[input]);
        }
        EXPECT_LT(
            relative_difference(fit.estimates[j].std_error / factor, base.estimates[j].std_error),
            1e-4)
            << name << " y x" << ys << (xs.empty() ? "" : " one input rescaled");
      }
    }
  }
}

}  // namespace
}  // namespace lagsieve
