// Sample correlations against R's stats::acf, pacf, ccf on the differenced Series M pair, and the
// prewhitening least-squares AR against R's lm; fixture: tests/reference/screen/
// correlation_bjsales.json, written by make_correlation.R beside it.
#include <gtest/gtest.h>

#include <vector>

#include "core/error.h"
#include "data/transform.h"
#include "screen/correlation.h"
#include "series_m.h"

namespace lagsieve {
namespace {

constexpr double kTol = 1e-10;

struct Pair {
  std::vector<double> dsales, dlead;
};

Pair differenced_series_m() {
  const auto d = testing::read_series_m();
  const Differencing diff{1, 0, 1};
  return {difference(d.target, diff), difference(d.inputs[0], diff)};
}

void expect_near_all(const std::vector<double>& got, const nlohmann::json& want, const char* what) {
  ASSERT_EQ(got.size(), want.size()) << what;
  for (size_t i = 0; i < got.size(); ++i)
    EXPECT_NEAR(got[i], want[i].get<double>(), kTol) << what << " index " << i;
}

TEST(Correlation, AcfMatchesR) {
  const auto fx = testing::load_fixture("screen/correlation_bjsales.json");
  const auto p = differenced_series_m();
  ASSERT_EQ(static_cast<int>(p.dsales.size()), fx["n"].get<int>());
  const int L = fx["max_lag"];
  expect_near_all(acf(p.dsales, L), fx["acf_sales"], "acf sales");
  expect_near_all(acf(p.dlead, L), fx["acf_lead"], "acf lead");
}

TEST(Correlation, PacfMatchesR) {
  const auto fx = testing::load_fixture("screen/correlation_bjsales.json");
  const auto p = differenced_series_m();
  const int L = fx["max_lag"];
  expect_near_all(pacf(p.dsales, L), fx["pacf_sales"], "pacf sales");
  expect_near_all(pacf(p.dlead, L), fx["pacf_lead"], "pacf lead");
}

TEST(Correlation, CcfMatchesRWithInputFirst) {
  // Our ccf(x = lead, y = sales)[k + L] = R's ccf(sales, lead) at lag k: positive k, lead first.
  const auto fx = testing::load_fixture("screen/correlation_bjsales.json");
  const auto p = differenced_series_m();
  const int L = fx["max_lag"];
  expect_near_all(ccf(p.dlead, p.dsales, L), fx["ccf_lead_sales"], "ccf lead->sales");
}

TEST(Correlation, LeastSquaresArMatchesR) {
  const auto fx = testing::load_fixture("screen/correlation_bjsales.json");
  const auto p = differenced_series_m();
  const auto fit = fit_ar(p.dlead, 3);
  expect_near_all(fit.phi, fx["ar3_lead"], "AR(3) coefficients");
  EXPECT_NEAR(fit.sigma2, fx["ar3_lead_sigma2"].get<double>(), kTol);
}

TEST(Correlation, AicOrderChoiceMatchesR) {
  const auto fx = testing::load_fixture("screen/correlation_bjsales.json");
  const auto p = differenced_series_m();
  const auto fit = fit_ar_by_aic(p.dlead, 10);
  expect_near_all(fit.aic, fx["aic_lead"], "AIC by order");
  EXPECT_EQ(fit.order, fx["aic_order_lead"].get<int>());
}

TEST(Correlation, ConstantSeriesIsRejected) {
  const std::vector<double> c(10, 2.0);
  EXPECT_THROW(acf(c, 3), NumericalError);
  EXPECT_THROW(ccf(c, c, 3), NumericalError);
}

TEST(Correlation, LagsAreCappedAtNMinusOne) {
  const std::vector<double> x{1.0, 3.0, 2.0, 5.0};
  EXPECT_EQ(acf(x, 10).size(), 4u);
  EXPECT_EQ(ccf(x, x, 10).size(), 7u);
}

}  // namespace
}  // namespace lagsieve

namespace lagsieve {
namespace {

// The AR-by-AIC choice on three more series (the differenced Series M lead over the residual
// samples of tests/reference/residual_ccf, computed there with base R `lm` per order on common
// rows): every order's AIC, the chosen order and its coefficients.
TEST(Correlation, AicOrderChoiceMatchesROnMoreSeries) {
  const auto fx = testing::load_fixture("residual_ccf/residual_ccf_r.json");
  ASSERT_EQ(fx["cases"].size(), 3u);
  for (const auto& c : fx["cases"]) {
    SCOPED_TRACE(c["id"].get<std::string>());
    const auto x = testing::to_vector(c["x"]);
    const auto& want = c["expected"];
    const int n = static_cast<int>(x.size());
    const auto fit = fit_ar_by_aic(x, std::min(10, n / 5));
    EXPECT_EQ(fit.order, want["ar_order"].get<int>());
    EXPECT_NEAR(fit.mean, want["ar_mean"].get<double>(), 1e-12);
    const auto aic = testing::to_vector(want["aic"]);
    ASSERT_EQ(fit.aic.size(), aic.size());
    for (size_t p = 0; p < aic.size(); ++p) EXPECT_NEAR(fit.aic[p], aic[p], 1e-9) << "order " << p;
    const auto phi = testing::to_vector(want["ar_phi"]);
    ASSERT_EQ(fit.phi.size(), phi.size());
    for (size_t j = 0; j < phi.size(); ++j) EXPECT_NEAR(fit.phi[j], phi[j], 1e-10) << "phi " << j;
  }
}

}  // namespace
}  // namespace lagsieve
