#include "data/load.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <optional>
#include <stdexcept>

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
  throw InputError(fmt::format(
      "{}: column '{}' ({}) is not in the header; {}columns are: {}", table.source, name, role,
      guess.empty() ? "" : fmt::format("did you mean '{}'? ", guess), listing));
}

// How the rows of the series map to the file: rows inserted for missing periods have no line.
struct RowMap {
  std::vector<int> table_row;  // per series row: the table row, or -1 for an inserted row
  std::vector<std::string> time;
};

std::string where_row(const CsvTable& table, const RowMap& map, int r) {
  const int tr = map.table_row[r];
  if (tr >= 0) return table.where(tr);
  return fmt::format("{}: row inserted for the missing period {}", table.source, map.time[r]);
}

// Up to five rows by where_row, for messages that name every row of a problem.
std::string list_rows(const CsvTable& table, const RowMap& map, const std::vector<int>& rows) {
  std::string out;
  for (size_t i = 0; i < rows.size() && i < 5; ++i) {
    const int tr = map.table_row[rows[i]];
    out += (i ? ", " : "") + (tr >= 0 ? fmt::format("line {}", table.lines[tr])
                                      : fmt::format("inserted {}", map.time[rows[i]]));
  }
  if (rows.size() > 5) out += fmt::format(" and {} more", rows.size() - 5);
  return out;
}

// Reads a numeric column onto the series rows; missing cells (and inserted rows) become NaN and
// are then left (skip, target only), filled linearly (interpolate) or refused (error).
// `filled` receives 1 per row filled by interpolation (left empty when none was).
// `numbers` (when not empty): the column's values, read in place of its text cells.
std::vector<double> read_numeric(const CsvTable& table, const RowMap& map, int col, bool is_target,
                                 MissingPolicy policy, SeriesData& s,
                                 std::vector<unsigned char>& filled,
                                 std::span<const double> numbers) {
  const auto& name = table.header[col];
  const std::string role = is_target ? "target" : "input";
  const int n = static_cast<int>(map.table_row.size());
  std::vector<double> v(static_cast<size_t>(n), std::nan(""));
  std::vector<int> missing;
  for (int r = 0; r < n; ++r) {
    const int tr = map.table_row[r];
    if (tr < 0) {
      missing.push_back(r);
      continue;
    }
    if (!numbers.empty()) {
      const double x = numbers[static_cast<size_t>(tr)];
      if (std::isnan(x)) {
        missing.push_back(r);
        continue;
      }
      if (!std::isfinite(x))
        throw InputError(
            fmt::format("{}: {} column '{}' (column {}): '{}' is not finite; only "
                        "finite numbers can be modelled",
                        table.where(tr), role, name, col + 1, x));
      v[r] = x;
      continue;
    }
    const auto& cell = table.rows[tr][col];
    if (is_missing_marker(cell)) {
      missing.push_back(r);
      continue;
    }
    const auto x = parse_number(cell);
    if (!x)
      throw InputError(
          fmt::format("{}: {} column '{}' (column {}): '{}' is not a number; use a "
                      "plain decimal number (e.g. 12.5 or 1.2e3), or leave the cell "
                      "empty for a missing value",
                      table.where(tr), role, name, col + 1, cell));
    if (!std::isfinite(*x))
      throw InputError(
          fmt::format("{}: {} column '{}' (column {}): '{}' is not finite; only "
                      "finite numbers can be modelled",
                      table.where(tr), role, name, col + 1, cell));
    v[r] = *x;
  }
  if (missing.empty()) return v;
  if (missing.size() == static_cast<size_t>(n))
    throw InputError(
        fmt::format("{}: {} column '{}' has no values at all", table.source, role, name));
  SeriesData::ColumnFill fill{name, is_target, static_cast<int>(missing.size()), 0};
  const std::string hint =
      is_target ? "`data.missing: skip` (the default: left out of the likelihood) or "
                  "`interpolate`"
                : "`data.missing_inputs: interpolate` to fill interior gaps linearly";
  if (policy == MissingPolicy::error)
    throw InputError(fmt::format(
        "{}: {} column '{}' (column {}) has {} missing value{} ({}); fill them in, or set {}",
        where_row(table, map, missing.front()), role, name, col + 1, missing.size(),
        missing.size() == 1 ? "" : "s", list_rows(table, map, missing), hint));
  if (policy == MissingPolicy::skip) {
    s.fills.push_back(fill);
    return v;
  }
  // Interpolate: only gaps with an observed value on both sides.
  if (missing.front() == 0)
    throw InputError(fmt::format(
        "{}: {} column '{}' starts with a missing value; interpolation only fills gaps between "
        "two observed values, so remove the leading rows or fill them in{}",
        where_row(table, map, 0), role, name, is_target ? " (or use `data.missing: skip`)" : ""));
  if (missing.back() == n - 1)
    throw InputError(fmt::format(
        "{}: {} column '{}' ends with a missing value; interpolation only fills gaps between "
        "two observed values, so remove the trailing rows or fill them in{}",
        where_row(table, map, n - 1), role, name,
        is_target ? " (or use `data.missing: skip`, which forecasts from the last observed "
                    "value)"
                  : ""));
  filled.assign(static_cast<size_t>(n), 0);
  for (size_t i = 0; i < missing.size();) {
    const int lo = missing[i] - 1;  // last observed before the gap
    size_t j = i;
    while (j + 1 < missing.size() && missing[j + 1] == missing[j] + 1) ++j;
    const int hi = missing[j] + 1;  // first observed after the gap
    for (int r = lo + 1; r < hi; ++r) {
      const double w = static_cast<double>(r - lo) / static_cast<double>(hi - lo);
      v[r] = (1.0 - w) * v[lo] + w * v[hi];
      filled[r] = 1;
    }
    s.interpolated += hi - lo - 1;
    fill.interpolated += hi - lo - 1;
    i = j + 1;
  }
  s.fills.push_back(fill);
  return v;
}

// Reads and checks the time column, inserting a row for every missing period of a regular
// calendar (or refusing it with `gaps: error`).
RowMap read_time(const RunConfig& config, const CsvTable& table, int col, SeriesData& s) {
  const auto& name = table.header[col];
  const int n = table.row_count();
  std::vector<std::string> raw(static_cast<size_t>(n));
  std::vector<std::string> where(static_cast<size_t>(n));
  for (int r = 0; r < n; ++r) {
    raw[r] = table.rows[r][col];
    where[r] = table.where(r);
  }
  const auto& fmt_text = config.data.time_format;
  const TimeAnalysis a = analyse_time(raw, fmt_text, name, where, table.source);
  s.time_format = fmt_text;
  s.frequency = a.label();
  s.seasonal_hint = default_seasonal_period(a.frequency);
  for (const auto& c : a.offset_changes) {
    const int moved = c.to_minutes - c.from_minutes;
    s.time_notes.push_back(fmt::format(
        "{}: the offset changes from {:+03d}:{:02d} to {:+03d}:{:02d} at '{}' (a daylight-saving "
        "change: the local clock {} an hour); rows stay aligned by the UTC instant",
        table.where(c.row), c.from_minutes / 60, std::abs(c.from_minutes % 60), c.to_minutes / 60,
        std::abs(c.to_minutes % 60), raw[c.row], moved > 0 ? "skips" : "repeats"));
  }
  RowMap map;
  for (int r = 0; r < n; ++r) {
    for (const auto& g : a.gaps) {
      if (g.before_row != r) continue;
      if (config.data.gaps == GapPolicy::error)
        throw InputError(fmt::format(
            "{}: time column '{}': {} {} period{} missing before '{}' (after '{}'); add the "
            "rows (empty cells are missing values) or set `data.gaps: insert`",
            table.where(r), name, g.count, a.label(), g.count == 1 ? " is" : "s are", raw[r],
            raw[r - 1]));
      SeriesData::InsertedGap ins{static_cast<int>(map.table_row.size()), g.count, ""};
      for (int k = 1; k <= g.count; ++k) {
        map.table_row.push_back(-1);
        map.time.push_back(stamp_of_period(a, k, raw[r - 1], fmt_text));
      }
      ins.first_stamp = map.time[ins.row];
      s.gaps.push_back(ins);
      s.time_notes.push_back(fmt::format(
          "{}: {} missing {} period{} inserted before '{}' (rows {} to {}, 1-based), as missing "
          "values",
          table.where(r), g.count, a.label(), g.count == 1 ? "" : "s", raw[r], ins.row + 1,
          ins.row + g.count));
    }
    map.table_row.push_back(r);
    map.time.push_back(raw[r]);
  }
  return map;
}

// Constant over the observed values (NaN = missing is ignored).
bool is_constant(const std::vector<double>& v) {
  const auto first = std::find_if(v.begin(), v.end(), [](double x) { return !std::isnan(x); });
  return std::all_of(v.begin(), v.end(),
                     [&](double x) { return std::isnan(x) || first == v.end() || x == *first; });
}

double first_observed(const std::vector<double>& v) {
  for (double x : v)
    if (!std::isnan(x)) return x;
  return std::nan("");
}

}  // namespace

std::vector<Warning> missing_warnings(const SeriesData& data) {
  std::vector<Warning> out;
  for (const auto& f : data.fills) {
    if (f.missing == 0) continue;
    const std::string what = f.is_target ? "target" : "input";
    if (f.interpolated == f.missing)
      out.push_back({"missing_interpolated",
                     fmt::format("{} '{}': {} missing value{} filled by linear interpolation{}",
                                 what, f.column, f.missing, f.missing == 1 ? "" : "s",
                                 f.is_target ? " (never scored as observations)" : ""),
                     {{"missing", f.missing}},
                     {{"column", f.column}, {"role", what}}});
    else
      out.push_back({"missing_left_out",
                     fmt::format("{} '{}': {} missing value{} left out of the likelihood (exact "
                                 "likelihood of the {} observed values)",
                                 what, f.column, f.missing, f.missing == 1 ? "" : "s",
                                 data.rows() - f.missing),
                     {{"missing", f.missing}, {"observed", data.rows() - f.missing}},
                     {{"column", f.column}, {"role", what}}});
  }
  for (const auto& g : data.gaps)
    out.push_back({"periods_inserted",
                   fmt::format("{} missing period{} inserted from {} (row {}, 1-based)", g.count,
                               g.count == 1 ? "" : "s", g.first_stamp, g.row + 1),
                   {{"count", g.count}, {"row", g.row + 1}},
                   {{"first_time", g.first_stamp}}});
  for (const auto& n : data.time_notes)
    if (n.find("daylight") != std::string::npos) out.push_back({"daylight_saving", n, {}, {}});
  return out;
}

std::vector<std::string> describe_missing(const SeriesData& data) {
  return warning_texts(missing_warnings(data));
}

void apply_seasonal_default(RunConfig& config, const SeriesData& data) {
  if (!config.differencing_period_from_data && !config.noise_period_from_data) return;
  if (data.seasonal_hint < 2)
    throw InputError(fmt::format(
        "{}: seasonal terms are used without a period, and the data's frequency ({}) suggests "
        "none; set `noise.period` (or `differencing.period`)",
        config.config_file.string(), data.frequency));
  std::string what;
  if (config.differencing_period_from_data) {
    config.differencing.period = data.seasonal_hint;
    what = "differencing.period";
  }
  if (config.noise_period_from_data || config.noise.period < 2) {
    config.noise.period = data.seasonal_hint;
    what += what.empty() ? "noise.period" : " and noise.period";
  }
  config.differencing_period_from_data = config.noise_period_from_data = false;
  config.seasonal_note = fmt::format(
      "{} {} from the {} frequency of the data (not set in the "
      "config)",
      what, data.seasonal_hint, data.frequency);
}

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
        input_lag, needed - kMinSpareRows - config.differencing.lost() - input_lag, kMinSpareRows));
  }
  const auto& bt = config.backtest;
  if (!bt.enabled) return;
  const int first = bt.first_origin > 0 ? bt.first_origin : (2 * n) / 3;
  if (bt.first_origin > 0 && first >= n)
    throw InputError(
        fmt::format("{}: backtest.first_origin: {} is not inside the {} rows of "
                    "series '{}'; choose a row index below {}",
                    cfg, first, n, series.target_name, n));
  const int training =
      bt.window == WindowKind::sliding && bt.window_length > 0 ? bt.window_length : first;
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
    throw InputError(
        fmt::format("{}: backtest.window_length: {} is longer than the {} rows "
                    "before the first origin; shorten it or move the origin later",
                    cfg, bt.window_length, first));
}

SeriesData series_from_table(const RunConfig& config, const CsvTable& table,
                             const std::string& target_column) {
  return series_from_table(config, table, target_column, {});
}

SeriesData series_from_table(const RunConfig& config, const CsvTable& table,
                             const std::string& target_column, const NumericColumns& numbers) {
  if (!numbers.empty() && numbers.size() != table.header.size())
    throw std::invalid_argument("series_from_table: one entry of `numbers` per column");
  const auto numbers_of = [&](int c) {
    return numbers.empty() ? std::span<const double>() : numbers[static_cast<size_t>(c)];
  };
  const auto cfg = config.config_file.string();
  if (table.row_count() == 0)
    throw InputError(fmt::format("{}: the file has a header but no data rows", table.source));
  SeriesData s;
  s.target_name = target_column;
  s.source_file = table.source;
  RowMap map;
  if (!config.data.time.empty()) {
    const int tc = find_column(table, config.data.time, "data.time in " + cfg);
    if (!numbers_of(tc).empty())
      throw std::invalid_argument("series_from_table: the time column is read as text");
    if (config.data.time == target_column)
      throw InputError(
          fmt::format("{}: data.time: '{}' is also the target column; the time "
                      "column only orders the rows",
                      cfg, target_column));
    map = read_time(config, table, tc, s);
    s.time = map.time;
  } else {
    for (int r = 0; r < table.row_count(); ++r) map.table_row.push_back(r);
    map.time.assign(static_cast<size_t>(table.row_count()), "");
    s.time = map.time;
  }

  const int yc = find_column(table, target_column, "the target in " + cfg);
  s.target =
      read_numeric(table, map, yc, true, config.data.missing, s, s.target_filled, numbers_of(yc));
  if (s.fills.empty()) s.fills.push_back({target_column, true, 0, 0});
  if (is_constant(s.target))
    throw InputError(
        fmt::format("{}: target column '{}' is constant (every value is {}); there "
                    "is nothing to model",
                    table.source, target_column, first_observed(s.target)));
  if (config.target.transform.kind != TransformKind::none) {
    for (int r = 0; r < s.rows(); ++r)
      if (!std::isnan(s.target[r]) && !(s.target[r] > 0.0))
        throw InputError(fmt::format(
            "{}: target column '{}': value {} is not positive, so the {} transform is undefined; "
            "use `target.transform: none` or shift the series",
            where_row(table, map, r), target_column, s.target[r],
            to_string(config.target.transform.kind)));
  }

  for (const auto& in : config.inputs) {
    const auto what = fmt::format("input '{}' ({}:{})", in.name, cfg, in.line);
    std::vector<double> values;
    std::vector<unsigned char> filled;
    if (in.is_event) {
      values = event_column(in, s.time, s.rows(), cfg, s.time_format);
    } else {
      if (in.name == config.data.time)
        throw InputError(fmt::format("{}:{}: input '{}' is the time column; it cannot be an input",
                                     cfg, in.line, in.name));
      const int c = find_column(table, in.name, "an input in " + cfg);
      values =
          read_numeric(table, map, c, false, config.data.input_policy(), s, filled, numbers_of(c));
    }
    if (is_constant(values))
      throw InputError(fmt::format(
          "{} is constant (every value is {}) in {}; a constant input cannot be told apart from "
          "the model's constant; remove it {}",
          what, values.front(), table.source,
          in.is_event ? "or move `at` inside the data" : "or check the column"));
    s.add_input(in.name, std::move(values), in.is_event);
    if (!filled.empty()) {
      s.input_filled.resize(s.inputs.size());
      s.input_filled.back() = std::move(filled);
    }
  }
  if (config.differencing_period_from_data || config.noise_period_from_data) {
    RunConfig resolved = config;
    apply_seasonal_default(resolved, s);
    check_feasible(resolved, s);
    return s;
  }
  check_feasible(config, s);
  return s;
}

SeriesData load_series_from_csv(const RunConfig& config, const std::filesystem::path& csv,
                                const std::string& target_column) {
  return series_from_table(config, read_csv(csv), target_column);
}

std::vector<SeriesData> load_series(const RunConfig& config) {
  if (!config.data.series_key.empty())
    throw InputError(fmt::format(
        "{}: data.series_key: a long-format panel (one row per series and time) is run by "
        "`lagsieve search` and checked by `lagsieve validate`; fit, backtest, screen and "
        "revalidate take one of its series with --series NAME",
        config.config_file.string()));
  const CsvTable table = read_csv(config.data.file);
  std::vector<SeriesData> out;
  out.reserve(config.target.columns.size());
  for (const auto& column : config.target.columns)
    out.push_back(series_from_table(config, table, column));
  return out;
}

}  // namespace lagsieve
