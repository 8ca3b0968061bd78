// Loading series from CSV text against a config: values, gaps, events and the error messages.
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>

#include <filesystem>
#include <fstream>
#include <string>

#include "core/error.h"
#include "data/load.h"
#include "io/config.h"
#include "io/csv.h"

namespace lagsieve {
namespace {

// A config with no inputs needs kMinSpareRows + 2 rows (constant and sigma^2); tests that are
// not about length use a longer series built by `rows()`.
RunConfig config(const std::string& extra = "", const std::string& target = "y") {
  return parse_config("data: {file: d.csv, time: t}\ntarget: {column: " + target + "}\n" + extra,
                      "c.yaml");
}

// Header t,y,x then n rows: t = 1..n, y = a sawtooth, x = another.
std::string rows(int n, const std::string& header = "t,y,x") {
  std::string text = header + "\n";
  for (int i = 1; i <= n; ++i)
    text += std::to_string(i) + "," + std::to_string(i % 5) + "," + std::to_string(i % 3) + "\n";
  return text;
}

std::string error_of(const RunConfig& cfg, const std::string& csv) {
  try {
    series_from_table(cfg, parse_csv(csv, "d.csv"), cfg.target.columns.front());
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

TEST(Load, ValuesTimeAndInputs) {
  const auto cfg = config(
      "inputs:\n  - column: x\n  - event: shock\n    shape: ramp\n    at: 18\n"
      "  - event: blip\n    at: 3\n");
  const auto s = series_from_table(cfg, parse_csv(rows(20), "d.csv"), "y");
  EXPECT_EQ(s.target_name, "y");
  EXPECT_EQ(s.source_file, "d.csv");
  ASSERT_EQ(s.rows(), 20);
  EXPECT_EQ(s.target[0], 1.0);
  EXPECT_EQ(s.target[4], 0.0);
  EXPECT_EQ(s.time[19], "20");
  EXPECT_EQ(s.input_names, (std::vector<std::string>{"x", "shock", "blip"}));
  EXPECT_EQ(s.inputs[0][1], 2.0);
  // Ramp from time stamp 18 = row 17; the pulse at time stamp 3 = row 2.
  EXPECT_EQ(s.inputs[1][16], 0.0);
  EXPECT_EQ(s.inputs[1][17], 0.0);
  EXPECT_EQ(s.inputs[1][19], 2.0);
  EXPECT_EQ(s.inputs[2][2], 1.0);
  EXPECT_EQ(s.input_index("blip"), 2);
  EXPECT_EQ(s.interpolated, 0);
}

TEST(Load, InterpolatesInteriorGapsAndCountsThem) {
  const auto cfg = parse_config(
      "data: {file: d.csv, missing: interpolate}\ntarget: {column: y}\ninputs:\n  - column: x\n",
      "c.yaml");
  std::string csv = "y,x\n1,5\n,6\nNA,7\n4,NaN\n5,9\n";
  for (int i = 0; i < 20; ++i) csv += std::to_string(i % 4) + ",1\n";
  const auto s = series_from_table(cfg, parse_csv(csv, "d.csv"), "y");
  EXPECT_EQ(s.interpolated, 3);
  EXPECT_DOUBLE_EQ(s.target[1], 2.0);
  EXPECT_DOUBLE_EQ(s.target[2], 3.0);
  EXPECT_DOUBLE_EQ(s.inputs[0][3], 8.0);
  EXPECT_EQ(s.time[0], "");
  // Filled target values are flagged, so nothing scores them as data.
  ASSERT_EQ(s.target_filled.size(), static_cast<size_t>(s.rows()));
  EXPECT_FALSE(s.observed(1));
  EXPECT_FALSE(s.observed(2));
  EXPECT_TRUE(s.observed(3));
  ASSERT_EQ(s.fills.size(), 2u);
  EXPECT_EQ(s.fills[0].column, "y");
  EXPECT_EQ(s.fills[0].interpolated, 2);
  EXPECT_EQ(s.fills[1].column, "x");
  EXPECT_EQ(s.fills[1].interpolated, 1);
}

TEST(Load, MissingTargetValuesAreSkippedByDefault) {
  const auto cfg = parse_config("data: {file: d.csv}\ntarget: {column: y}\n", "c.yaml");
  std::string csv = "y\n1\nNA\n3\n";
  for (int i = 0; i < 20; ++i) csv += std::to_string(i % 4) + "\n";
  csv += "NA\n";  // a ragged edge: the last value not yet observed
  const auto s = series_from_table(cfg, parse_csv(csv, "d.csv"), "y");
  EXPECT_TRUE(std::isnan(s.target[1]));
  EXPECT_TRUE(std::isnan(s.target.back()));
  EXPECT_EQ(s.target_missing(), 2);
  EXPECT_EQ(s.interpolated, 0);
  ASSERT_EQ(describe_missing(s).size(), 1u);
  EXPECT_EQ(describe_missing(s)[0],
            "target 'y': 2 missing values left out of the likelihood (exact likelihood of the 22 "
            "observed values)");
}

TEST(Load, MissingPeriodsAreInsertedAndReported) {
  const auto cfg = parse_config(
      "data: {file: d.csv, time: t}\ntarget: {column: y}\n"
      "inputs:\n  - event: e\n    at: 2024-03\n",
      "c.yaml");
  std::string csv = "t,y\n";
  for (int m = 1; m <= 12; ++m)
    if (m != 4 && m != 5) csv += fmt::format("2024-{:02d},{}\n", m, m % 3 + m);
  for (int m = 1; m <= 12; ++m) csv += fmt::format("2025-{:02d},{}\n", m, m % 4);
  const auto s = series_from_table(cfg, parse_csv(csv, "d.csv"), "y");
  ASSERT_EQ(s.rows(), 24);
  EXPECT_EQ(s.time[3], "2024-04");
  EXPECT_EQ(s.time[4], "2024-05");
  EXPECT_TRUE(std::isnan(s.target[3]) && std::isnan(s.target[4]));
  EXPECT_EQ(s.target[5], 6 % 3 + 6);
  EXPECT_EQ(s.frequency, "monthly");
  EXPECT_EQ(s.seasonal_hint, 12);
  ASSERT_EQ(s.gaps.size(), 1u);
  EXPECT_EQ(s.gaps[0].row, 3);
  EXPECT_EQ(s.gaps[0].count, 2);
  EXPECT_EQ(s.inputs[0][2], 1.0);  // the event on the calendar, not on the file's lines
  const auto strict = parse_config(
      "data: {file: d.csv, time: t, gaps: error}\n"
      "target: {column: y}\n",
      "c.yaml");
  EXPECT_EQ(error_of(strict, csv),
            "d.csv:5: time column 't': 2 monthly periods are missing before '2024-06' (after "
            "'2024-03'); add the rows (empty cells are missing values) or set `data.gaps: "
            "insert`");
  // An input on an inserted row is missing: an error naming it unless interpolated.
  const auto with_input = parse_config(
      "data: {file: d.csv, time: t}\ntarget: {column: y}\n"
      "inputs:\n  - column: x\n",
      "c.yaml");
  std::string csv2 = "t,y,x\n";
  for (int d = 1; d <= 28; ++d)
    if (d != 10) csv2 += fmt::format("2024-02-{:02d},{},{}\n", d, d % 5, d % 7);
  EXPECT_EQ(error_of(with_input, csv2),
            "d.csv: row inserted for the missing period 2024-02-10: input column 'x' (column 3) "
            "has 1 missing value (inserted 2024-02-10); fill them in, or set "
            "`data.missing_inputs: interpolate` to fill interior gaps linearly");
}

TEST(Load, Messages) {
  const auto cfg = config();
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n2,abc\n"),
            "d.csv:3: target column 'y' (column 2): 'abc' is not a number; use a plain decimal "
            "number (e.g. 12.5 or 1.2e3), or leave the cell empty for a missing value");
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n2,inf\n"),
            "d.csv:3: target column 'y' (column 2): 'inf' is not finite; only finite numbers can "
            "be modelled");
  const auto strict = parse_config(
      "data: {file: d.csv, time: t, missing: error}\n"
      "target: {column: y}\n",
      "c.yaml");
  EXPECT_EQ(error_of(strict, "t,y\n1,2\n2,\n3,4\n"),
            "d.csv:3: target column 'y' (column 2) has 1 missing value (line 3); fill them in, "
            "or set `data.missing: skip` (the default: left out of the likelihood) or "
            "`interpolate`");
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n1,3\n"),
            "d.csv:3: time column 't': time stamp 1 repeats the one on d.csv:2; each time stamp "
            "may appear once");
  EXPECT_EQ(error_of(cfg, "t,y\n2,2\n1,3\n"),
            "d.csv:3: time column 't': time stamp 1 comes before 2 on d.csv:2; sort the rows by "
            "time");
  EXPECT_EQ(error_of(cfg, "t,y\n2024-01-01,2\n2024-01-32,3\n"),
            "d.csv:3: time column 't': '2024-01-32' is not a time stamp (the column begins "
            "'2024-01-01', '2024-01-32'); lagsieve reads 2024-03-01, "
            "2024-03-01T06:30[:00][Z|+01:00], 2024-03, 2024-Q1, 2024Q1, 2024-W09, 2024 and "
            "integers; for anything else set data.time_format (e.g. '%d/%m/%Y')");
  EXPECT_EQ(error_of(config("", "heat"), "t,heta,x\n1,2,3\n"),
            "d.csv: column 'heat' (the target in c.yaml) is not in the header; did you mean "
            "'heta'? columns are: t, heta, x");
  EXPECT_EQ(error_of(config("inputs:\n  - column: x\n"), rows(30, "t,y,z")),
            "d.csv: column 'x' (an input in c.yaml) is not in the header; columns are: t, y, z");
  EXPECT_EQ(error_of(config("inputs:\n  - column: x\n"), "t,y,x\n1,1,4\n2,2,4\n3,1,4\n"),
            "input 'x' (c.yaml:4) is constant (every value is 4) in d.csv; a constant input "
            "cannot be told apart from the model's constant; remove it or check the column");
  EXPECT_EQ(error_of(config("inputs:\n  - event: e\n    shape: step\n    at: 1\n"), rows(30)),
            "input 'e' (c.yaml:4) is constant (every value is 1) in d.csv; a constant input "
            "cannot be told apart from the model's constant; remove it or move `at` inside the "
            "data");
  EXPECT_EQ(error_of(cfg, "t,y\n1,3\n2,3\n"),
            "d.csv: target column 'y' is constant (every value is 3); there is nothing to model");
  const auto log_cfg =
      parse_config("data: {file: d.csv}\ntarget: {column: y, transform: log}\n", "c.yaml");
  EXPECT_EQ(error_of(log_cfg, "y\n3\n0\n"),
            "d.csv:3: target column 'y': value 0 is not positive, so the log transform is "
            "undefined; use `target.transform: none` or shift the series");
  EXPECT_EQ(error_of(cfg, "t,y\n"), "d.csv: the file has a header but no data rows");
}

TEST(Load, GapsAtTheEdgesAreErrorsEvenWhenInterpolating) {
  const auto cfg =
      parse_config("data: {file: d.csv, missing: interpolate}\ntarget: {column: y}\n", "c.yaml");
  EXPECT_EQ(error_of(cfg, "y\nNA\n1\n2\n"),
            "d.csv:2: target column 'y' starts with a missing value; interpolation only fills "
            "gaps between two observed values, so remove the leading rows or fill them in (or use "
            "`data.missing: skip`)");
  EXPECT_EQ(error_of(cfg, "y\n1\n2\n\"\"\n"),
            "d.csv:4: target column 'y' ends with a missing value; interpolation only fills gaps "
            "between two observed values, so remove the trailing rows or fill them in (or use "
            "`data.missing: skip`, which forecasts from the last observed value)");
}

TEST(Load, LengthAgainstTheGrid) {
  // One input with delay up to 4 and numerator up to 2, first differences, ARMA(2, 1):
  // 1 + 6 + (2 constant/sigma^2 + 3 omegas + 1 delta + 3 ARMA) + 10 spare = 26 rows.
  const auto cfg = config(
      "differencing: {regular: 1}\ninputs:\n  - column: x\n    delay: [0, 4]\n"
      "    numerator: [1, 2]\n    denominator: 1\nnoise: {ar: [0, 2], ma: 1}\n");
  EXPECT_EQ(min_rows_needed(cfg), 26);
  EXPECT_EQ(error_of(cfg, rows(26)), "(no error)");
  EXPECT_EQ(error_of(cfg, rows(25)),
            "d.csv: series 'y' has 25 rows, too few for the largest candidate of c.yaml: it "
            "needs at least 26 (differencing uses 1, the longest input lag delay + numerator is "
            "6, the largest model has 9 parameters, and 10 rows must remain); narrow the ranges "
            "or supply more data");
  const auto bt = config("backtest: {first_origin: 40}\n");
  EXPECT_EQ(error_of(bt, rows(40)),
            "c.yaml: backtest.first_origin: 40 is not inside the 40 rows of series 'y'; choose a "
            "row index below 40");
  EXPECT_EQ(error_of(config("backtest: {first_origin: 5}\n"), rows(40)),
            "c.yaml: backtest.first_origin: the first backtest origin trains on 5 rows of series "
            "'y', fewer than the 12 the largest candidate needs; raise it or narrow the ranges");
  EXPECT_EQ(error_of(config("backtest:\n"), rows(40)), "(no error)");  // auto origin: row 26
}

TEST(Load, PanelFromFile) {
  const auto dir = std::filesystem::temp_directory_path() / "lagsieve_test_load";
  std::filesystem::create_directories(dir);
  std::ofstream(dir / "p.csv") << rows(30, "t,a,b");
  std::ofstream(dir / "c.yaml") << "data: {file: p.csv, time: t}\ntarget: {columns: [b, a]}\n";
  const auto cfg = load_config(dir / "c.yaml");
  const auto all = load_series(cfg);
  ASSERT_EQ(all.size(), 2u);
  EXPECT_EQ(all[0].target_name, "b");
  EXPECT_EQ(all[1].target_name, "a");
  EXPECT_EQ(all[0].target[2], 0.0);  // 3 % 3
  EXPECT_EQ(all[1].target[2], 3.0);  // 3 % 5
  EXPECT_EQ(load_series_from_csv(cfg, dir / "p.csv", "a").target, all[1].target);
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve

namespace lagsieve {
namespace {

TEST(LoadEvents, ListsWindowsEventFilesAndTheSeasonalDefault) {
  const auto dir = std::filesystem::temp_directory_path() / "lagsieve_events_test";
  std::filesystem::create_directories(dir);
  std::ofstream(dir / "holidays.csv") << "date,name,to\n2024-01-05,fair,\n2024-01-19,fair,\n"
                                         "2024-01-10,works,2024-01-12\n";
  const auto cfg = parse_config(
      "data: {file: d.csv, time: t}\ntarget: {column: y}\ninputs:\n"
      "  - event: twice\n    at: [2024-01-03, 2024-01-20, 2024-03-01]\n"
      "  - event: window\n    at: {from: 2024-01-07, to: 2024-01-08}\n"
      "events: {file: holidays.csv}\nnoise: {seasonal_ma: 1}\n",
      dir / "c.yaml");
  std::string csv = "t,y\n";
  for (int d = 1; d <= 25; ++d) csv += fmt::format("2024-01-{:02d},{}\n", d, (d * 7) % 5);
  const auto s = series_from_table(cfg, parse_csv(csv, "d.csv"), "y");
  ASSERT_EQ(s.input_names, (std::vector<std::string>{"twice", "window", "fair", "works"}));
  auto rows_set = [&](int i) {
    std::vector<int> out;
    for (int t = 0; t < s.rows(); ++t)
      if (s.inputs[i][t] != 0.0) out.push_back(t);
    return out;
  };
  EXPECT_EQ(rows_set(0), (std::vector<int>{2, 19}));  // the March date is after the data
  EXPECT_EQ(rows_set(1), (std::vector<int>{6, 7}));
  EXPECT_EQ(rows_set(2), (std::vector<int>{4, 18}));
  EXPECT_EQ(rows_set(3), (std::vector<int>{9, 10, 11}));
  // seasonal_ma without a period: 7 from the daily frequency, said in the note.
  RunConfig resolved = cfg;
  apply_seasonal_default(resolved, s);
  EXPECT_EQ(resolved.noise.period, 7);
  EXPECT_EQ(resolved.seasonal_note,
            "noise.period 7 from the daily frequency of the data (not set in the config)");
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
