#pragma once
// The time column: parsing stamps to comparable keys, recognising the sampling frequency, the
// gaps in a regular calendar, and continuing the index past the end of the data (forecast rows
// need stamps) in the column's own format. Calendar arithmetic is Howard Hinnant's `date`
// library (the reference implementation of C++20 calendars); nothing here counts days by hand.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve {

// How one stamp is written. `custom` is an explicit `data.time_format`.
enum class TimeFormat { integer, date, datetime, month, quarter, week, year, custom };
std::string_view to_string(TimeFormat f);

// A parsed stamp. `key` orders stamps: the integer itself, or seconds since 1970-01-01T00:00 UTC
// of the start of the stamp's period (a month stamp is its first day, an ISO week its Monday);
// a date-time with an offset is converted to UTC, one without is taken as written.
struct TimeStamp {
  TimeFormat format = TimeFormat::integer;
  std::int64_t key = 0;
  std::optional<int> offset_minutes;  // written offset (Z = 0), date-times only
};

// Accepts, without a custom format:
//   integer            42, -3 (a 4-digit column of years is recognised by analyse_time)
//   date               2024-03-01, 2024/03/01
//   datetime           2024-03-01 06:30, 2024-03-01T06:30:15, ...Z, ...+01:00, ...+0100
//   month              2024-03, 2024/03
//   quarter            2024-Q1, 2024Q1, 2024 Q1
//   week (ISO 8601)    2024-W09, 2024W09
// With `custom_format` (strftime-like, e.g. "%d/%m/%Y"), only that format (whole text).
// std::nullopt when the text is none of these or the date does not exist.
std::optional<TimeStamp> parse_time_stamp(std::string_view text,
                                          const std::string& custom_format = "");

enum class Frequency { none, hourly, daily, weekly, monthly, quarterly, annual, other };
std::string_view to_string(Frequency f);
// The seasonal period a frequency suggests: 24 hourly, 7 daily, 52 weekly, 12 monthly,
// 4 quarterly; 0 where there is none (annual, other, no calendar).
int default_seasonal_period(Frequency f);

// What a whole time column says: its format, frequency, and where rows are missing.
struct TimeAnalysis {
  TimeFormat format = TimeFormat::integer;
  Frequency frequency = Frequency::none;
  std::int64_t step = 1;  // size of one period: seconds, or months when month_based
  bool month_based = false;
  bool month_end = false;            // month-based on month ends (2024-01-31, 2024-02-29, ...)
  std::vector<std::int64_t> period;  // period number of each row (consecutive rows differ by 1)
  struct Gap {
    int before_row = 0;  // 0-based row of the data that follows the gap
    int count = 0;       // periods missing
  };
  std::vector<Gap> gaps;
  // Rows where a written offset changes (daylight-saving changes): the clock was moved by
  // (new - old) minutes; rows are aligned by the UTC instant, so nothing is lost or doubled.
  struct OffsetChange {
    int row = 0;
    int from_minutes = 0;
    int to_minutes = 0;
  };
  std::vector<OffsetChange> offset_changes;
  std::string label() const;  // "monthly", "every 900 seconds", ...
};

// Analyses a column of stamps as written (empty vector or all-empty: no time column). Throws
// InputError with `where(row)` ("file:line") for: a stamp none of the forms read (with a sample
// of the column and the format tried), mixed formats, a repeated stamp or period (2024-01 and
// 2024-01-15), stamps out of order, an integer index that is not evenly spaced, and a step that
// fits no calendar (the frequency cannot be inferred, so gaps cannot be told apart).
TimeAnalysis analyse_time(const std::vector<std::string>& time, const std::string& custom_format,
                          const std::string& column,
                          const std::vector<std::string>& where_rows = {},
                          const std::string& source = "");

// The stamp of period number `period` of a column analysed as `a`, written like `like` (a stamp
// of the column: its separators, seconds, offset and day of the month are kept).
std::string stamp_of_period(const TimeAnalysis& a, std::int64_t period, const std::string& like,
                            const std::string& custom_format = "");

// "daily", "monthly", ... of a valid column (as load_series guarantees); "none" without one.
std::string infer_frequency(const std::vector<std::string>& time,
                            const std::string& custom_format = "");

// The k stamps after the last one, in the column's own format, continuing its frequency (months
// keep the day of the month, or stay month ends). Without a time column returns k empty stamps.
std::vector<std::string> next_time_stamps(const std::vector<std::string>& time, int k,
                                          const std::string& custom_format = "");

}  // namespace lagsieve
