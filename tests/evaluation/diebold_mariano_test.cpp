// Diebold-Mariano with the Harvey-Leybourne-Newbold correction against an independent base-R
// computation (tests/reference/dm_test/make_dm_test.R, cross-checked there with numpy/scipy),
// plus small cases worked by hand.
#include "evaluation/diebold_mariano.h"

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "core/error.h"

namespace lagsieve {
namespace {

nlohmann::json load(const std::string& name) {
  const std::string path = std::string(LAGSIEVE_TEST_DATA_DIR) + "/reference/dm_test/" + name;
  std::ifstream in(path);
  EXPECT_TRUE(in.good()) << "cannot open " << path;
  return nlohmann::json::parse(in);
}

void expect_rel(double got, double want, double rel, const std::string& what) {
  EXPECT_NEAR(got, want, rel * std::fabs(want)) << what;
}

TEST(DieboldMariano, MatchesIndependentRReference) {
  const nlohmann::json fx = load("dm_test_r.json");
  const auto e1 = fx["e1"].get<std::vector<double>>();
  const auto e2 = fx["e2"].get<std::vector<double>>();
  ASSERT_EQ(e1.size(), 60u);
  int checked_h1 = 0;
  int checked_long = 0;
  for (const auto& c : fx["cases"]) {
    const std::string loss = c["loss"].get<std::string>();
    const int h = c["h"].get<int>();
    std::vector<double> la(e1.size());
    std::vector<double> lb(e2.size());
    for (size_t t = 0; t < e1.size(); ++t) {
      la[t] = loss == "squared" ? e1[t] * e1[t] : std::fabs(e1[t]);
      lb[t] = loss == "squared" ? e2[t] * e2[t] : std::fabs(e2[t]);
    }
    const std::string what = loss + " h=" + std::to_string(h);
    DieboldMarianoOptions opt;
    opt.horizon = h;
    const DieboldMarianoResult r = diebold_mariano(la, lb, opt);
    EXPECT_EQ(r.status, DieboldMarianoStatus::ok) << what;
    EXPECT_EQ(r.n, c["n"].get<int>());
    EXPECT_DOUBLE_EQ(r.degrees_of_freedom, 59.0);
    expect_rel(r.mean_difference, c["dbar"].get<double>(), 1e-10, what + " dbar");
    // The fixture's V is the long-run variance of d; ours is that over n (variance of dbar).
    expect_rel(r.variance * r.n, c["V"].get<double>(), 1e-10, what + " V");
    expect_rel(r.dm_statistic, c["dm"].get<double>(), 1e-10, what + " DM");
    expect_rel(r.statistic, c["dm_hln"].get<double>(), 1e-10, what + " HLN");
    expect_rel(r.p_value, c["p_value_hln_t"].get<double>(), 1e-10, what + " p");

    opt.small_sample_correction = false;
    const DieboldMarianoResult plain = diebold_mariano(la, lb, opt);
    expect_rel(plain.statistic, c["dm"].get<double>(), 1e-10, what + " plain DM");
    expect_rel(plain.p_value, c["p_value_normal"].get<double>(), 1e-10, what + " normal p");
    (h == 1 ? checked_h1 : checked_long)++;
  }
  EXPECT_EQ(checked_h1, 2);
  EXPECT_EQ(checked_long, 4);
}

TEST(DieboldMariano, AgreesWithNumpyRecomputation) {
  const nlohmann::json r = load("dm_test_r.json");
  const nlohmann::json py = load("dm_test_python.json");
  const auto e1 = r["e1"].get<std::vector<double>>();
  const auto e2 = r["e2"].get<std::vector<double>>();
  std::vector<double> la;
  std::vector<double> lb;
  for (size_t t = 0; t < e1.size(); ++t) {
    la.push_back(std::fabs(e1[t]));
    lb.push_back(std::fabs(e2[t]));
  }
  for (const auto& c : py["cases"]) {
    if (c["loss"] != "absolute") continue;
    DieboldMarianoOptions opt;
    opt.horizon = c["h"].get<int>();
    const DieboldMarianoResult res = diebold_mariano(la, lb, opt);
    expect_rel(res.statistic, c["dm_hln"].get<double>(), 1e-10, "numpy HLN");
    expect_rel(res.p_value, c["p_value_hln_t"].get<double>(), 1e-10, "numpy p");
  }
}

TEST(DieboldMariano, HandWorkedCaseWithClosedFormT3) {
  // d = 1, -1, 2, 0: dbar = 0.5; deviations 0.5 -1.5 1.5 -0.5; gamma_0 = 5/4;
  // V = gamma_0 / n = 0.3125; DM = 0.5 / sqrt(0.3125) = 0.894427191;
  // HLN factor sqrt((4 + 1 - 2 + 0)/4) = sqrt(0.75): HLN = sqrt(0.6) = 0.7745966692.
  // Student t with 3 df: F(t) = 1/2 + (1/pi)(t/(sqrt3 (1 + t^2/3)) + atan(t/sqrt3)).
  const std::vector<double> a{3, 1, 4, 2};
  const std::vector<double> b{2, 2, 2, 2};
  const DieboldMarianoResult r = diebold_mariano(a, b);
  EXPECT_NEAR(r.mean_difference, 0.5, 1e-15);
  EXPECT_NEAR(r.variance, 0.3125, 1e-15);
  EXPECT_NEAR(r.dm_statistic, 0.5 / std::sqrt(0.3125), 1e-14);
  EXPECT_NEAR(r.statistic, std::sqrt(0.6), 1e-14);
  const double t = std::sqrt(0.6);
  const double s3 = std::sqrt(3.0);
  const double upper = 0.5 - (t / (s3 * (1.0 + t * t / 3.0)) + std::atan(t / s3)) / std::numbers::pi;
  EXPECT_NEAR(r.p_value, 2.0 * upper, 1e-14);
  // Swapping the series flips the sign, not the p-value.
  const DieboldMarianoResult s = diebold_mariano(b, a);
  EXPECT_NEAR(s.statistic, -r.statistic, 1e-15);
  EXPECT_NEAR(s.p_value, r.p_value, 1e-15);
}

TEST(DieboldMariano, FallsBackToLagZeroWhenVarianceIsNotPositive) {
  // d alternates 1, -1 (n = 6): dbar = 0, gamma_0 = 1, gamma_1 = -5/6;
  // gamma_0 + 2 gamma_1 = -2/3 <= 0 at h = 2, so lag 0 alone is used: V = 1/6.
  const std::vector<double> a{1, 0, 1, 0, 1, 0};
  const std::vector<double> b{0, 1, 0, 1, 0, 1};
  DieboldMarianoOptions opt;
  opt.horizon = 2;
  const DieboldMarianoResult r = diebold_mariano(a, b, opt);
  EXPECT_EQ(r.status, DieboldMarianoStatus::variance_fallback);
  EXPECT_FALSE(r.note.empty());
  EXPECT_NEAR(r.variance, 1.0 / 6.0, 1e-15);
  EXPECT_NEAR(r.statistic, 0.0, 1e-15);
  EXPECT_NEAR(r.p_value, 1.0, 1e-15);
}

TEST(DieboldMariano, DegenerateAndInvalidInput) {
  const std::vector<double> a{1, 2, 3, 4};
  const std::vector<double> b{0, 1, 2, 3};  // constant differential
  const DieboldMarianoResult r = diebold_mariano(a, b);
  EXPECT_EQ(r.status, DieboldMarianoStatus::degenerate);
  EXPECT_TRUE(std::isnan(r.statistic));
  EXPECT_TRUE(std::isnan(r.p_value));
  EXPECT_THROW(diebold_mariano(a, std::vector<double>{1, 2}), InputError);
  DieboldMarianoOptions opt;
  opt.horizon = 4;
  EXPECT_THROW(diebold_mariano(a, a, opt), InputError);
  opt.horizon = 0;
  EXPECT_THROW(diebold_mariano(a, a, opt), InputError);
}

}  // namespace
}  // namespace lagsieve
