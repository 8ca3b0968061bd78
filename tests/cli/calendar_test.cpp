// Calendars from the outside world, end to end through the built binary: R's AirPassengers and
// Seatbelts exactly as write.csv exports them (quoted YYYY-MM stamps) fit the same as with an
// integer index and forecast in YYYY-MM; a deleted day fits the same as that day's target
// missing; bad calendars exit 2 naming the line. Data: tests/reference/calendar (script beside).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>
#include <string>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using lagsieve::testing::run_lagsieve;
using lagsieve::testing::slurp;
using nlohmann::json;

fs::path fresh_dir(const std::string& tag) {
  std::random_device rd;
  const fs::path dir = fs::temp_directory_path() / ("lagsieve-cal-" + tag + std::to_string(rd()));
  fs::create_directories(dir);
  return dir;
}

std::string reference(const std::string& name) {
  return std::string(LAGSIEVE_TEST_DATA_DIR) + "/reference/calendar/" + name;
}

// The same CSV with the first (time) column replaced by 1, 2, 3, ...
std::string integer_indexed(const std::string& csv) {
  std::istringstream in(csv);
  std::string line, out;
  std::getline(in, line);
  out = "t" + line.substr(line.find(',')) + "\n";
  for (int i = 1; std::getline(in, line); ++i)
    out += std::to_string(i) + line.substr(line.find(',')) + "\n";
  return out;
}

json fit(const fs::path& dir, const std::string& yaml, const std::string& extra = "") {
  std::ofstream(dir / "cfg.yaml") << yaml;
  const auto run = run_lagsieve(dir, "fit cfg.yaml --json " + extra);
  EXPECT_EQ(run.code, 0) << run.err;
  return run.code == 0 ? json::parse(run.out) : json();
}

void expect_same_fit(const json& a, const json& b) {
  ASSERT_FALSE(a.is_null());
  ASSERT_FALSE(b.is_null());
  EXPECT_EQ(a["n_obs"], b["n_obs"]);
  EXPECT_NEAR(a["loglik"].get<double>(), b["loglik"].get<double>(),
              1e-9 * std::abs(b["loglik"].get<double>()));
  ASSERT_EQ(a["params"].size(), b["params"].size());
  for (size_t i = 0; i < a["params"].size(); ++i)
    EXPECT_NEAR(a["params"][i]["value"].get<double>(), b["params"][i]["value"].get<double>(), 1e-7)
        << a["params"][i]["name"];
}

TEST(CliCalendar, AirPassengersMonthlyStampsFitAsTheIntegerIndexAndForecastInKind) {
  const fs::path dir = fresh_dir("ap");
  const std::string csv = slurp(reference("airpassengers_monthly.csv"));
  std::ofstream(dir / "ym.csv") << csv;
  std::ofstream(dir / "int.csv") << integer_indexed(csv);
  const std::string model =
      "target: {column: passengers, transform: log}\ndifferencing: {regular: 1, seasonal: 1, "
      "period: 12}\nnoise: {ma: 1, seasonal_ma: 1, constant: false}\n";
  const json ym = fit(dir, "data: {file: ym.csv, time: month}\n" + model, "--save m.json");
  const json in = fit(dir, "data: {file: int.csv, time: t}\n" + model);
  expect_same_fit(ym, in);
  const json m = json::parse(slurp(dir / "m.json"));
  EXPECT_EQ(m["training"]["frequency"], "monthly");
  const auto run = run_lagsieve(dir, "forecast m.json --data ym.csv --horizon 3 --json");
  ASSERT_EQ(run.code, 0) << run.err;
  const json f = json::parse(run.out);
  EXPECT_EQ(f["scenarios"][0]["time"], (json{"1961-01", "1961-02", "1961-03"}));
  fs::remove_all(dir);
}

TEST(CliCalendar, SeatbeltsLawAsAMonthStampMatchesTheRowIndex) {
  const fs::path dir = fresh_dir("sb");
  const std::string csv = slurp(reference("seatbelts_monthly.csv"));
  std::ofstream(dir / "ym.csv") << csv;
  std::ofstream(dir / "int.csv") << integer_indexed(csv);
  const std::string model =
      "target: {column: drivers, transform: log}\ndifferencing: {seasonal: 1, period: 12}\n"
      "noise: {ar: 1, seasonal_ma: 1}\ninputs:\n  - event: law\n    shape: step\n    at: ";
  // February 1983 is row 169 (0-based) of a series starting January 1969.
  const json ym = fit(dir, "data: {file: ym.csv, time: month}\n" + model + "1983-02\n");
  const json in = fit(dir, "data: {file: int.csv, time: t}\n" + model + "170\n");
  expect_same_fit(ym, in);
  fs::remove_all(dir);
}

TEST(CliCalendar, FreenyQuarterlyStampsAreRead) {
  const fs::path dir = fresh_dir("fr");
  std::ofstream(dir / "q.csv") << slurp(reference("freeny_quarterly.csv"));
  std::ofstream(dir / "cfg.yaml") << "data: {file: q.csv, time: quarter}\ntarget: {column: y}\n"
                                     "differencing: {regular: 1}\nnoise: {ar: 1}\n";
  const auto run = run_lagsieve(dir, "validate cfg.yaml");
  ASSERT_EQ(run.code, 0) << run.err;
  EXPECT_NE(run.out.find("quarterly"), std::string::npos) << run.out;
  EXPECT_NE(run.out.find("1962Q2 .. 1971Q4"), std::string::npos) << run.out;
  fs::remove_all(dir);
}

// A daily file with one row deleted, and the same file with that day's target left empty: the
// calendar inserts the deleted day as a missing row, so the fits are identical.
TEST(CliCalendar, DeletedDayFitsAsAMissingTarget) {
  const fs::path dir = fresh_dir("day");
  std::mt19937 rng(20240101);
  std::normal_distribution<double> z(0.0, 1.0);
  std::string full = "date,y\n", deleted = "date,y\n", blank = "date,y\n";
  double level = 0.0;
  for (int d = 0; d < 120; ++d) {
    level = 0.6 * level + z(rng);
    const int month = d < 31 ? 1 : d < 60 ? 2 : d < 91 ? 3 : 4;
    const int day = d - (month == 1 ? 0 : month == 2 ? 31 : month == 3 ? 60 : 91) + 1;
    const std::string stamp =
        "2024-0" + std::to_string(month) + "-" + (day < 10 ? "0" : "") + std::to_string(day);
    const std::string value = std::to_string(50.0 + level + (d >= 70 ? 3.0 : 0.0));
    if (d != 44) deleted += stamp + "," + value + "\n";
    blank += stamp + "," + (d == 44 ? "" : value) + "\n";
  }
  std::ofstream(dir / "deleted.csv") << deleted;
  std::ofstream(dir / "blank.csv") << blank;
  const std::string model =
      "target: {column: y}\nnoise: {ar: 1}\ninputs:\n  - event: shift\n"
      "    shape: step\n    at: 2024-03-11\n";
  const json a = fit(dir, "data: {file: deleted.csv, time: date}\n" + model);
  const json b = fit(dir, "data: {file: blank.csv, time: date}\n" + model);
  expect_same_fit(a, b);
  EXPECT_EQ(a["n_obs"].get<int>(), 119);
  // The summary says what was inserted and skipped.
  std::ofstream(dir / "cfg.yaml") << "data: {file: deleted.csv, time: date}\n" + model;
  const auto text = run_lagsieve(dir, "fit cfg.yaml");
  EXPECT_NE(text.out.find("1 missing period inserted from 2024-02-14"), std::string::npos)
      << text.out;
  EXPECT_NE(text.out.find("target 'y': 1 missing value left out of the likelihood"),
            std::string::npos)
      << text.out;
  fs::remove_all(dir);
}

TEST(CliCalendar, BadCalendarsExitTwoNamingTheLine) {
  const fs::path dir = fresh_dir("bad");
  auto error_for = [&](const std::string& csv, const std::string& data_extra = "") {
    std::ofstream(dir / "d.csv") << csv;
    std::ofstream(dir / "cfg.yaml")
        << "data: {file: d.csv, time: t" + data_extra + "}\ntarget: {column: y}\n";
    const auto run = run_lagsieve(dir, "validate cfg.yaml");
    EXPECT_EQ(run.code, 2) << run.out;
    return run.err;
  };
  std::string months = "t,y\n";
  for (int m = 1; m <= 12; ++m)
    months += "2023-" + std::string(m < 10 ? "0" : "") + std::to_string(m) + "," +
              std::to_string(m % 5) + "\n";
  EXPECT_NE(error_for(months + "2024-01,3\n2024-01-15,4\n").find("d.csv:15"), std::string::npos);
  EXPECT_NE(error_for(months + "2024-01,3\n2024-01-15,4\n").find("same month"), std::string::npos);
  EXPECT_NE(error_for(months + "2024-02-01,3\n").find("one form"), std::string::npos);
  EXPECT_NE(error_for("t,y\n01/02/2024,1\n2024-02-02,2\n", ", time_format: '%d/%m/%Y'")
                .find("does not match data.time_format '%d/%m/%Y'"),
            std::string::npos);
  EXPECT_NE(
      error_for("t,y\n2024-01-01,1\n2024-01-08,2\n2024-01-11,3\n2024-01-18,4\n").find("d.csv:4"),
      std::string::npos);
  EXPECT_NE(error_for("t,y\n1,1\n2,2\n4,3\n5,4\n").find("irregular integer index"),
            std::string::npos);
  fs::remove_all(dir);
}

}  // namespace
