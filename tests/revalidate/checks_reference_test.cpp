// The re-validation checks against R (tests/revalidate/reference/make_checks.R, R 4.2.2 base
// stats): Box.test (Ljung-Box), t.test (and its form with a fitted mean's error), pf, pbinom, and the degradation test computed in R from
// acf(type = "covariance") and pt. Every value is printed with 17 digits by the script, so the
// tolerances follow our distribution functions (checked to ~1e-12 in tests/evaluation).
#include <gtest/gtest.h>

#include <cmath>

#include "fixture.h"
#include "revalidate/checks.h"

namespace lagsieve {
namespace {

using testing::load_fixture;
using testing::to_vector;

const nlohmann::json& fixture() {
  static const nlohmann::json j = load_fixture("../revalidate/reference/checks_r.json");
  return j;
}

TEST(RevalidateChecks, LjungBoxMatchesBoxTest) {
  for (const auto& c : fixture()["ljung_box"]) {
    const auto x = to_vector(c["x"]);
    const auto r = ljung_box_check(x, c["lag"].get<int>(), c["fitdf"].get<int>());
    EXPECT_EQ(r.df, c["df"].get<int>());
    EXPECT_NEAR(r.statistic, c["statistic"].get<double>(), 1e-10 * c["statistic"].get<double>());
    EXPECT_NEAR(r.p_value, c["p_value"].get<double>(), 1e-10);
  }
}

TEST(RevalidateChecks, MeanShiftMatchesOneSampleT) {
  for (const auto& c : fixture()["mean_shift"]) {
    const auto r = mean_shift_check(to_vector(c["x"]), c["fit_count"].get<int>());
    EXPECT_NEAR(r.mean, c["mean"].get<double>(), 1e-13);
    EXPECT_NEAR(r.sd, c["sd"].get<double>(), 1e-13);
    EXPECT_NEAR(r.statistic, c["statistic"].get<double>(), 1e-11);
    EXPECT_NEAR(r.p_value, c["p_value"].get<double>(), 1e-10);
  }
}

TEST(RevalidateChecks, VarianceChangeMatchesFRatio) {
  for (const auto& c : fixture()["variance"]) {
    const auto r = variance_change_check(to_vector(c["x"]), c["sigma2"].get<double>(),
                                         c["df_reference"].get<double>());
    EXPECT_NEAR(r.ratio, c["ratio"].get<double>(), 1e-13);
    EXPECT_NEAR(r.p_value, c["p_value"].get<double>(), 1e-10);
  }
  for (const auto& c : fixture()["f_cdf"])
    EXPECT_NEAR(f_cdf(c["x"].get<double>(), c["d1"].get<double>(), c["d2"].get<double>()),
                c["p"].get<double>(), 1e-11);
}

TEST(RevalidateChecks, CoverageMatchesBinomial) {
  for (const auto& c : fixture()["binomial"])
    EXPECT_NEAR(binomial_cdf(c["k"].get<int>(), c["n"].get<int>(), c["p"].get<double>()),
                c["cdf"].get<double>(), 1e-12);
  for (const auto& c : fixture()["coverage"]) {
    const auto r = coverage_check(c["inside"].get<int>(), c["count"].get<int>(), c["level"].get<double>());
    EXPECT_NEAR(r.p_value, c["p_value"].get<double>(), 1e-11);
  }
}

TEST(RevalidateChecks, DegradationTestMatchesRComputation) {
  for (const auto& c : fixture()["degradation"]) {
    const auto r = degradation_test(to_vector(c["e"]), c["horizon"].get<int>(), c["baseline"].get<double>(),
                                    c["baseline_count"].get<int>());
    EXPECT_NEAR(r.mean, c["mean"].get<double>(), 1e-13);
    EXPECT_NEAR(r.long_run_variance, c["long_run_variance"].get<double>(), 1e-12);
    EXPECT_NEAR(r.statistic, c["statistic"].get<double>(), 1e-10);
    EXPECT_NEAR(r.p_value, c["p_value"].get<double>(), 1e-10);
    EXPECT_TRUE(r.note.empty()) << r.note;
  }
}

TEST(RevalidateChecks, DegradationTestRefusesTooFewErrorsOrNoBaseline) {
  const std::vector<double> e{0.5, 0.7, 0.9, 1.1};
  const auto few = degradation_test(e, 1, 0.8, 100);
  EXPECT_TRUE(std::isnan(few.statistic));
  EXPECT_EQ(few.p_value, 1.0);
  EXPECT_EQ(few.note, "4 new-period errors at this horizon; at least 5 are needed");
  const std::vector<double> e5{0.5, 0.7, 0.9, 1.1, 1.3};
  const auto none = degradation_test(e5, 1, std::nan(""), 0);
  EXPECT_TRUE(std::isnan(none.statistic));
  EXPECT_EQ(none.note, "no training-time MASE at this horizon");
}

}  // namespace
}  // namespace lagsieve
