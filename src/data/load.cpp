#include "data/load.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <optional>

#include "core/error.h"
#include "core/names.h"
#include "data/events.h"

namespace lagsieve {
namespace {

bool is_missing_marker(std::string_view s) {
  return s.empty() || s == "NA" || s == "N/A" || s == "NaN" || s == "nan" || s == "NAN" ||
         s == "null" || s == "NULL";
}

std::optional<double> parse_number(std::string_view s) {
  const char* begin = s.data();
  const char* end = s.data() + s.size();
  if (begin != end && *begin == '+') ++begin;
  double v = 0.0;
  const auto [p, ec] = std::from_chars(begin, end, v);
  if (ec != std::errc() || p != end || begin == end) {
    // from_chars reports overflow as out of range; call it infinite so the message says so.
    if (ec == std::errc::result_out_of_range && p == end) return HUGE_VAL;
    return std::nullopt;
  }
  return v;
}

int find_column(const CsvTable& table, const std::string& name, const std::string& role) {
  const int c = table.column_index(name);
  if (c >= 0) return c;
  const auto guess = closest_match(name, table.header);
  std::string listing;
  const size_t shown = std::min<size_t>(table.header.size(), 8);
  for (size_t i = 0; i < shown; ++i) {
    if (i > 0) listing += ", ";
    listing += table.header[i];
  }
  if (shown < table.header.size()) listing += fmt::format(", ... ({} in all)", table.header.size());
  throw InputError(fmt::format("{}: column '{}' ({}) is not in the header; {}columns are: {}",
                               table.source, name, role,
                               guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess),
                               listing));
}

// Reads a numeric column; missing cells become NaN and are then filled or reported.
std::vector<double> read_numeric(const CsvTable& table, int col, const std::string& role,
                                 MissingPolicy policy, int& interpolated) {
  const auto& name = table.header[col];
  const int n = table.row_count();
  std::vector<double> v(static_cast<size_t>(n));
  std::vector<int> missing;
  for (int r = 0; r < n; ++r) {
    const auto& cell = table.rows[r][col];
    if (is_missing_marker(cell)) {
      if (policy == MissingPolicy::error)
        throw InputError(fmt::format(
            "{}: {} column '{}' (column {}) has a missing value{}; fill it in, or set "
            "`data.missing: interpolate` to fill interior gaps linearly",
            table.where(r), role, name, col + 1, cell.empty() ? "" : fmt::format(" ('{}')", cell)));
      v[r] = std::nan("");
      missing.push_back(r);
      continue;
    }
    const auto x = parse_number(cell);
    if (!x)
      throw InputError(fmt::format("{}: {} column '{}' (column {}): '{}' is not a number; use a "
                                   "plain decimal number (e.g. 12.5 or 1.2e3), or leave the cell "
                                   "empty for a missing value",
                                   table.where(r), role, name, col + 1, cell));
    if (!std::isfinite(*x))
      throw InputError(fmt::format("{}: {} column '{}' (column {}): '{}' is not finite; only "
                                   "finite numbers can be modelled",
                                   table.where(r), role, name, col + 1, cell));
    v[r] = *x;
  }
  if (missing.empty()) return v;
  if (missing.size() == static_cast<size_t>(n))
    throw InputError(fmt::format("{}: {} column '{}' has no values at all", table.source, role,
                                 name));
  // Interpolate: only gaps with an observed value on both sides.
  if (missing.front() == 0)
    throw InputError(fmt::format(
        "{}: {} column '{}' starts with a missing value; interpolation only fills gaps between "
        "two observed values, so remove the leading rows or fill them in",
        table.where(0), role, name));
  if (missing.back() == n - 1)
    throw InputError(fmt::format(
        "{}: {} column '{}' ends with a missing value; interpolation only fills gaps between "
        "two observed values, so remove the trailing rows or fill them in",
        table.where(n - 1), role, name));
  for (size_t i = 0; i < missing.size();) {
    const int lo = missing[i] - 1;  // last observed before the gap
    size_t j = i;
    while (j + 1 < missing.size() && missing[j + 1] == missing[j] + 1) ++j;
    const int hi = missing[j] + 1;  // first observed after the gap
    for (int r = lo + 1; r < hi; ++r) {
      const double w = static_cast<double>(r - lo) / static_cast<double>(hi - lo);
      v[r] = (1.0 - w) * v[lo] + w * v[hi];
    }
    interpolated += hi - lo - 1;
    i = j + 1;
  }
  return v;
}

std::vector<std::string> read_time(const CsvTable& table, int col) {
  const auto& name = table.header[col];
  const int n = table.row_count();
  std::vector<std::string> time(static_cast<size_t>(n));
  std::optional<TimeStamp> prev;
  for (int r = 0; r < n; ++r) {
    const auto& cell = table.rows[r][col];
    if (cell.empty())
      throw InputError(fmt::format("{}: time column '{}' is empty on this row; every row needs a "
                                   "time stamp",
                                   table.where(r), name));
    const auto ts = parse_time_stamp(cell);
    if (!ts)
      throw InputError(fmt::format("{}: time column '{}': '{}' is not a time stamp; write "
                                   "YYYY-MM-DD, YYYY-MM-DD HH:MM[:SS] or an integer",
                                   table.where(r), name, cell));
    if (prev) {
      if ((ts->format == TimeFormat::integer) != (prev->format == TimeFormat::integer))
        throw InputError(fmt::format("{}: time column '{}': '{}' mixes integers and dates; use "
                                     "one kind of time stamp throughout",
                                     table.where(r), name, cell));
      if (ts->key == prev->key)
        throw InputError(fmt::format("{}: time column '{}': time stamp {} repeats the one on "
                                     "line {}; each time stamp may appear once",
                                     table.where(r), name, cell, table.lines[r - 1]));
      if (ts->key < prev->key)
        throw InputError(fmt::format("{}: time column '{}': time stamp {} comes before {} on "
                                     "line {}; sort the rows by time",
                                     table.where(r), name, cell, time[r - 1],
                                     table.lines[r - 1]));
    }
    prev = ts;
    time[r] = cell;
  }
  return time;
}

bool is_constant(const std::vector<double>& v) {
  return std::all_of(v.begin(), v.end(), [&](double x) { return x == v.front(); });
}

}  // namespace

int min_rows_needed(const RunConfig& config) {
  int input_lag = 0;
  int params = 2;  // constant and sigma^2
  for (const auto& in : config.inputs) {
    input_lag = std::max(input_lag, in.delay.max + in.numerator.max);
    params += in.numerator.max + 1 + in.denominator.max;
  }
  const auto& nz = config.noise;
  params += nz.ar.max + nz.ma.max + nz.seasonal_ar.max + nz.seasonal_ma.max;
  return config.differencing.lost() + input_lag + params + kMinSpareRows;
}

void check_feasible(const RunConfig& config, const SeriesData& series) {
  const int n = series.rows();
  const int needed = min_rows_needed(config);
  const auto cfg = config.config_file.string();
  if (n < needed) {
    int input_lag = 0;
    for (const auto& in : config.inputs)
      input_lag = std::max(input_lag, in.delay.max + in.numerator.max);
    throw InputError(fmt::format(
        "{}: series '{}' has {} rows, too few for the largest candidate of {}: it needs at "
        "least {} (differencing uses {}, the longest input lag delay + numerator is {}, the "
        "largest model has {} parameters, and {} rows must remain); narrow the ranges or supply "
        "more data",
        series.source_file, series.target_name, n, cfg, needed, config.differencing.lost(),
        input_lag, needed - kMinSpareRows - config.differencing.lost() - input_lag,
        kMinSpareRows));
  }
  const auto& bt = config.backtest;
  if (!bt.enabled) return;
  const int first = bt.first_origin > 0 ? bt.first_origin : (2 * n) / 3;
  if (bt.first_origin > 0 && first >= n)
    throw InputError(fmt::format("{}: backtest.first_origin: {} is not inside the {} rows of "
                                 "series '{}'; choose a row index below {}",
                                 cfg, first, n, series.target_name, n));
  const int training = bt.window == WindowKind::sliding && bt.window_length > 0 ? bt.window_length
                                                                                : first;
  if (training < needed)
    throw InputError(fmt::format(
        "{}: {}: the first backtest origin trains on {} rows of series '{}', fewer than the {} "
        "the largest candidate needs; {}",
        cfg,
        bt.window == WindowKind::sliding && bt.window_length > 0 ? "backtest.window_length"
                                                                 : "backtest.first_origin",
        training, series.target_name, needed,
        bt.first_origin > 0 || bt.window_length > 0 ? "raise it or narrow the ranges"
                                                    : "set `first_origin` (the automatic "
                                                      "choice is 2/3 of the rows) or narrow "
                                                      "the ranges"));
  if (bt.window == WindowKind::sliding && bt.window_length > first)
    throw InputError(fmt::format("{}: backtest.window_length: {} is longer than the {} rows "
                                 "before the first origin; shorten it or move the origin later",
                                 cfg, bt.window_length, first));
}

SeriesData series_from_table(const RunConfig& config, const CsvTable& table,
                             const std::string& target_column) {
  const auto cfg = config.config_file.string();
  if (table.row_count() == 0)
    throw InputError(fmt::format("{}: the file has a header but no data rows", table.source));
  SeriesData s;
  s.target_name = target_column;
  s.source_file = table.source;
  const MissingPolicy policy = config.data.missing;

  if (!config.data.time.empty()) {
    const int tc = find_column(table, config.data.time, "data.time in " + cfg);
    if (config.data.time == target_column)
      throw InputError(fmt::format("{}: data.time: '{}' is also the target column; the time "
                                   "column only orders the rows",
                                   cfg, target_column));
    s.time = read_time(table, tc);
  } else {
    s.time.assign(static_cast<size_t>(table.row_count()), "");
  }

  const int yc = find_column(table, target_column, "the target in " + cfg);
  s.target = read_numeric(table, yc, "target", policy, s.interpolated);
  if (is_constant(s.target))
    throw InputError(fmt::format("{}: target column '{}' is constant (every value is {}); there "
                                 "is nothing to model",
                                 table.source, target_column, s.target.front()));
  if (config.target.transform.kind != TransformKind::none) {
    for (int r = 0; r < s.rows(); ++r)
      if (!(s.target[r] > 0.0))
        throw InputError(fmt::format(
            "{}: target column '{}': value {} is not positive, so the {} transform is undefined; "
            "use `target.transform: none` or shift the series",
            table.where(r), target_column, s.target[r],
            to_string(config.target.transform.kind)));
  }

  for (const auto& in : config.inputs) {
    const auto what = fmt::format("input '{}' ({}:{})", in.name, cfg, in.line);
    std::vector<double> values;
    if (in.is_event) {
      values = event_values(in.shape, event_row(in, s.time, cfg), s.rows());
    } else {
      if (in.name == config.data.time)
        throw InputError(fmt::format("{}:{}: input '{}' is the time column; it cannot be an input",
                                     cfg, in.line, in.name));
      const int c = find_column(table, in.name, "an input in " + cfg);
      values = read_numeric(table, c, "input", policy, s.interpolated);
    }
    if (is_constant(values))
      throw InputError(fmt::format(
          "{} is constant (every value is {}) in {}; a constant input cannot be told apart from "
          "the model's constant; remove it {}",
          what, values.front(), table.source,
          in.is_event ? "or move `at` inside the data" : "or check the column"));
    s.input_names.push_back(in.name);
    s.inputs.push_back(std::move(values));
  }
  check_feasible(config, s);
  return s;
}

SeriesData load_series_from_csv(const RunConfig& config, const std::filesystem::path& csv,
                                const std::string& target_column) {
  return series_from_table(config, read_csv(csv), target_column);
}

std::vector<SeriesData> load_series(const RunConfig& config) {
  const CsvTable table = read_csv(config.data.file);
  std::vector<SeriesData> out;
  out.reserve(config.target.columns.size());
  for (const auto& column : config.target.columns)
    out.push_back(series_from_table(config, table, column));
  return out;
}

}  // namespace lagsieve
