// The terminal forecast tables (forecast/forecast_table.h): both intervals, the share of width
// from the inputs, aligned columns, steps from 1, scenarios beside the baseline.
#include <gtest/gtest.h>

#include <sstream>

#include "forecast/forecast_table.h"

namespace lagsieve {
namespace {

ForecastResult two_steps(double shift) {
  ForecastResult r;
  r.time = {"2025-01-01", "2025-01-02"};
  r.median = {100.5 + shift, 101.25 + shift};
  r.levels = {0.8, 0.95};
  r.lower = {{98.0 + shift, 96.0 + shift}, {97.0 + shift, 94.0 + shift}};
  r.upper = {{103.0 + shift, 106.5 + shift}, {104.0 + shift, 108.5 + shift}};
  r.lower_known = {{99.0 + shift, 98.0 + shift}, {98.0 + shift, 97.0 + shift}};
  r.upper_known = {{102.0 + shift, 104.5 + shift}, {103.0 + shift, 105.5 + shift}};
  r.share_inputs = {0.3, 0.5};
  r.share_parameters = {0.01, 0.02};
  return r;
}

std::vector<std::string> lines(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string l; std::getline(in, l);) out.push_back(l);
  return out;
}

size_t display_width(const std::string& s) {
  size_t n = 0;
  for (unsigned char c : s) n += (c & 0xC0) != 0x80 ? 1 : 0;
  return n;
}

TEST(ForecastTable, ShowsBothIntervalsAndTheWidthFromInputs) {
  const auto text = lines(forecast_table(two_steps(0.0)));
  ASSERT_GE(text.size(), 4u);
  EXPECT_NE(text[0].find("80% interval, inputs:"), std::string::npos);
  EXPECT_NE(text[1].find("forecast"), std::string::npos);
  EXPECT_NE(text[1].find("known"), std::string::npos);
  // Step 1, its 80% bounds with inputs forecast then known, and the 95% width share:
  // 1 - (103 - 98) / (104 - 97) = 28.6%.
  EXPECT_EQ(text[2].rfind("     1  2025-01-01", 0), 0u) << text[2];
  EXPECT_NE(text[2].find("98.00 \u2013 103.00    99.00 \u2013 102.00"), std::string::npos)
      << text[2];
  EXPECT_NE(text[2].find("28.6%"), std::string::npos) << text[2];
  EXPECT_EQ(text[3].rfind("     2  2025-01-02", 0), 0u);
  EXPECT_EQ(display_width(text[2]), display_width(text[3]));  // aligned
  EXPECT_EQ(display_width(text[1]), display_width(text[2]));
}

TEST(ForecastTable, ScenariosSitBesideTheBaselineWithTheirDifference) {
  const ForecastResult base = two_steps(0.0);
  const std::vector<NamedForecast> s = {{"cold", two_steps(1.5)}, {"mild", two_steps(-2.25)}};
  const auto text = lines(scenario_table(&base, s));
  ASSERT_GE(text.size(), 4u);
  EXPECT_NE(text[0].find("baseline (inputs forecast)"), std::string::npos);
  EXPECT_NE(text[0].find("cold"), std::string::npos);
  EXPECT_NE(text[2].find("+1.50"), std::string::npos) << text[2];
  EXPECT_NE(text[2].find("-2.25"), std::string::npos) << text[2];
  EXPECT_EQ(display_width(text[2]), display_width(text[3]));
  EXPECT_EQ(display_width(text[1]), display_width(text[2]));
}

TEST(ForecastTable, DecimalsFollowTheMagnitude) {
  EXPECT_EQ(table_decimals({377.5, 12.0}), 2);
  EXPECT_EQ(table_decimals({0.00042}), 6);
  EXPECT_EQ(table_decimals({123456.0}), 0);
}

}  // namespace
}  // namespace lagsieve
