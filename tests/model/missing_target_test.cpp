// Missing target values inside the sample: the exact likelihood of the observed values against
// R's arima with NA in the response and statsmodels SARIMAX with NaN.
// Fixture: tests/reference/missing_target (scripts beside it).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <limits>
#include <map>

#include "fixture.h"
#include "model/fit.h"
#include "model/likelihood.h"

namespace lagsieve {
namespace {

using testing::load_fixture;

std::vector<double> with_nan(const nlohmann::json& j) {
  std::vector<double> v;
  for (const auto& x : j)
    v.push_back(x.is_null() ? std::numeric_limits<double>::quiet_NaN() : x.get<double>());
  return v;
}

struct Case {
  SeriesData data;
  ModelSpec spec;
  std::map<std::string, std::string> names;  // our parameter name -> R's coefficient name
};

Case make_case(const nlohmann::json& k) {
  Case c;
  c.data.target_name = k["id"];
  c.data.target = with_nan(k["y"]);
  c.data.time.assign(c.data.target.size(), "");
  const auto& order = k["order"];
  c.spec.noise.p = order[0];
  c.spec.noise.q = order[2];
  c.names = {{"phi1", "ar1"}, {"theta1", "ma1"}, {"Theta1", "sma1"}, {"constant", "intercept"}};
  bool has_intercept = false;
  for (const auto& n : k["coef_names"]) has_intercept = has_intercept || n == "intercept";
  c.spec.constant = has_intercept;
  for (const auto& n : k["coef_names"])
    if (n == "sma1") {
      c.spec.noise.seasonal_q = 1;
      c.spec.noise.period = 12;
    }
  const std::string x = k["xreg_name"];
  if (!x.empty()) {
    c.data.input_names.push_back(x);
    c.data.inputs.push_back(k["xreg"].get<std::vector<double>>());
    c.spec.inputs.push_back({x, {}});
    c.names[x + ".omega0"] = x;
  }
  return c;
}

TEST(MissingTarget, ExactLikelihoodMatchesRAndStatsmodels) {
  const auto r = load_fixture("missing_target/missing_target_r.json");
  const auto sm = load_fixture("missing_target/missing_target_statsmodels.json");
  ASSERT_EQ(r["cases"].size(), 3u);
  for (size_t i = 0; i < r["cases"].size(); ++i) {
    const auto& k = r["cases"][i];
    SCOPED_TRACE(k["id"].get<std::string>());
    const Case c = make_case(k);
    const auto problem = make_problem(c.data, c.spec);
    EXPECT_EQ(problem.n_obs(), k["nobs"].get<int>());  // observed values only
    const FitResult fit = fit_model(problem);
    ASSERT_TRUE(fit.usable()) << fit.message;
    const double r_loglik = k["loglik"];
    EXPECT_LT(std::abs(fit.loglik - r_loglik) / std::abs(r_loglik), 1e-6)
        << fit.loglik << " vs " << r_loglik;
    std::printf("%s: loglik %.10f (R %.10f, rel %.1e)\n", k["id"].get<std::string>().c_str(),
                fit.loglik, r_loglik, std::abs(fit.loglik - r_loglik) / std::abs(r_loglik));
    EXPECT_EQ(fit.n_obs, k["nobs"].get<int>());
    EXPECT_EQ(fit.residuals.size(), static_cast<size_t>(fit.n_obs));
    std::map<std::string, double> r_coef;
    for (size_t j = 0; j < k["coef"].size(); ++j) r_coef[k["coef_names"][j]] = k["coef"][j];
    ModelParams at_r = fit.params;
    for (const auto& e : fit.estimates) {
      const auto it = c.names.find(e.name);
      ASSERT_NE(it, c.names.end()) << e.name;
      const double want = r_coef.at(it->second);
      EXPECT_NEAR(e.value, want, 1e-4 * std::max(1.0, std::abs(want))) << e.name;
      std::printf("  %-14s %.8f (R %.8f)\n", e.name.c_str(), e.value, want);
    }
    // The likelihood at R's own estimates equals R's and statsmodels' (tight: no optimiser).
    if (!at_r.phi.empty()) at_r.phi[0] = r_coef.at("ar1");
    if (!at_r.theta.empty()) at_r.theta[0] = r_coef.at("ma1");
    if (!at_r.seasonal_theta.empty()) at_r.seasonal_theta[0] = r_coef.at("sma1");
    if (c.spec.constant) at_r.constant = r_coef.at("intercept");
    if (!at_r.inputs.empty()) at_r.inputs[0].omega = {r_coef.at(k["xreg_name"].get<std::string>())};
    LikelihoodWorkspace ws;
    const double ll = loglik_at(problem, at_r, ws);
    EXPECT_NEAR(ll, r_loglik, 1e-9 * std::abs(r_loglik));
    const double sm_ll = sm["cases"][i]["loglik_at_r_params"];
    EXPECT_NEAR(ll, sm_ll, 1e-9 * std::abs(sm_ll));
  }
}

// A missing value changes the likelihood exactly as leaving the row out of a model without
// dynamics does: with white noise, the observed rows are independent.
TEST(MissingTarget, WhiteNoiseDropsTheRow) {
  SeriesData full, gap;
  for (int t = 0; t < 40; ++t) full.target.push_back(std::sin(0.7 * t) + 0.01 * t * t);
  gap = full;
  gap.target[17] = std::numeric_limits<double>::quiet_NaN();
  SeriesData dropped = full;
  dropped.target.erase(dropped.target.begin() + 17);
  for (auto* s : {&full, &gap, &dropped}) s->time.assign(s->target.size(), "");
  ModelSpec spec;
  const auto a = fit_model(make_problem(gap, spec));
  const auto b = fit_model(make_problem(dropped, spec));
  EXPECT_EQ(a.n_obs, 39);
  EXPECT_NEAR(a.loglik, b.loglik, 1e-10 * std::abs(b.loglik));
  EXPECT_NEAR(a.params.constant, b.params.constant, 1e-12);
}

}  // namespace
}  // namespace lagsieve
