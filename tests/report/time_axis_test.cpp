// Time-axis ticks in the stamps' own form: the calendar facts they rest on (month lengths, leap
// years, the first of each month) are those of the proleptic Gregorian calendar, spelled out in
// each case below, not derived from the code under test.
#include "report/time_axis.h"

#include <gtest/gtest.h>

#include <fmt/format.h>

#include <string>
#include <vector>

namespace lagsieve {
namespace {

struct Axis {
  std::vector<double> x;
  std::vector<std::string> time;
};

// Rows 1..n with stamps from `stamp(i)`.
template <class F>
Axis axis(int n, F stamp) {
  Axis a;
  for (int i = 0; i < n; ++i) {
    a.x.push_back(i + 1.0);
    a.time.push_back(stamp(i));
  }
  return a;
}

std::vector<std::string> labels(const std::vector<AxisTick>& ticks) {
  std::vector<std::string> out;
  for (const auto& t : ticks) out.push_back(t.label);
  return out;
}

// Month stamps from March 2015 for n months.
Axis monthly(int n) {
  return axis(n, [](int i) {
    const int m = 2 + i;  // months since January 2015
    return fmt::format("{}-{:02d}", 2015 + m / 12, m % 12 + 1);
  });
}

TEST(TimeAxis, MonthlyDataGetYearsAtEachJanuary) {
  const Axis a = monthly(118);  // 2015-03 .. 2024-12
  const auto ticks = time_axis_ticks(a.x, a.time);
  EXPECT_EQ(labels(ticks), (std::vector<std::string>{"2016", "2017", "2018", "2019", "2020", "2021",
                                                     "2022", "2023", "2024"}));
  // 2016-01 is the 11th month from 2015-03: row 11; then every 12 rows.
  ASSERT_FALSE(ticks.empty());
  EXPECT_EQ(ticks.front().at, 11.0);
  EXPECT_EQ(ticks.back().at, 11.0 + 8 * 12);
  // Thirty years of months: every five years.
  const Axis b = monthly(12 * 30);  // 2015-03 .. 2045-02
  EXPECT_EQ(labels(time_axis_ticks(b.x, b.time)),
            (std::vector<std::string>{"2020", "2025", "2030", "2035", "2040", "2045"}));
}

TEST(TimeAxis, ShortMonthlyDataGetMonthsAsWritten) {
  const Axis a = monthly(14);  // 2015-03 .. 2016-04: every other month, from January's side
  EXPECT_EQ(labels(time_axis_ticks(a.x, a.time)),
            (std::vector<std::string>{"2015-03", "2015-05", "2015-07", "2015-09", "2015-11",
                                      "2016-01", "2016-03"}));
}

TEST(TimeAxis, DailyDataGetTheFirstOfEachMonthCutToTheMonth) {
  // 2024-01-15 + i days for 200 days (to 2024-08-01). 2024 is a leap year: January has 31
  // days, February 29, so 2024-02-01 is row 18, 2024-03-01 row 47, ...
  const int days_in[] = {31, 29, 31, 30, 31, 30, 31, 31};
  std::vector<std::string> stamps;
  for (int m = 0, d = 15; stamps.size() < 200;) {
    stamps.push_back(fmt::format("2024-{:02d}-{:02d}", m + 1, d));
    if (++d > days_in[m]) d = 1, ++m;
  }
  const Axis a = axis(200, [&](int i) { return stamps[i]; });
  const auto ticks = time_axis_ticks(a.x, a.time);
  EXPECT_EQ(labels(ticks), (std::vector<std::string>{"2024-02", "2024-03", "2024-04", "2024-05",
                                                     "2024-06", "2024-07", "2024-08"}));
  ASSERT_GE(ticks.size(), 2u);
  EXPECT_EQ(ticks[0].at, 18.0);
  EXPECT_EQ(ticks[1].at, 47.0);
}

TEST(TimeAxis, HourlyDataGetTheDateOncePerDay) {
  // 2024-03-01 00:00 for 48 hours.
  const Axis a =
      axis(48, [](int i) { return fmt::format("2024-03-{:02d} {:02d}:00", 1 + i / 24, i % 24); });
  EXPECT_EQ(labels(time_axis_ticks(a.x, a.time)),
            (std::vector<std::string>{"2024-03-01 00:00", "12:00", "2024-03-02 00:00", "12:00"}));
}

TEST(TimeAxis, QuarterlyDataGetEveryOtherYear) {
  const Axis a = axis(60, [](int i) { return fmt::format("{}-Q{}", 2010 + i / 4, i % 4 + 1); });
  EXPECT_EQ(
      labels(time_axis_ticks(a.x, a.time)),
      (std::vector<std::string>{"2010", "2012", "2014", "2016", "2018", "2020", "2022", "2024"}));
}

TEST(TimeAxis, IntegerStampsGetRoundValues) {
  const Axis a = axis(500, [](int i) { return std::to_string(i + 1); });
  EXPECT_EQ(labels(time_axis_ticks(a.x, a.time)),
            (std::vector<std::string>{"50", "100", "150", "200", "250", "300", "350", "400", "450",
                                      "500"}));
}

TEST(TimeAxis, OtherFormsAndTooFewCalendarTicksKeepTheStampsAtEvenRows) {
  // A custom form the built-in parser does not read: the stamps as written, evenly spaced.
  const Axis a = axis(30, [](int i) { return fmt::format("{:02d}/01/2024", i + 1); });
  const auto ticks = time_axis_ticks(a.x, a.time);
  ASSERT_GE(ticks.size(), 3u);
  for (const auto& t : ticks) EXPECT_EQ(t.label, a.time[static_cast<size_t>(t.at) - 1]);
  EXPECT_EQ(ticks[1].at - ticks[0].at, ticks[2].at - ticks[1].at);
  // 40 days hold at most two firsts of a month: full dates instead.
  const Axis b = axis(40, [](int i) {
    return i < 31 ? fmt::format("2024-01-{:02d}", i + 1) : fmt::format("2024-02-{:02d}", i - 30);
  });
  const auto daily = time_axis_ticks(b.x, b.time);
  ASSERT_GE(daily.size(), 3u);
  for (const auto& t : daily) EXPECT_EQ(t.label.size(), 10u) << t.label;
  // No stamps, or one missing: no ticks (the chart numbers its rows).
  Axis c = monthly(24);
  c.time[5].clear();
  EXPECT_TRUE(time_axis_ticks(c.x, c.time).empty());
}

}  // namespace
}  // namespace lagsieve
