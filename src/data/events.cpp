#include "data/events.h"

#include <fmt/format.h>

#include <algorithm>

#include "core/error.h"
#include "data/time_index.h"

namespace lagsieve {

std::vector<double> event_values(EventShape shape, int row, int rows) {
  std::vector<double> v(static_cast<size_t>(std::max(rows, 0)), 0.0);
  for (int t = std::max(row, 0); t < rows; ++t) {
    switch (shape) {
      case EventShape::pulse:
        v[t] = t == row ? 1.0 : 0.0;
        break;
      case EventShape::step:
        v[t] = 1.0;
        break;
      case EventShape::ramp:
        v[t] = static_cast<double>(t - row);
        break;
    }
  }
  return v;
}

namespace {

// The row where a stamp (or a row index) falls in `time`: the first row at or after it (the row
// of the period containing it, for month, quarter and week stamps); time.size() when it is
// after every row. Throws InputError for text that is neither.
int locate(const std::string& text, const std::vector<std::string>& time, const std::string& where,
           const std::string& time_format, bool last_at_or_before = false) {
  const int rows = static_cast<int>(time.size());
  const bool has_time = rows > 0 && !time.front().empty();
  // `at` may be written like the column (its own format) or in any recognised form.
  auto parse = [&](const std::string& t) {
    auto ts = time_format.empty() ? std::nullopt : parse_time_stamp(t, time_format);
    return ts ? ts : parse_time_stamp(t);
  };
  const auto at = parse(text);
  std::optional<TimeStamp> first;
  if (has_time) first = parse(time.front());
  const bool same_kind = has_time && at && first &&
                         (at->format == TimeFormat::integer) ==
                             (first->format == TimeFormat::integer);
  if (same_kind) {
    // A stamp of a period (month, quarter, ISO week) covers the whole period.
    const bool periods = first->format == TimeFormat::month ||
                         first->format == TimeFormat::quarter || first->format == TimeFormat::week;
    std::vector<std::int64_t> keys(rows);
    for (int r = 0; r < rows; ++r) keys[r] = parse(time[r])->key;
    auto contains = [&](int r) {
      return periods && keys[r] <= at->key && (r + 1 == rows || at->key < keys[r + 1]);
    };
    if (last_at_or_before) {  // the end of a window: the last row at or before it
      int row = -1;
      for (int r = 0; r < rows; ++r)
        if (keys[r] <= at->key) row = r;
      return row;
    }
    for (int r = 0; r < rows; ++r)
      if (keys[r] >= at->key || contains(r)) return r;
    return rows;
  }
  if (at && at->format == TimeFormat::integer) {
    // No time column, or a date column with an integer `at`: a 0-based row index.
    if (at->key < 0 || at->key >= rows)
      throw InputError(fmt::format("{}: row index {} is outside the data (rows 0 to {}); give a "
                                   "row inside the data",
                                   where, text, rows - 1));
    return static_cast<int>(at->key);
  }
  throw InputError(fmt::format(
      "{}: `at: {}` is neither a {} nor a row index; write it like the time column "
      "(2024-03-01, 2024-03-01 06:00, 2024-03, 2024-Q1, 2024-W09, 2024) or as a 0-based row "
      "number",
      where, text, has_time ? "time stamp" : "row index (the data have no time column)"));
}

std::vector<std::string> split(const std::string& text, const std::string& sep) {
  std::vector<std::string> out;
  size_t from = 0;
  for (size_t at = text.find(sep); at != std::string::npos; at = text.find(sep, from)) {
    out.push_back(text.substr(from, at - from));
    from = at + sep.size();
  }
  out.push_back(text.substr(from));
  return out;
}

}  // namespace

int event_row(const InputConfig& input, const std::vector<std::string>& time,
              const std::string& config_file, const std::string& time_format) {
  const auto where = fmt::format("{}:{}: event '{}'", config_file, input.line, input.name);
  const int row = locate(input.at, time, where, time_format);
  if (row == static_cast<int>(time.size()))
    throw InputError(fmt::format("{}: `at: {}` is after the last time stamp {}; the data hold "
                                 "no row with the event, so its effect cannot be estimated",
                                 where, input.at, time.back()));
  return row;
}

bool is_recurring(const InputConfig& input) {
  return input.at.find(';') != std::string::npos || input.at.find("..") != std::string::npos;
}

std::vector<double> event_column(const InputConfig& input, const std::vector<std::string>& time,
                                 int data_rows, const std::string& config_file,
                                 const std::string& time_format) {
  const int rows = static_cast<int>(time.size());
  if (!is_recurring(input)) {
    const std::vector<std::string> data_time(time.begin(), time.begin() + data_rows);
    const int row = event_row(input, data_time, config_file, time_format);
    return event_values(input.shape, row, rows);
  }
  const auto where = fmt::format("{}:{}: event '{}'", config_file, input.line, input.name);
  std::vector<double> v(static_cast<size_t>(rows), 0.0);
  bool inside = false;
  for (const auto& occurrence : split(input.at, ";")) {
    const auto window = split(occurrence, "..");
    const int from = locate(window[0], time, where, time_format);
    if (window.size() == 2) {  // 1 on every row of the window, whatever the shape
      const int to = locate(window[1], time, where, time_format, true);
      for (int t = from; t <= to && t < rows; ++t) v[t] = 1.0;
      inside = inside || (from < data_rows && from <= to);
      continue;
    }
    const auto one = event_values(input.shape, from, rows);
    for (int t = 0; t < rows; ++t) v[t] += one[t];
    inside = inside || from < data_rows;
  }
  if (!inside)
    throw InputError(fmt::format("{}: no occurrence of `at` falls inside the data (which end at "
                                 "{}), so the event's effect cannot be estimated",
                                 where, data_rows > 0 ? time[data_rows - 1] : "row 0"));
  return v;
}

}  // namespace lagsieve
