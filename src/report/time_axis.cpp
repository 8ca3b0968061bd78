#include "report/time_axis.h"

#include <date/date.h>

#include <algorithm>
#include <cstdint>
#include <optional>

#include "data/time_index.h"

namespace lagsieve {
namespace {

constexpr double kCharWidth = 6.6;  // average glyph width at 12 px, as svg.cpp lays labels out
constexpr double kLabelGap = 18.0;  // pixels between neighbouring labels
constexpr int kMostTicks = 12;
constexpr std::int64_t kHour = 3600, kDay = 86400;

std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  return a / b - ((a % b != 0 && (a < 0) != (b < 0)) ? 1 : 0);
}
std::int64_t floor_mod(std::int64_t a, std::int64_t b) { return a - b * floor_div(a, b); }

// A stamp's period start on the clock it is written in (the offset added back).
struct Civil {
  std::int64_t seconds = 0;  // since 1970-01-01T00:00
  std::int64_t day = 0;      // days since 1970-01-01
  std::int64_t second_of_day = 0;
  int year = 1970;
  unsigned month = 1, mday = 1;
};

Civil civil(const TimeStamp& s) {
  Civil c;
  c.seconds = s.key + 60 * static_cast<std::int64_t>(s.offset_minutes.value_or(0));
  c.day = floor_div(c.seconds, kDay);
  c.second_of_day = c.seconds - c.day * kDay;
  const date::year_month_day ymd{date::sys_days{date::days{c.day}}};
  c.year = static_cast<int>(ymd.year());
  c.month = static_cast<unsigned>(ymd.month());
  c.mday = static_cast<unsigned>(ymd.day());
  return c;
}

enum class Unit { hour, day, month, year };
struct Step {
  Unit unit;
  int count;
};
// Fine to coarse; several months or years count from January (2 months: Jan, Mar, ...; 5 years:
// 2015, 2020, ...). No weeks: a tick on every other Monday says less than one on the 1st.
constexpr Step kLadder[] = {
    {Unit::hour, 1},   {Unit::hour, 2},  {Unit::hour, 3},   {Unit::hour, 6},   {Unit::hour, 12},
    {Unit::day, 1},    {Unit::day, 2},   {Unit::month, 1},  {Unit::month, 2},  {Unit::month, 3},
    {Unit::month, 6},  {Unit::year, 1},  {Unit::year, 2},   {Unit::year, 5},   {Unit::year, 10},
    {Unit::year, 20},  {Unit::year, 50}, {Unit::year, 100}, {Unit::year, 200}, {Unit::year, 500},
    {Unit::year, 1000}};
// Fewer calendar ticks than this: evenly spaced rows with full stamps say more.
constexpr size_t kFewestTicks = 4;

// The step's shortest length: a step shorter than the rows' spacing would tick every row.
std::int64_t shortest_seconds(Step s) {
  switch (s.unit) {
    case Unit::hour:
      return kHour * s.count;
    case Unit::day:
      return kDay * s.count;
    case Unit::month:
      return 28 * kDay * s.count;
    case Unit::year:
      return 365 * kDay * s.count;
  }
  return 0;
}

std::int64_t unit_index(const Civil& c, Unit u) {
  switch (u) {
    case Unit::hour:
      return floor_div(c.seconds, kHour);
    case Unit::day:
      return c.day;
    case Unit::month:
      return 12 * static_cast<std::int64_t>(c.year) + c.month - 1;
    case Unit::year:
      return c.year;
  }
  return 0;
}

// Whether the stamp is exactly the start of its unit (the first row is a tick only then).
bool starts_unit(const Civil& c, Unit u) {
  switch (u) {
    case Unit::hour:
      return floor_mod(c.seconds, kHour) == 0;
    case Unit::day:
      return c.second_of_day == 0;
    case Unit::month:
      return c.second_of_day == 0 && c.mday == 1;
    case Unit::year:
      return c.second_of_day == 0 && c.mday == 1 && c.month == 1;
  }
  return false;
}

// The stamp as written, cut to the unit: "2019" for years, "2024-03" of "2024-03-15" for months,
// the date of a date-time for days; other forms (months, quarters, weeks) as written.
std::string label(const std::string& stamp, TimeFormat f, Unit u, const Civil& c) {
  const bool dated = f == TimeFormat::date || f == TimeFormat::datetime;
  switch (u) {
    case Unit::year:
      return std::to_string(c.year);
    case Unit::month:
      return dated ? stamp.substr(0, 7) : stamp;
    case Unit::day:
      return f == TimeFormat::datetime ? stamp.substr(0, 10) : stamp;
    case Unit::hour:
      return f == TimeFormat::datetime ? stamp.substr(0, 16) : stamp;
  }
  return stamp;
}

int fitting(double plot_width, const std::vector<AxisTick>& ticks) {
  size_t longest = 1;
  for (const auto& t : ticks) longest = std::max(longest, t.label.size());
  const int n =
      static_cast<int>(plot_width / (kCharWidth * static_cast<double>(longest) + kLabelGap));
  return std::clamp(n, 2, kMostTicks);
}

// Evenly spaced rows with the stamps as written, for stamps of a custom form.
std::vector<AxisTick> row_ticks(const std::vector<double>& x, const std::vector<std::string>& time,
                                double plot_width) {
  size_t longest = 1;
  for (const auto& t : time) longest = std::max(longest, t.size());
  const int target = std::clamp(
      static_cast<int>(plot_width / (kCharWidth * static_cast<double>(longest) + kLabelGap)), 2, 7);
  std::vector<AxisTick> ticks;
  for (double a : nice_ticks(x.front(), x.back(), target)) {
    const auto it = std::find(x.begin(), x.end(), a);
    if (it != x.end()) ticks.push_back({a, time[static_cast<size_t>(it - x.begin())]});
  }
  return ticks;
}

// Integer stamps (an index, or years): ticks at multiples of 1, 2 or 5 x 10^k.
std::optional<std::vector<AxisTick>> integer_ticks(const std::vector<double>& x,
                                                   const std::vector<std::string>& time,
                                                   const std::vector<TimeStamp>& s,
                                                   double plot_width) {
  std::int64_t spacing = 0;
  for (size_t i = 1; i < s.size(); ++i)
    if (const auto d = s[i].key - s[i - 1].key; d > 0)
      spacing = spacing == 0 ? d : std::min(spacing, d);
  for (std::int64_t scale = 1; scale <= 1'000'000'000; scale *= 10)
    for (std::int64_t m : {1, 2, 5}) {
      const std::int64_t step = m * scale;
      if (step < spacing) continue;
      std::vector<AxisTick> ticks;
      for (size_t i = 0; i < s.size(); ++i)
        if (floor_mod(s[i].key, step) == 0) ticks.push_back({x[i], time[i]});
      if (static_cast<int>(ticks.size()) <= fitting(plot_width, ticks))
        return ticks.size() >= kFewestTicks ? std::optional(ticks) : std::nullopt;
    }
  return std::nullopt;
}

}  // namespace

std::vector<AxisTick> time_axis_ticks(const std::vector<double>& x,
                                      const std::vector<std::string>& time, double plot_width) {
  if (x.empty() || x.size() != time.size() ||
      std::any_of(time.begin(), time.end(), [](const std::string& t) { return t.empty(); }))
    return {};
  std::vector<TimeStamp> stamps;
  for (const auto& t : time) {
    const auto s = parse_time_stamp(t);
    if (!s || (!stamps.empty() && s->format != stamps.front().format))
      return row_ticks(x, time, plot_width);
    stamps.push_back(*s);
  }
  const TimeFormat format = stamps.front().format;
  if (format == TimeFormat::integer) {
    auto ticks = integer_ticks(x, time, stamps, plot_width);
    return ticks ? *ticks : row_ticks(x, time, plot_width);
  }
  std::vector<Civil> c;
  for (const auto& s : stamps) c.push_back(civil(s));
  std::int64_t spacing = 0;
  for (size_t i = 1; i < c.size(); ++i)
    if (const auto d = c[i].seconds - c[i - 1].seconds; d > 0)
      spacing = spacing == 0 ? d : std::min(spacing, d);
  for (const Step step : kLadder) {
    // Allow a month of 28 days against monthly rows of 31 (10% slack).
    if (10 * shortest_seconds(step) < 9 * spacing) continue;
    std::vector<AxisTick> ticks;
    std::optional<std::int64_t> previous;
    for (size_t i = 0; i < c.size(); ++i) {
      const std::int64_t bucket = floor_div(unit_index(c[i], step.unit), step.count);
      const bool aligned = floor_mod(unit_index(c[i], step.unit), step.count) == 0;
      const bool tick = previous ? bucket != *previous : aligned && starts_unit(c[i], step.unit);
      previous = bucket;
      if (tick) ticks.push_back({x[i], label(time[i], format, step.unit, c[i])});
    }
    if (static_cast<int>(ticks.size()) > fitting(plot_width, ticks)) continue;
    if (ticks.size() < kFewestTicks) break;  // the next coarser step has fewer still
    if (step.unit == Unit::hour)  // the date once per day: "2024-03-01 06:00", then "12:00"
      for (size_t k = ticks.size(); k-- > 1;)
        if (ticks[k].label.substr(0, 10) == ticks[k - 1].label.substr(0, 10) &&
            ticks[k].label.size() > 11)
          ticks[k].label = ticks[k].label.substr(11);
    return ticks;
  }
  return row_ticks(x, time, plot_width);
}

}  // namespace lagsieve
