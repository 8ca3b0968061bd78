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

int event_row(const InputConfig& input, const std::vector<std::string>& time,
              const std::string& config_file) {
  const int rows = static_cast<int>(time.size());
  const auto where = fmt::format("{}:{}: event '{}'", config_file, input.line, input.name);
  const bool has_time = rows > 0 && !time.front().empty();
  const auto at = parse_time_stamp(input.at);
  std::optional<TimeStamp> first;
  if (has_time) first = parse_time_stamp(time.front());

  int row = -1;
  const bool same_kind = has_time && at && first &&
                         (at->format == TimeFormat::integer) ==
                             (first->format == TimeFormat::integer);
  if (same_kind) {
    // `at` is a stamp of the time column: the first row at or after it.
    row = rows;
    for (int r = 0; r < rows; ++r) {
      const auto t = parse_time_stamp(time[r]);
      if (t && t->key >= at->key) {
        row = r;
        break;
      }
    }
    if (row == rows)
      throw InputError(fmt::format("{}: `at: {}` is after the last time stamp {}; the data hold "
                                   "no row with the event, so its effect cannot be estimated",
                                   where, input.at, time.back()));
  } else if (at && at->format == TimeFormat::integer) {
    // No time column, or a date column with an integer `at`: a 0-based row index.
    if (at->key < 0 || at->key >= rows)
      throw InputError(fmt::format("{}: row index {} is outside the data (rows 0 to {}); give a "
                                   "row inside the data",
                                   where, input.at, rows - 1));
    row = static_cast<int>(at->key);
  } else {
    throw InputError(fmt::format(
        "{}: `at: {}` is neither a {} nor a row index; write it like the time column "
        "(YYYY-MM-DD, YYYY-MM-DD HH:MM) or as a 0-based row number",
        where, input.at, has_time ? "time stamp" : "row index (the data have no time column)"));
  }
  return row;
}

}  // namespace lagsieve
