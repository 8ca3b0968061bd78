#pragma once
// The time column: parsing stamps to comparable keys, recognising the sampling frequency and
// continuing the index past the end of the data (forecast rows need stamps).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve {

enum class TimeFormat { integer, date, datetime };

// A parsed stamp. `key` orders stamps: the integer itself, or seconds since 1970-01-01 for
// dates and date-times (no time zones; stamps are taken as written).
struct TimeStamp {
  TimeFormat format = TimeFormat::integer;
  std::int64_t key = 0;
};

// Accepts an integer, YYYY-MM-DD, or YYYY-MM-DD HH:MM[:SS] (a 'T' may replace the space).
// std::nullopt when the text is none of these or the date does not exist.
std::optional<TimeStamp> parse_time_stamp(std::string_view text);

// "daily", "weekly", "monthly", "quarterly", "yearly", "hourly", "integer" (integer index or no
// time column: all stamps empty), "every N seconds" for another fixed step of date-times, or
// "irregular". Stamps are assumed valid and increasing (as load_series guarantees).
std::string infer_frequency(const std::vector<std::string>& time);

// The k stamps after the last one, in the same format, continuing the inferred frequency
// (months keep the day of the month, clamped to the month's length). An irregular index
// repeats its last step. Without a time column (all stamps empty) returns k empty stamps.
std::vector<std::string> next_time_stamps(const std::vector<std::string>& time, int k);

}  // namespace lagsieve
