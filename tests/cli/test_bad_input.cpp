// The built binary against malformed configs and data: every case must exit 2, print a message
// that points at the problem, and write nothing.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;

using lagsieve::testing::slurp;
const auto run = lagsieve::testing::run_lagsieve;

// 60 daily rows: a target driven by temperature, a price column, no gaps.
std::string good_csv(int n = 60) {
  std::string text = "date,heat,outdoor_temp,price\n";
  for (int i = 0; i < n; ++i) {
    // A real daily calendar from 2024-01-01 (January 31 days, February 29).
    const int month = i < 31 ? 1 : i < 60 ? 2 : 3;
    const int day = i - (month == 1 ? 0 : month == 2 ? 31 : 60) + 1;
    char date[16];
    std::snprintf(date, sizeof date, "2024-%02d-%02d", month, day);
    text += std::string(date) + "," + std::to_string(100 + (i * 7) % 13) + "," +
            std::to_string(5 + (i * 3) % 11) + "," + std::to_string(20 + i % 4) + "\n";
  }
  return text;
}

const std::string kGoodYaml = R"(data: {file: data.csv, time: date}
target: {column: heat}
inputs:
  - column: outdoor_temp
    delay: [0, 2]
    numerator: [0, 1]
noise: {ar: [0, 1], ma: [0, 1]}
output: {dir: out}
)";

std::string replace(std::string s, const std::string& from, const std::string& to) {
  const auto pos = s.find(from);
  if (pos == std::string::npos) throw std::runtime_error("test setup: '" + from + "' not found");
  return s.replace(pos, from.size(), to);
}

std::string csv_with_cell(int row, int col, const std::string& value) {
  std::stringstream in(good_csv());
  std::string line, out;
  for (int r = 0; std::getline(in, line); ++r) {
    if (r == row) {
      std::vector<std::string> cells;
      std::stringstream ls(line);
      for (std::string c; std::getline(ls, c, ',');) cells.push_back(c);
      cells[col] = value;
      line.clear();
      for (size_t i = 0; i < cells.size(); ++i) {
        if (i > 0) line += ',';
        line += cells[i];
      }
    }
    out += line + "\n";
  }
  return out;
}

// The good data with the last column (price) set to 7 on every row.
std::string csv_with_constant_price() {
  std::stringstream in(good_csv());
  std::string line, out;
  for (int r = 0; std::getline(in, line); ++r) {
    if (r > 0) line = line.substr(0, line.rfind(',')) + ",7";
    out += line;
    out += '\n';
  }
  return out;
}

// The good data with price = 2 outdoor_temp + 1 on every row: collinear with the temperature
// and the constant.
std::string csv_with_price_from_temperature() {
  std::stringstream in(good_csv());
  std::string line, out;
  for (int r = 0; std::getline(in, line); ++r) {
    if (r > 0) {
      std::vector<std::string> cells;
      std::stringstream ls(line);
      for (std::string c; std::getline(ls, c, ',');) cells.push_back(c);
      line = cells[0] + "," + cells[1] + "," + cells[2] + "," +
             std::to_string(2 * std::stoi(cells[2]) + 1);
    }
    out += line + "\n";
  }
  return out;
}

// One model, every order a single value, as `fit` needs.
const std::string kSingleModelYaml = R"(data: {file: data.csv, time: date}
target: {column: heat}
inputs:
  - column: outdoor_temp
  - column: price
noise: {ar: 1}
)";

struct Case {
  std::string name;
  std::string command;   // the subcommand run on cfg.yaml
  std::string yaml;      // written as cfg.yaml
  std::string csv;       // written as data.csv unless `no_csv`
  std::string expected;  // fragment of stderr
  bool no_csv = false;
};

std::vector<Case> cases() {
  const std::string y = kGoodYaml;
  const std::string c = good_csv();
  return {
      {"missing_data_file", "validate", y, "", "data file '", true},
      {"ragged_row", "validate", y, replace(c, "2024-01-03,", "2024-01-03,1,"),
       "data.csv:4: row has 5 cells but the header has 4 columns"},
      {"non_numeric_cell", "validate", y, csv_with_cell(5, 2, "warm"),
       "data.csv:6: input column 'outdoor_temp' (column 3): 'warm' is not a number"},
      {"non_finite_cell", "validate", y, csv_with_cell(5, 1, "inf"),
       "data.csv:6: target column 'heat' (column 2): 'inf' is not finite"},
      {"duplicate_time", "validate", y, csv_with_cell(3, 0, "2024-01-02"),
       "data.csv:4: time column 'date': time stamp 2024-01-02 repeats the one on data.csv:3"},
      {"unsorted_time", "validate", y, csv_with_cell(3, 0, "2023-12-31"),
       "time stamp 2023-12-31 comes before 2024-01-02 on data.csv:3; sort the rows by time"},
      {"bad_time_stamp", "validate", y, csv_with_cell(3, 0, "03/01/2024"),
       "data.csv:4: time column 'date': '03/01/2024' is not a time stamp"},
      {"absent_column", "validate", replace(y, "column: outdoor_temp", "column: outdoor_tmp"), c,
       "column 'outdoor_tmp' (an input in cfg.yaml) is not in the header; did you mean "
       "'outdoor_temp'?"},
      {"missing_value_error", "validate", replace(y, "time: date}", "time: date, missing: error}"),
       csv_with_cell(10, 1, ""),
       "data.csv:11: target column 'heat' (column 2) has 1 missing value (line 11); fill them in, "
       "or set `data.missing: skip`"},
      {"leading_gap_interpolate", "validate",
       replace(y, "time: date}", "time: date, missing: interpolate}"), csv_with_cell(1, 2, "NA"),
       "data.csv:2: input column 'outdoor_temp' starts with a missing value"},
      {"unknown_key", "validate", replace(y, "delay:", "dealy:"), c,
       "cfg.yaml:5: inputs[0].dealy: unknown key; did you mean `delay`?"},
      {"unknown_section", "validate", y + "serach: {budget: 10}\n", c,
       "cfg.yaml:9: serach: unknown key; did you mean `search`?"},
      {"wrong_type_with_line", "validate", replace(y, "delay: [0, 2]", "delay: two"), c,
       "cfg.yaml:5: inputs[0].delay: expected an integer or a range [min, max], got 'two'"},
      {"min_greater_than_max", "validate", replace(y, "numerator: [0, 1]", "numerator: [2, 1]"), c,
       "cfg.yaml:6: inputs[0].numerator: range [2, 1] has min > max"},
      {"negative_delay", "validate", replace(y, "delay: [0, 2]", "delay: -2"), c,
       "cfg.yaml:5: inputs[0].delay: must be at least 0, got -2"},
      {"unknown_enum_value", "validate",
       replace(y, "noise:", "  - event: tariff\n    shape: stpe\n    at: 2024-02-01\nnoise:"), c,
       "cfg.yaml:8: inputs[1].shape: unknown value 'stpe'; did you mean 'step'?"},
      {"constant_input", "validate", replace(y, "column: outdoor_temp", "column: price"),
       csv_with_constant_price(), "input 'price' (cfg.yaml:4) is constant (every value is 7) in"},
      {"boxcox_without_positive_data", "validate",
       replace(y, "{column: heat}", "{column: heat, transform: boxcox, lambda: 0.5}"),
       csv_with_cell(7, 1, "-4"),
       "data.csv:8: target column 'heat': value -4 is not positive, so the boxcox transform is "
       "undefined"},
      {"too_short_for_the_lags", "validate", replace(y, "delay: [0, 2]", "delay: [0, 50]"), c,
       "series 'heat' has 60 rows, too few for the largest candidate"},
      {"levels_out_of_range", "validate", y + "backtest: {levels: [0.8, 1.5]}\n", c,
       "cfg.yaml:9: backtest.levels: level 1.5 is outside (0, 1)"},
      {"seasonal_period_one", "validate", y + "differencing: {seasonal: 1, period: 1}\n", c,
       "cfg.yaml:9: differencing.period: a seasonal difference needs `period` of at least 2"},
      {"event_after_the_data", "validate",
       replace(y, "noise:", "  - event: tariff\n    shape: step\n    at: 2025-01-01\nnoise:"), c,
       "cfg.yaml:7: event 'tariff': `at: 2025-01-01` is after the last time stamp"},
      {"yaml_syntax", "validate", replace(y, "{column: heat}", "{column: heat"), c,
       "cfg.yaml:3: YAML syntax error"},
      {"missing_target_section", "validate", replace(y, "target: {column: heat}\n", ""), c,
       "cfg.yaml:1: missing section `target`"},
      {"empty_data_file", "validate", y, "", "data.csv: the file is empty"},
      {"first_origin_beyond_data", "validate", y + "backtest: {first_origin: 60}\n", c,
       "backtest.first_origin: 60 is not inside the 60 rows of series 'heat'"},
      // The same checks guard the commands that do work.
      {"fit_missing_data_file", "fit", y, "", "data file '", true},
      {"fit_ragged_row", "fit", y, replace(c, "2024-01-03,", "2024-01-03,1,"),
       "data.csv:4: row has 5 cells but the header has 4 columns"},
      {"fit_unknown_key", "fit", replace(y, "delay:", "dealy:"), c,
       "cfg.yaml:5: inputs[0].dealy: unknown key; did you mean `delay`?"},
      {"fit_collinear_inputs", "fit", kSingleModelYaml, csv_with_price_from_temperature(),
       "input 'price' is (nearly) a linear combination of the constant, input 'outdoor_temp' over "
       "the estimation sample"},
  };
}

// gtest prints the case by name instead of its bytes.
void PrintTo(const Case& k, std::ostream* os) { *os << k.name; }

class BadInput : public ::testing::TestWithParam<Case> {};

TEST_P(BadInput, ExitsTwoWithAMessageAndWritesNothing) {
  const Case& k = GetParam();
  const auto dir = fs::temp_directory_path() / "lagsieve_cli_bad_input" / k.name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  std::ofstream(dir / "cfg.yaml") << k.yaml;
  if (!k.no_csv) std::ofstream(dir / "data.csv") << k.csv;

  const auto r = run(dir, k.command + " cfg.yaml");
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("lagsieve: error: "), std::string::npos) << r.err;
  EXPECT_NE(r.err.find(k.expected), std::string::npos)
      << "expected fragment: " << k.expected << "\nstderr: " << r.err;
  EXPECT_FALSE(fs::exists(dir / "out")) << "the output folder was created";
  fs::remove_all(dir);
}

INSTANTIATE_TEST_SUITE_P(Table, BadInput, ::testing::ValuesIn(cases()),
                         [](const auto& p) { return p.param.name; });

TEST(Cli, GoodConfigValidates) {
  const auto dir = fs::temp_directory_path() / "lagsieve_cli_good";
  fs::remove_all(dir);
  fs::create_directories(dir);
  std::ofstream(dir / "cfg.yaml") << kGoodYaml;
  std::ofstream(dir / "data.csv") << good_csv();
  const auto r = run(dir, "validate cfg.yaml");
  EXPECT_EQ(r.code, 0) << r.err;
  EXPECT_EQ(r.err, "");
  EXPECT_NE(r.out.find("series     heat (60 rows; target: 0 missing, 0 interpolated; inputs: 0 "
                       "missing, 0 interpolated)"),
            std::string::npos)
      << r.out;
  // 3 delays x 2 numerators, 2 x 2 ARMA orders, constant in or out.
  EXPECT_NE(r.out.find("grid       48 candidate models"), std::string::npos) << r.out;
  EXPECT_FALSE(fs::exists(dir / "out"));
  fs::remove_all(dir);
}

TEST(Cli, MissingConfigHelpAndVersion) {
  const auto dir = fs::temp_directory_path();
  auto r = run(dir, "validate /nonexistent/cfg.yaml");
  EXPECT_EQ(r.code, 2);
  EXPECT_EQ(r.err,
            "lagsieve: error: config file '/nonexistent/cfg.yaml' does not exist; check the "
            "path\n");
  r = run(dir, "--version");
  EXPECT_EQ(r.code, 0);
  EXPECT_EQ(r.out.rfind("lagsieve ", 0), 0u) << r.out;
  r = run(dir, "--help");
  EXPECT_EQ(r.code, 0);
  for (const char* cmd : {"validate", "fit", "forecast", "screen", "search", "backtest",
                          "revalidate", "report", "simulate"})
    EXPECT_NE(r.out.find(cmd), std::string::npos) << cmd;
  r = run(dir, "validate --help");
  EXPECT_EQ(r.code, 0);
  EXPECT_NE(r.out.find("CONFIG"), std::string::npos);
  r = run(dir, "validate cfg.yaml --no-such-option");
  EXPECT_EQ(r.code, 2);
  r = run(dir, "");
  EXPECT_EQ(r.code, 2);  // a command is required
}

}  // namespace
