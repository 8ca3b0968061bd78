// The screen on Series M (sales with a leading indicator; R's BJsales / BJsales.lead). Published
// analysis: Box, Jenkins, Reinsel & Ljung, Time Series Analysis: Forecasting and Control, 5th ed.
// (2015), transfer-function identification chapter (section 12.2 from memory), where the
// prewhitened cross-correlations of the first differences identify a delay b = 3 for the leading
// indicator (model omega_0 B^3 / (1 - delta_1 B), noise MA(1)).
#include <gtest/gtest.h>

#include <cstdio>

#include <nlohmann/json.hpp>

#include "core/config.h"
#include "screen/screen.h"
#include "series_m.h"

namespace lagsieve {
namespace {

RunConfig first_differences() {
  RunConfig config;
  config.differencing.regular = 1;
  InputConfig lead;
  lead.name = "lead";
  config.inputs.push_back(lead);
  return config;
}

TEST(ScreenSeriesM, LeadingIndicatorHasDelayThree) {
  const auto data = testing::read_series_m();
  const auto res = screen_series(data, first_differences());
  ASSERT_EQ(res.inputs.size(), 1u);
  const auto& lead = res.inputs[0];
  std::printf("Series M: AR(%d) prewhitening, n = %d, b = %d, s = %d, r = %d, noise (%d, %d)\n",
              lead.prewhitening.order, lead.n, lead.suggested_delay, lead.suggested_numerator,
              lead.suggested_denominator, res.noise.p, res.noise.q);
  for (double w : lead.suggested_omega) std::printf("  omega %.4f\n", w);
  for (double d : lead.suggested_delta) std::printf("  delta %.4f\n", d);
  EXPECT_TRUE(lead.relevant);
  EXPECT_EQ(lead.suggested_delay, 3);  // Box, Jenkins, Reinsel & Ljung (2015), Series M
  // Nothing before the delay crosses even the per-lag band, so b is not fragile here.
  for (int k = 0; k < 3; ++k) EXPECT_LT(std::abs(lead.correlation_at(k)), lead.band) << k;
  // The published model's shape and noise are recovered as well: omega_0 B^3 / (1 - delta_1 B)
  // and an MA(1) noise on the differences.
  EXPECT_EQ(lead.suggested_numerator, 0);
  EXPECT_EQ(lead.suggested_denominator, 1);
  EXPECT_EQ(res.noise.p, 0);
  EXPECT_EQ(res.noise.q, 1);
  ASSERT_EQ(lead.suggested_delta.size(), 1u);
  EXPECT_GT(lead.suggested_delta[0], 0.0);  // a decaying, not oscillating, response
  EXPECT_LT(lead.suggested_delta[0], 1.0);
  EXPECT_TRUE(lead.feedback_lags.empty());
  EXPECT_EQ(res.n, 149);
  EXPECT_EQ(res.max_lag_used, 20);
}

TEST(ScreenSeriesM, JsonCarriesEverything) {
  const auto res = screen_series(testing::read_series_m(), first_differences());
  const auto j = to_json(res);
  const auto& in = j["inputs"][0];
  EXPECT_EQ(in["cross_correlation"].size(), 41u);
  EXPECT_EQ(in["impulse"].size(), 21u);
  EXPECT_EQ(in["impulse_se"].size(), 21u);
  EXPECT_EQ(in["suggested_delay"].get<int>(), res.inputs[0].suggested_delay);
  EXPECT_EQ(in["shapes"].size(), 9u);
  EXPECT_TRUE(j["noise"].contains("acf"));
  EXPECT_TRUE(j["warnings"].is_array());
}

}  // namespace
}  // namespace lagsieve
