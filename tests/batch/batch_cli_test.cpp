// `lagsieve search` and `validate` on a long-format panel, as a user runs them: a bad series is a
// summary row and exit code 5, the others finish into series/<name>/; --series runs a subset;
// validate names every bad series.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include <nlohmann/json.hpp>

#include "io/csv.h"
#include "model/simulate.h"
#include "panel_util.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using testing::run_lagsieve;
using testing::slurp;

fs::path panel_folder(const std::string& name) {
  const fs::path dir = fs::temp_directory_path() / ("lagsieve_batch_cli_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  std::string csv = testing::panel_csv(3, 130);
  const auto days = simulated_stamps("2022-03-01", SimulatedFrequency::daily, 100);
  for (int t = 0; t < 100; ++t)  // rain is constant in this series
    csv += fmt::format("dry,{},{},{},0\n", days[t], 20 + t % 9, t % 5);
  for (int t = 0; t < 10; ++t)  // too short
    csv += fmt::format("new,{},{},{},{}\n", days[t], 5 + t % 3, t % 4, t % 2);
  std::ofstream(dir / "panel.csv") << csv;
  std::ofstream(dir / "panel.yaml") << testing::panel_config("panel.csv");
  return dir;
}

TEST(BatchCli, BadSeriesAreReportedTheOthersFinishAndTheExitCodeSaysSo) {
  const fs::path dir = panel_folder("search");
  const auto r = run_lagsieve(dir, "search panel.yaml --out run --threads 2 --quiet");
  EXPECT_EQ(r.code, 5) << r.out << r.err;
  EXPECT_NE(r.err.find("series 'dry' bad_data"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("series 'new' bad_data"), std::string::npos) << r.err;
  EXPECT_NE(r.out.find("5 series: 3 ok"), std::string::npos) << r.out;
  const CsvTable summary = read_csv(dir / "run" / "summary.csv");
  ASSERT_EQ(summary.row_count(), 5);
  const int status = summary.column_index("status");
  const int reason = summary.column_index("reason");
  for (const auto& row : summary.rows) {
    const bool bad = row[0] == "dry" || row[0] == "new";
    EXPECT_EQ(row[status], bad ? "bad_data" : "ok") << row[0];
    EXPECT_EQ(row[reason].empty(), !bad) << row[0] << ": " << row[reason];
    EXPECT_EQ(fs::exists(dir / "run" / "series" / row[0] / "model.json"), !bad) << row[0];
  }
  // One ranking table over every series that was searched, with the series column.
  const CsvTable lb = read_csv(dir / "run" / "leaderboard.csv");
  EXPECT_EQ(lb.row_count(), 3 * 64);
  EXPECT_TRUE(fs::exists(dir / "run" / "run.json"));
  EXPECT_NE(slurp(dir / "run" / "run.json").find("some_series_failed"), std::string::npos);
  EXPECT_FALSE(fs::exists(dir / ".run.lagsieve-next"));
}

TEST(BatchCli, SeriesOptionRunsOnlyTheNamedSeries) {
  const fs::path dir = panel_folder("only");
  const auto r =
      run_lagsieve(dir, "search panel.yaml --out run --quiet --series zone_002 --series zone_000");
  EXPECT_EQ(r.code, 0) << r.out << r.err;
  const CsvTable summary = read_csv(dir / "run" / "summary.csv");
  ASSERT_EQ(summary.row_count(), 2);
  EXPECT_EQ(summary.rows[0][0], "zone_000");
  EXPECT_EQ(summary.rows[1][0], "zone_002");
  // Resumed: every candidate comes from the run's journal, for each series.
  const auto again = run_lagsieve(
      dir, "search panel.yaml --out run --quiet --resume --series zone_002 --series zone_000");
  EXPECT_EQ(again.code, 0) << again.err;
  const auto resumed = nlohmann::json::parse(slurp(dir / "run" / "summary.json"));
  for (const auto& row : resumed.at("series")) {
    EXPECT_EQ(row.at("fitted"), 0) << row.dump();
    EXPECT_EQ(row.at("resumed"), 64) << row.dump();
  }
  const auto unknown = run_lagsieve(dir, "search panel.yaml --out run2 --quiet --series zone_9");
  EXPECT_EQ(unknown.code, 2);
  EXPECT_NE(unknown.err.find("--series 'zone_9'"), std::string::npos) << unknown.err;
  EXPECT_FALSE(fs::exists(dir / "run2"));
}

TEST(BatchCli, ValidateReportsEveryBadSeries) {
  const fs::path dir = panel_folder("validate");
  const auto r = run_lagsieve(dir, "validate panel.yaml");
  EXPECT_EQ(r.code, 2) << r.out << r.err;
  EXPECT_NE(r.out.find("bad        dry:"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("bad        new:"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("series     zone_001 (130 rows"), std::string::npos) << r.out;
  EXPECT_NE(r.err.find("2 of 5 series"), std::string::npos) << r.err;
  const auto subset = run_lagsieve(dir, "validate panel.yaml --series zone_001");
  EXPECT_EQ(subset.code, 0) << subset.out << subset.err;
}

}  // namespace
}  // namespace lagsieve
