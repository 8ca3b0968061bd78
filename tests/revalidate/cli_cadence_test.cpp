// The built binary on R's Seatbelts exactly as write.csv exports it (quoted YYYY-MM stamps), as a
// monthly re-check would use it: trained on 1969-01 to 1982-12, then re-validated with 3 new
// months (a verdict, not an error), with a rolling extract that starts in 1975 (lined up with the
// training rows the model file holds), and with a revised value in that extract (exit 2, the row,
// stamp and values named).
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "fixture.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using lagsieve::testing::run_lagsieve;
using lagsieve::testing::slurp;

// The header and rows [from, to) (1-based data rows from + 1 .. to) of a CSV text.
std::string rows_of(const std::string& csv, int from, int to) {
  std::istringstream in(csv);
  std::string line, out;
  std::getline(in, line);
  out = line + "\n";
  for (int r = 0; std::getline(in, line); ++r)
    if (r >= from && r < to) out += line + "\n";
  return out;
}

std::string config(const std::string& csv, const std::string& out) {
  return "data: {file: " + csv +
         ", time: month}\n"
         "target: {column: drivers, transform: log}\n"
         "differencing: {seasonal: 1}\n"
         "inputs:\n"
         "  - event: law\n"
         "    shape: step\n"
         "    at: 1983-02\n"
         "  - column: PetrolPrice\n"
         "    delay: [0, 1]\n"
         "noise: {ar: [0, 1], seasonal_ma: [1, 1]}\n"
         "search: {threads: 1}\n"
         "backtest: {horizon: 3, refit: 0, shortlist: 2}\n"
         "output: {dir: " +
         out + "}\n";
}

TEST(RevalidateSeatbelts, ThreeNewMonthsARollingExtractAndARevisedValue) {
  ASSERT_TRUE(fs::exists(LAGSIEVE_BINARY)) << "build the lagsieve target before test_revalidate";
  const fs::path dir =
      fs::temp_directory_path() / ("lagsieve_cadence_" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  const std::string csv =
      slurp(fs::path(LAGSIEVE_TEST_DATA_DIR) / "reference/calendar/seatbelts_monthly.csv");
  // 1969-01 .. 1983-12 is rows 1..180; the law (1983-02) is row 170.
  std::ofstream(dir / "train.csv") << rows_of(csv, 0, 180);
  std::ofstream(dir / "three.csv") << rows_of(csv, 0, 183);
  std::ofstream(dir / "rolling.csv") << rows_of(csv, 72, 186);  // 1975-01 .. 1984-06
  std::string revised = rows_of(csv, 72, 186);
  const std::string row_1980_03 = "\"1980-03\",";
  const auto at = revised.find(row_1980_03);
  ASSERT_NE(at, std::string::npos);
  // "1980-03",DriversKilled,drivers,...: replace the drivers value.
  const auto first_comma = revised.find(',', at + row_1980_03.size());
  const auto second_comma = revised.find(',', first_comma + 1);
  const std::string old_drivers = revised.substr(first_comma + 1, second_comma - first_comma - 1);
  revised.replace(first_comma + 1, second_comma - first_comma - 1, "1999");
  std::ofstream(dir / "revised.csv") << revised;
  for (const char* name : {"train", "three", "rolling", "revised"})
    std::ofstream(dir / (std::string(name) + ".yaml"))
        << config(std::string(name) + ".csv", std::string(name) + "_run");

  const auto search = run_lagsieve(dir, "search train.yaml --quiet");
  ASSERT_EQ(search.code, 0) << search.err;
  const fs::path model = dir / "train_run" / "model.json";
  ASSERT_TRUE(fs::exists(model));
  const auto doc = nlohmann::json::parse(slurp(model));
  ASSERT_TRUE(doc["training"].contains("data"));
  EXPECT_EQ(doc["training"]["data"]["time"].size(), 180u);
  EXPECT_EQ(doc["training"]["data"]["time"][179], "1983-12");

  const auto three =
      run_lagsieve(dir, "revalidate train_run/model.json three.yaml --out three_out --quiet");
  EXPECT_TRUE(three.code == 0 || three.code == 10 || three.code == 11) << three.code << three.err;
  EXPECT_NE(three.out.find("Verdict: "), std::string::npos) << three.out;
  EXPECT_NE(three.out.find("the evidence is thin: 3 new one-step errors"), std::string::npos)
      << three.out;
  EXPECT_EQ(three.out.find("nan"), std::string::npos) << three.out;
  const auto j3 = nlohmann::json::parse(slurp(dir / "three_out" / "revalidation.json"));
  EXPECT_EQ(j3["history"]["new_rows"], 3);
  EXPECT_EQ(j3["new_period"]["time"], (nlohmann::json{"1984-01", "1984-02", "1984-03"}));
  EXPECT_TRUE(fs::exists(dir / "three_out" / "report.html"));

  // The minimum from the CLI: 4 new rows asked, 3 given.
  const auto too_few = run_lagsieve(
      dir, "revalidate train_run/model.json three.yaml --out few_out --quiet --min-new-rows 4");
  EXPECT_EQ(too_few.code, 2);
  EXPECT_NE(too_few.err.find("needs at least 4 new observed target values after them and found 3"),
            std::string::npos)
      << too_few.err;

  const auto rolling =
      run_lagsieve(dir, "revalidate train_run/model.json rolling.yaml --out rolling_out --quiet");
  EXPECT_TRUE(rolling.code == 0 || rolling.code == 10 || rolling.code == 11)
      << rolling.code << rolling.err;
  const auto jr = nlohmann::json::parse(slurp(dir / "rolling_out" / "revalidation.json"));
  EXPECT_EQ(jr["history"]["training_rows_prepended"], 72);
  EXPECT_EQ(jr["history"]["first_training_row_in_file"], 73);
  EXPECT_EQ(jr["history"]["overlap_rows"], 108);
  EXPECT_EQ(jr["history"]["new_rows"], 6);
  EXPECT_EQ(jr["history"]["history_revised"], false);

  const auto refused =
      run_lagsieve(dir, "revalidate train_run/model.json revised.yaml --out revised_out --quiet");
  EXPECT_EQ(refused.code, 2);
  // 1980-03 is row 135 of the series, row 63 of the extract.
  EXPECT_NE(refused.err.find("a training value was revised: row 63 of revised.csv"
                             " (training row 135, 1980-03): 'drivers' was " +
                             old_drivers + " when the model was trained, 1999 now"),
            std::string::npos)
      << refused.err;
  EXPECT_FALSE(fs::exists(dir / "revised_out" / "revalidation.json"));
  fs::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
