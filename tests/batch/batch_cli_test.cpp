// `lagsieve search` and `validate` on a long-format panel, as a user runs them: a bad series is a
// summary row and exit code 5, the others finish into series/<name>/; --series runs a subset;
// validate names every bad series.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <set>

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
    EXPECT_EQ(fs::exists(dir / "run" / "models" / (row[0] + ".json")), !bad) << row[0];
  }
  // One ranking table over every series that was searched, with the series column.
  const CsvTable lb = read_csv(dir / "run" / "ranking.csv");
  EXPECT_EQ(lb.row_count(), 3 * 64);
  EXPECT_TRUE(fs::exists(dir / "run" / "run.json"));
  EXPECT_NE(slurp(dir / "run" / "run.json").find("some_series_failed"), std::string::npos);
  EXPECT_FALSE(fs::exists(dir / ".run.lagsieve-next"));
}

TEST(BatchCli, SearchJsonCountsStatusesNamesTheBadSeriesAndTheFiles) {
  const fs::path dir = panel_folder("json");
  const auto r = run_lagsieve(dir, "search panel.yaml --out run --threads 2 --quiet --json");
  EXPECT_EQ(r.code, 5) << r.err;
  const auto j = nlohmann::json::parse(r.out);  // stdout is the one JSON object
  EXPECT_EQ(j.at("command"), "search");
  EXPECT_EQ(j.at("panel"), true);
  EXPECT_EQ(j.at("exit_code"), 5);
  EXPECT_EQ(j.at("exit_meaning"), "some series failed, the others finished");
  EXPECT_EQ(j.at("ran").at("series"), 5);
  EXPECT_EQ(j.at("ran").at("candidates"), 3 * 64);
  EXPECT_EQ(j.at("by_status").at("ok"), 3);
  EXPECT_EQ(j.at("by_status").at("bad_data"), 2);
  std::set<std::string> bad;
  for (const auto& s : j.at("not_ok")) {
    bad.insert(s.at("series").get<std::string>());
    EXPECT_EQ(s.at("status"), "bad_data");
    EXPECT_FALSE(s.at("reason").get<std::string>().empty());
  }
  EXPECT_EQ(bad, (std::set<std::string>{"dry", "new"}));
  for (const char* f :
       {"run_folder", "summary_csv", "summary_json", "ranking_csv", "models_folder", "report"}) {
    ASSERT_TRUE(j.at("files").at(f).is_string()) << f;
    EXPECT_TRUE(fs::exists(j.at("files").at(f).get<std::string>())) << f;
  }
  EXPECT_EQ(j.at("files").at("model_files"), 3);
  EXPECT_NE(r.err.find("series 'dry' bad_data"), std::string::npos) << r.err;  // people read it
  // A shard says which one it ran.
  const auto s = run_lagsieve(dir, "search panel.yaml --out shard2 --quiet --json --shard 2/2");
  const auto sj = nlohmann::json::parse(s.out);
  EXPECT_EQ(sj.at("ran").at("shard").at("k"), 2);
  EXPECT_EQ(sj.at("ran").at("shard").at("n"), 2);
  EXPECT_TRUE(fs::exists(sj.at("files").at("shard").get<std::string>()));
  // validate --json: every bad series is a problem naming it.
  const auto v = run_lagsieve(dir, "validate panel.yaml --json");
  EXPECT_EQ(v.code, 2);
  const auto vj = nlohmann::json::parse(v.out);
  std::set<std::string> named;
  for (const auto& p : vj.at("problems")) named.insert(p.at("series").get<std::string>());
  EXPECT_EQ(named, (std::set<std::string>{"dry", "new"}));
  EXPECT_EQ(vj.at("series").size(), 3u);
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

// A panel's run folder stays a few files plus models/: one table each for the ranking, the
// forecasts and the backtest accuracy (series column first), a compact journal, and a folder only
// for the series with a report page.
TEST(BatchCli, RunFolderOfAPanelIsAFewLongTablesAndTheModels) {
  const fs::path dir = fs::temp_directory_path() / "lagsieve_batch_cli_layout";
  fs::remove_all(dir);
  fs::create_directories(dir);
  std::ofstream(dir / "panel.csv") << testing::panel_csv(12, 150);
  // The drivers' futures are forecast (with future: known, the default, a search has no future
  // values and a series gets no forecast rows; its summary warning says why).
  std::string config = testing::panel_config(
      "panel.csv",
      "backtest:\n  first_origin: 120\n  step: 10\n  horizon: 3\n  shortlist: 2\n  refit: 0\n"
      "forecast:\n  horizon: 4\n");
  for (const std::string column : {"temp", "rain"}) {
    const std::string at = "  - column: " + column + "\n";
    config.insert(config.find(at) + at.size(), "    future: forecast\n");
  }
  std::ofstream(dir / "panel.yaml") << config;
  const auto r =
      run_lagsieve(dir, "search panel.yaml --out run --quiet --pages-worst 1 --pages-sample 1");
  ASSERT_EQ(r.code, 0) << r.out << r.err;
  std::set<std::string> top;
  for (const auto& e : fs::directory_iterator(dir / "run")) top.insert(e.path().filename().string());
  top.erase("lagsieve.lock");
  EXPECT_EQ(top, (std::set<std::string>{"accuracy.csv", "forecasts.csv", "journal.jsonl",
                                        "ranking.csv", "models", "report.html", "run.json",
                                        "series", "summary.csv", "summary.json"}));
  int models = 0;
  for (const auto& e : fs::directory_iterator(dir / "run" / "models")) {
    (void)e;
    ++models;
  }
  EXPECT_EQ(models, 12);
  int pages = 0;
  const std::string report = slurp(dir / "run" / "report.html");
  for (const auto& e : fs::directory_iterator(dir / "run" / "series")) {
    EXPECT_TRUE(fs::exists(e.path() / "report.html")) << e.path();
    // Every page is linked from the panel report (the worst tables, or the sample).
    EXPECT_NE(report.find("series/" + e.path().filename().string() + "/report.html"),
              std::string::npos)
        << e.path();
    ++pages;
  }
  EXPECT_GE(pages, 1);
  EXPECT_LE(pages, 3);  // worst by score, worst by residuals, one sample
  const CsvTable summary = read_csv(dir / "run" / "summary.csv");
  const int folder = summary.column_index("folder"), model = summary.column_index("model_file");
  int with_folder = 0;
  for (const auto& row : summary.rows) {
    EXPECT_EQ(row[model], "models/" + row[0] + ".json");
    with_folder += row[folder].empty() ? 0 : 1;
  }
  EXPECT_EQ(with_folder, pages);

  const CsvTable forecasts = read_csv(dir / "run" / "forecasts.csv");
  EXPECT_EQ(forecasts.header.front(), "series");
  for (const char* c : {"time", "horizon", "point", "lower_80", "upper_95", "known_lower_95"})
    EXPECT_GE(forecasts.column_index(c), 0) << c;
  EXPECT_EQ(forecasts.row_count(), 12 * 4);
  EXPECT_EQ(forecasts.rows.front()[0], "zone_000");
  EXPECT_EQ(forecasts.rows.back()[0], "zone_011");
  const CsvTable accuracy = read_csv(dir / "run" / "accuracy.csv");
  EXPECT_EQ(accuracy.header.front(), "series");
  EXPECT_GE(accuracy.column_index("mase"), 0);
  EXPECT_GT(accuracy.row_count(), 12);
  const CsvTable ranking = read_csv(dir / "run" / "ranking.csv");
  EXPECT_EQ(ranking.row_count(), 12 * 64);
  EXPECT_EQ(ranking.header.front(), "series");

  // The journal: one line per finished candidate, only the fit's outcome.
  std::ifstream journal(dir / "run" / "journal.jsonl");
  std::string line;
  int lines = 0;
  std::getline(journal, line);  // the header
  while (std::getline(journal, line)) {
    if (line.empty()) continue;
    ++lines;
    const auto j = nlohmann::json::parse(line);
    EXPECT_FALSE(j.contains("noise")) << line;
    EXPECT_FALSE(j.contains("inputs")) << line;
    EXPECT_LT(line.size(), 600u) << line;  // a fit's message is the longest part
  }
  EXPECT_EQ(lines, 12 * 64);

  // Resumed: the same tables, nothing fitted again.
  const std::string first = slurp(dir / "run" / "forecasts.csv");
  const auto again = run_lagsieve(
      dir, "search panel.yaml --out run --quiet --resume --pages-worst 1 --pages-sample 1");
  ASSERT_EQ(again.code, 0) << again.err;
  EXPECT_EQ(slurp(dir / "run" / "forecasts.csv"), first);
  const auto resumed = nlohmann::json::parse(slurp(dir / "run" / "summary.json"));
  for (const auto& row : resumed.at("series")) EXPECT_EQ(row.at("fitted"), 0) << row.dump();
}

// fit, backtest and screen work on one series of a panel: --series names it; without it the
// command says which key makes the file a panel and what to give. forecast reads the model's
// series from a long-format file.
TEST(BatchCli, OneSeriesCommandsTakeTheSeriesOfAPanel) {
  const fs::path dir = panel_folder("one_series");
  auto r = run_lagsieve(dir, "fit panel.yaml");
  EXPECT_EQ(r.code, 2) << r.out << r.err;
  EXPECT_NE(r.err.find("data.series_key 'zone'"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("--series NAME"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("'dry', 'new', 'zone_000'"), std::string::npos) << r.err;
  // One model (fit takes no ranges): temp at b = 1, AR(1); the drivers' futures forecast.
  std::string one = slurp(dir / "panel.yaml");
  for (const auto& [from, to] : std::vector<std::pair<std::string, std::string>>{
           {"delay: [0, 3]", "delay: 1"},
           {"numerator: [0, 1]", "numerator: 0"},
           {"denominator: [0, 1]", "denominator: 0"},
           {"ar: [0, 1]", "ar: 1"},
           {"    optional: true\n", ""},
           {"  - column: temp\n", "  - column: temp\n    future: forecast\n"},
           {"  - column: rain\n", "  - column: rain\n    future: forecast\n"}})
    one.replace(one.find(from), from.size(), to);
  std::ofstream(dir / "one.yaml") << one;
  r = run_lagsieve(dir, "fit one.yaml --series zone_001 --save m1.json");
  EXPECT_EQ(r.code, 0) << r.out << r.err;
  EXPECT_TRUE(fs::exists(dir / "m1.json"));
  r = run_lagsieve(dir, "fit panel.yaml --series dry");
  EXPECT_EQ(r.code, 2) << r.out << r.err;
  EXPECT_NE(r.err.find("series 'dry'"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("constant"), std::string::npos) << r.err;
  r = run_lagsieve(dir, "screen panel.yaml --series zone_002");
  EXPECT_EQ(r.code, 0) << r.out << r.err;
  // A model of the panel run forecasts its own series from the long file.
  r = run_lagsieve(dir, "forecast m1.json --data panel.csv --horizon 3");
  EXPECT_EQ(r.code, 0) << r.out << r.err;
  // The model of a panel run, of its own series: with future: known (panel.yaml) its inputs'
  // future values are asked for, so the series' rows were read.
  ASSERT_EQ(run_lagsieve(dir, "search panel.yaml --out run --quiet --series zone_002").code, 0);
  r = run_lagsieve(dir, "forecast run/models/zone_002.json --data panel.csv --horizon 3");
  EXPECT_EQ(r.code, 2) << r.out << r.err;
  EXPECT_NE(r.err.find("input 'temp' is known in the future"), std::string::npos) << r.err;
}

}  // namespace
}  // namespace lagsieve
