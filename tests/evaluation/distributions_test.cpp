// Distribution functions against R's base stats (pnorm, qnorm, pt, qt, pchisq, pbeta); the values
// and the script that produced them are in tests/reference/distributions/.
#include "evaluation/distributions.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace lagsieve {
namespace {

nlohmann::json load_fixture() {
  const std::string path =
      std::string(LAGSIEVE_TEST_DATA_DIR) + "/reference/distributions/distributions.json";
  std::ifstream in(path);
  EXPECT_TRUE(in.good()) << "cannot open " << path;
  return nlohmann::json::parse(in);
}

std::vector<double> vec(const nlohmann::json& j) { return j.get<std::vector<double>>(); }

// |got - want| <= rel * |want|, with an absolute floor far below the smallest value checked.
void expect_close(double got, double want, double rel, const std::string& what) {
  const double tol = rel * std::fabs(want) + 1e-300;
  EXPECT_NEAR(got, want, tol) << what << " relative error " << std::fabs(got - want) / std::fabs(want);
}

TEST(Distributions, NormalQuantileMatchesR) {
  const auto fx = load_fixture()["normal_quantile"];
  const auto p = vec(fx["p"]);
  const auto want = vec(fx["value"]);
  ASSERT_EQ(p.size(), want.size());
  for (size_t i = 0; i < p.size(); ++i)
    expect_close(normal_quantile(p[i]), want[i], 1e-14, "qnorm(" + std::to_string(p[i]) + ")");
}

TEST(Distributions, NormalCdfMatchesR) {
  const auto fx = load_fixture()["normal_cdf"];
  const auto x = vec(fx["x"]);
  const auto want = vec(fx["value"]);
  for (size_t i = 0; i < x.size(); ++i)
    // Rounding x/sqrt(2) to a double perturbs erfc's argument by half an ulp, which the tail
    // amplifies by about x^2: 1e-16 * 37^2 ~ 1.4e-13 at x = -37.
    expect_close(normal_cdf(x[i]), want[i], std::max(1e-15, 2e-16 * x[i] * x[i]),
                 "pnorm(" + std::to_string(x[i]) + ")");
}

TEST(Distributions, StudentTMatchesR) {
  const auto fx = load_fixture()["student_t"];
  const auto x = vec(fx["x"]);
  const auto df = vec(fx["df"]);
  const auto cdf = vec(fx["cdf"]);
  const auto two = vec(fx["two_sided"]);
  ASSERT_GT(x.size(), 100u);
  for (size_t i = 0; i < x.size(); ++i) {
    const std::string what = "pt(" + std::to_string(x[i]) + ", " + std::to_string(df[i]) + ")";
    // Worst case on this grid is about 1.5e-13 at df = 2000, where x^(df/2) amplifies rounding.
    expect_close(student_t_cdf(x[i], df[i]), cdf[i], 5e-13, what);
    expect_close(student_t_two_sided_p(x[i], df[i]), two[i], 5e-13, "two-sided " + what);
  }
}

TEST(Distributions, StudentTQuantileMatchesR) {
  const auto fx = load_fixture()["student_t_quantile"];
  const auto p = vec(fx["p"]);
  const auto df = vec(fx["df"]);
  const auto want = vec(fx["value"]);
  ASSERT_GT(p.size(), 100u);
  for (size_t i = 0; i < p.size(); ++i) {
    const std::string what = "qt(" + std::to_string(p[i]) + ", " + std::to_string(df[i]) + ")";
    if (std::fabs(want[i]) < 1e-12) {  // the median (R prints rounding noise there for some df)
      EXPECT_LT(std::fabs(student_t_quantile(p[i], df[i])), 1e-12) << what;
      continue;
    }
    // The inverse of a cdf accurate to ~1e-13 (relative); 4e-14 is the worst on this grid, and
    // 1e-10 relative still fails on a wrong density or Newton step.
    expect_close(student_t_quantile(p[i], df[i]), want[i], 1e-10, what);
  }
  EXPECT_TRUE(std::isnan(student_t_quantile(0.5, 0.0)));
  EXPECT_TRUE(std::isnan(student_t_quantile(1.5, 3.0)));
  EXPECT_EQ(student_t_quantile(1.0, 3.0), std::numeric_limits<double>::infinity());
}

TEST(Distributions, ChiSquareUpperTailMatchesR) {
  const auto fx = load_fixture()["chi_square_upper"];
  const auto x = vec(fx["x"]);
  const auto df = vec(fx["df"]);
  const auto want = vec(fx["value"]);
  for (size_t i = 0; i < x.size(); ++i)
    expect_close(chi_square_upper_tail(x[i], df[i]), want[i], 1e-13,
                 "pchisq(" + std::to_string(x[i]) + ", " + std::to_string(df[i]) + ", upper)");
}

TEST(Distributions, IncompleteBetaMatchesR) {
  const auto fx = load_fixture()["incomplete_beta"];
  const auto x = vec(fx["x"]);
  const auto a = vec(fx["a"]);
  const auto b = vec(fx["b"]);
  const auto want = vec(fx["value"]);
  for (size_t i = 0; i < x.size(); ++i)
    expect_close(regularized_incomplete_beta(a[i], b[i], x[i]), want[i], 1e-13,
                 "pbeta(" + std::to_string(x[i]) + ", " + std::to_string(a[i]) + ", " +
                     std::to_string(b[i]) + ")");
}

TEST(Distributions, EdgeCases) {
  const double inf = std::numeric_limits<double>::infinity();
  EXPECT_EQ(normal_quantile(0.0), -inf);
  EXPECT_EQ(normal_quantile(1.0), inf);
  EXPECT_TRUE(std::isnan(normal_quantile(1.5)));
  EXPECT_TRUE(std::isnan(student_t_cdf(1.0, 0.0)));
  EXPECT_EQ(student_t_two_sided_p(0.0, 5.0), 1.0);
  EXPECT_EQ(chi_square_upper_tail(0.0, 3.0), 1.0);
  EXPECT_EQ(chi_square_upper_tail(-1.0, 3.0), 1.0);
  // Closed forms: chi-square with 2 df has upper tail exp(-x/2); t with 1 df is Cauchy,
  // cdf 1/2 + atan(x)/pi.
  EXPECT_NEAR(chi_square_upper_tail(7.3, 2.0), std::exp(-3.65), 1e-16);
  EXPECT_NEAR(student_t_cdf(2.5, 1.0), 0.5 + std::atan(2.5) / std::numbers::pi, 1e-15);
}

}  // namespace
}  // namespace lagsieve
