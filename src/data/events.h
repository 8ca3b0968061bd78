#pragma once
// Generated event inputs (interventions): a pulse, a step or a ramp starting at one row.
#include <string>
#include <vector>

#include "core/config.h"

namespace lagsieve {

// The values of an event of `shape` starting at `row` over `rows` rows:
// pulse = 1 at the row only; step = 1 from the row on; ramp = 0, 1, 2, ... from the row on.
// Rows before `row` are 0. `row` may be >= rows (an event after the data: all zero).
std::vector<double> event_values(EventShape shape, int row, int rows);

// The row where event `input` starts: `at` is matched against the time stamps (the first row at
// or after it, so an event between two sampling times starts at the next one); with no time
// column, or when `at` is not a stamp of the time column's kind, `at` is a 0-based row index.
// Throws InputError (naming the config line) when `at` is neither, or lies outside the data so
// that the event's effect could not be estimated.
int event_row(const InputConfig& input, const std::vector<std::string>& time,
              const std::string& config_file, const std::string& time_format = "");

// True when `at` lists several occurrences ("a;b", a YAML list or an event file) or a window
// ("from..to", from a {from, to} map).
bool is_recurring(const InputConfig& input);

// The event's values over the rows of `time` (the data's `data_rows` rows, possibly followed by
// forecast rows). One occurrence: event_values at event_row (within the data). Several: the sum
// of the shape at each occurrence (a pulse on every listed date; occurrences after the data are
// allowed, at least one must fall inside); a window is 1 on every row from `from` to `to`
// (inclusive; a period stamp covers its period).
std::vector<double> event_column(const InputConfig& input, const std::vector<std::string>& time,
                                 int data_rows, const std::string& config_file,
                                 const std::string& time_format = "");

}  // namespace lagsieve
