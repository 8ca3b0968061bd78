// Loading series from CSV text against a config: values, gaps, events and the error messages.
#include <gtest/gtest.h>

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
}

TEST(Load, Messages) {
  const auto cfg = config();
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n2,abc\n"),
            "d.csv:3: target column 'y' (column 2): 'abc' is not a number; use a plain decimal "
            "number (e.g. 12.5 or 1.2e3), or leave the cell empty for a missing value");
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n2,inf\n"),
            "d.csv:3: target column 'y' (column 2): 'inf' is not finite; only finite numbers can "
            "be modelled");
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n2,\n3,4\n"),
            "d.csv:3: target column 'y' (column 2) has a missing value; fill it in, or set "
            "`data.missing: interpolate` to fill interior gaps linearly");
  EXPECT_EQ(error_of(cfg, "t,y\n1,2\n1,3\n"),
            "d.csv:3: time column 't': time stamp 1 repeats the one on line 2; each time stamp "
            "may appear once");
  EXPECT_EQ(error_of(cfg, "t,y\n2,2\n1,3\n"),
            "d.csv:3: time column 't': time stamp 1 comes before 2 on line 2; sort the rows by "
            "time");
  EXPECT_EQ(error_of(cfg, "t,y\n2024-01-01,2\n2024-01-32,3\n"),
            "d.csv:3: time column 't': '2024-01-32' is not a time stamp; write YYYY-MM-DD, "
            "YYYY-MM-DD HH:MM[:SS] or an integer");
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
  const auto cfg = parse_config("data: {file: d.csv, missing: interpolate}\ntarget: {column: y}\n",
                                "c.yaml");
  EXPECT_EQ(error_of(cfg, "y\nNA\n1\n2\n"),
            "d.csv:2: target column 'y' starts with a missing value; interpolation only fills "
            "gaps between two observed values, so remove the leading rows or fill them in");
  EXPECT_EQ(error_of(cfg, "y\n1\n2\n\"\"\n"),
            "d.csv:4: target column 'y' ends with a missing value; interpolation only fills gaps "
            "between two observed values, so remove the trailing rows or fill them in");
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
