// The fast gain recursion of the ARMA filter (Chandrasekhar-type, O(m) per step) against the
// Riccati recursion on the full state covariance, on R's fixed-parameter fixtures
// (tests/reference/likelihood_fixed: BJsales and the AirPassengers airline model) and on
// seasonal models near the invertibility and stationarity boundaries.
#include <gtest/gtest.h>

#include <random>

#include "fixture.h"
#include "model/arma_filter.h"
#include "model/likelihood.h"
#include "model/polynomial.h"

namespace lagsieve {
namespace {

using testing::load_fixture;
using testing::relative_difference;
using testing::to_vector;

ArmaFilterSummary run(std::span<const double> ar, std::span<const double> ma, const RowMatrix& y,
                      GainRecursion recursion, std::vector<double>* innovations = nullptr,
                      std::vector<double>* f_values = nullptr) {
  ArmaFilterWorkspace ws;
  ws.recursion = recursion;
  return arma_filter(ar, ma, y, ws, innovations, f_values);
}

// Every output of the two recursions agrees to 1e-10 relative (the cross-products entrywise
// against the largest, which is what the GLS step reads).
void expect_same(std::span<const double> ar, std::span<const double> ma, const RowMatrix& y) {
  std::vector<double> v_fast, v_ref, f_fast, f_ref;
  const auto fast = run(ar, ma, y, GainRecursion::fast, &v_fast, &f_fast);
  const auto ref = run(ar, ma, y, GainRecursion::riccati, &v_ref, &f_ref);
  ASSERT_TRUE(fast.ok);
  ASSERT_TRUE(ref.ok);
  EXPECT_LT(relative_difference(fast.sum_log_f, ref.sum_log_f), 1e-10)
      << fast.sum_log_f << " vs " << ref.sum_log_f;
  const double scale = ref.cross.cwiseAbs().maxCoeff();
  EXPECT_LT((fast.cross - ref.cross).cwiseAbs().maxCoeff(), 1e-10 * scale);
  for (size_t t = 0; t < v_ref.size(); ++t) {
    ASSERT_NEAR(v_fast[t], v_ref[t], 1e-10 * (1.0 + std::abs(v_ref[t]))) << "row " << t;
    ASSERT_NEAR(f_fast[t], f_ref[t], 1e-10 * f_ref[t]) << "row " << t;
  }
  // The steady state is declared on the same test; rounding may move it by a step or two.
  EXPECT_EQ(fast.steady_from < 0, ref.steady_from < 0);
  if (ref.steady_from >= 0) {
    EXPECT_NEAR(fast.steady_from, ref.steady_from, 3);
  }
}

TEST(GainRecursion, MatchesRiccatiOnRFixedParameterFixtures) {
  const auto r = load_fixture("likelihood_fixed/likelihood_fixed_r.json");
  int seasonal = 0;
  for (const auto& k : r["cases"]) {
    SCOPED_TRACE(k["id"].get<std::string>());
    const auto ar = to_vector(k["ar_expanded"]);
    const auto ma = to_vector(k["ma_expanded"]);
    const auto y = to_vector(k["y"]);
    // The raw series as the only column (the filter is linear: the regression part changes
    // the columns, not the gains).
    RowMatrix col(static_cast<Eigen::Index>(y.size()), 1);
    for (size_t t = 0; t < y.size(); ++t) col(static_cast<Eigen::Index>(t), 0) = y[t];
    expect_same(ar, ma, col);
    if (k["model"]["period"].get<int>() > 1) ++seasonal;
  }
  EXPECT_GE(seasonal, 1);  // the airline model of AirPassengers is among them
}

TEST(GainRecursion, LikelihoodOfAirlineModelMatchesR) {
  // log AirPassengers, differenced at lags 1 and 12, MA(1) x seasonal MA(1): the fast recursion
  // reproduces R's exact log-likelihood at fixed parameters as the Riccati one does.
  const auto r = load_fixture("likelihood_fixed/likelihood_fixed_r.json");
  int checked = 0;
  for (const auto& k : r["cases"]) {
    if (k["model"]["period"].get<int>() == 1) continue;
    LikelihoodProblem problem;
    problem.w = to_vector(k["y"]);
    problem.spec.noise = {k["model"]["p"], k["model"]["q"], k["model"]["P"], k["model"]["Q"],
                          k["model"]["period"]};
    problem.spec.constant = k["model"]["include_mean"];
    if (problem.spec.constant || k["model"]["n_xreg"].get<int>() > 0) continue;
    ModelParams p = zero_params(problem.spec);
    p.phi = to_vector(k["params"]["ar"]);
    p.theta = to_vector(k["params"]["ma"]);
    p.seasonal_phi = to_vector(k["params"]["sar"]);
    p.seasonal_theta = to_vector(k["params"]["sma"]);
    LikelihoodWorkspace fast, ref;
    ref.filter.recursion = GainRecursion::riccati;
    const double ll_fast = loglik_at(problem, p, fast);
    const double ll_ref = loglik_at(problem, p, ref);
    EXPECT_LT(relative_difference(ll_fast, ll_ref), 1e-12) << ll_fast << " vs " << ll_ref;
    EXPECT_LT(relative_difference(ll_fast, k["r_loglik"]), 1e-9) << ll_fast;
    ++checked;
  }
  EXPECT_GE(checked, 1);
}

TEST(GainRecursion, MatchesRiccatiForSeasonalModelsNearTheBoundary) {
  std::mt19937_64 rng(20261203);
  std::normal_distribution<double> normal;
  RowMatrix y(240, 6);
  for (Eigen::Index t = 0; t < y.rows(); ++t)
    for (Eigen::Index c = 0; c < y.cols(); ++c) y(t, c) = normal(rng) + (c == 1 ? 1.0 : 0.0);
  struct Model {
    std::vector<double> phi, theta, sphi, stheta;
    int period;
  };
  const std::vector<Model> models{
      {{}, {0.4}, {}, {0.6}, 12},          // airline-type noise, steady state never reached
      {{}, {-0.95}, {}, {-0.97}, 12},      // MA roots near the unit circle
      {{0.5}, {}, {0.6}, {}, 12},          // AR(1) x SAR(1): steady after 13 steps
      {{0.9}, {0.3}, {0.95}, {-0.5}, 12},  // near-unit seasonal AR with MA terms
      {{0.2, -0.4}, {0.5}, {}, {0.8}, 7},  // weekly period, ARMA(2,1) x SMA(1)
      {{0.5, -0.3}, {0.4}, {}, {}, 1},     // the non-seasonal reference noise
      {{}, {0.999}, {}, {}, 1},            // MA(1) almost non-invertible
  };
  for (const auto& m : models) {
    const auto ar = expand_ar(m.phi, m.sphi, m.period);
    const auto ma = expand_ma(m.theta, m.stheta, m.period);
    SCOPED_TRACE(::testing::Message() << "ar " << ar.size() << " ma " << ma.size() << " ma1 "
                                      << (ma.empty() ? 0.0 : ma[0]));
    expect_same(ar, ma, y);
  }
}

}  // namespace
}  // namespace lagsieve
