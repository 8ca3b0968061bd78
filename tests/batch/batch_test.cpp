// Runs of many series from one long-format file: splitting by key, isolation of bad series,
// structure recovery over a seeded panel of 200 series, and identical results on 1 and 2 threads.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>

#include "batch/batch.h"
#include "core/error.h"
#include "io/config.h"
#include "io/csv.h"
#include "panel_util.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using testing::panel_config;
using testing::panel_csv;
using testing::panel_truth;

fs::path fresh_dir(const std::string& name) {
  const fs::path dir = fs::temp_directory_path() / ("lagsieve_batch_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

void write_text(const fs::path& file, const std::string& text) {
  std::ofstream(file, std::ios::binary) << text;
}

RunConfig panel_run(const fs::path& dir, const std::string& csv, const std::string& extra = "") {
  write_text(dir / "panel.csv", csv);
  write_text(dir / "panel.yaml", panel_config("panel.csv", extra));
  return load_config(dir / "panel.yaml");
}

// The summary table without its timing column (the last one), which differs between runs.
std::string without_seconds(const std::string& csv) {
  std::string out;
  size_t pos = 0;
  while (pos < csv.size()) {
    const size_t eol = csv.find('\n', pos);
    const std::string line = csv.substr(pos, eol - pos);
    out += line.substr(0, line.rfind(',')) + "\n";
    pos = eol + 1;
  }
  return out;
}

TEST(PanelSplit, GroupsInterleavedRowsBySortedKeyKeepingFileLines) {
  const CsvTable table = parse_csv("k,t,y\nb,1,10\na,1,20\nb,2,11\na,2,21\n", "p.csv");
  auto parts = split_by_key(CsvTable(table), "k", "data.series_key");
  ASSERT_EQ(parts.size(), 2u);
  EXPECT_EQ(parts[0].key, "a");
  EXPECT_EQ(parts[1].key, "b");
  ASSERT_EQ(parts[1].table.row_count(), 2);
  EXPECT_EQ(parts[1].table.rows[1][2], "11");
  EXPECT_EQ(parts[1].table.lines, (std::vector<int>{2, 4}));  // the file's own lines
  EXPECT_EQ(parts[0].table.where(1), "p.csv:5");
}

TEST(PanelSplit, EmptyKeyAndMissingColumnAreNamed) {
  try {
    split_by_key(parse_csv("k,t,y\na,1,1\n,2,2\n", "p.csv"), "k", "data.series_key");
    FAIL() << "an empty key was accepted";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("p.csv:3"), std::string::npos) << e.what();
  }
  try {
    split_by_key(parse_csv("zone,t,y\na,1,1\n", "p.csv"), "zones", "data.series_key");
    FAIL() << "a missing key column was accepted";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("did you mean 'zone'"), std::string::npos) << e.what();
  }
}

TEST(PanelSplit, SafeNamesKeepPlainKeysAndNeverCollide) {
  EXPECT_EQ(safe_series_name("zone_001"), "zone_001");
  EXPECT_EQ(safe_series_name("Store-7.a"), "Store-7.a");
  const std::string slash = safe_series_name("north/east");
  EXPECT_EQ(slash.find('/'), std::string::npos);
  EXPECT_NE(slash, safe_series_name("north_east"));
  EXPECT_NE(safe_series_name("a b"), safe_series_name("a?b"));
  EXPECT_NE(safe_series_name(".."), "..");
  EXPECT_NE(safe_series_name(".hidden").front(), '.');
  EXPECT_LE(safe_series_name(std::string(300, 'x')).size(), 100u);
}

// The panel's truth varies (b, r, s) of temp over 16 combinations; rain has no effect. The
// chosen model of at least 95 % of 200 series must carry temp's true (b, r, s) and leave rain out
// (BIC is consistent; at 365 daily rows with these gains a miss is rare, a broken search misses
// most).
TEST(BatchRecovery, ChosenStructureRightForAtLeast95PercentOf200Series) {
  constexpr int kSeries = 200;
  const fs::path dir = fresh_dir("recovery");
  const RunConfig config = panel_run(dir, panel_csv(kSeries, 365));
  BatchOptions options;
  options.backtest = false;
  const BatchResult r = run_batch(config, load_panel(config, {}), options);
  ASSERT_EQ(r.series.size(), static_cast<size_t>(kSeries));
  int right = 0;
  for (int i = 0; i < kSeries; ++i) {
    const auto& s = r.series[i];
    const auto truth = panel_truth(i);
    ASSERT_EQ(s.series, truth.key);
    ASSERT_EQ(s.status, SeriesStatus::ok) << s.reason;
    ASSERT_EQ(s.inputs.size(), 2u);
    const auto& temp = s.inputs[0];
    right +=
        temp.included && temp.delay == truth.temp.delay && temp.numerator == truth.temp.numerator &&
                temp.denominator == truth.temp.denominator && !s.inputs[1].included
            ? 1
            : (std::printf("miss %s truth b%d s%d r%d: %s\n", truth.key.c_str(), truth.temp.delay,
                           truth.temp.numerator, truth.temp.denominator, s.chosen.c_str()),
               0);
  }
  const double rate = static_cast<double>(right) / kSeries;
  std::printf("structure recovered for %d of %d series (%.1f %%)\n", right, kSeries, 100 * rate);
  EXPECT_GE(rate, 0.95);
}

TEST(BatchIsolation, BadSeriesAreRowsWithReasonsAndTheOthersFinish) {
  const fs::path dir = fresh_dir("isolation");
  // A series whose temp is constant, and one too short for the grid.
  std::string csv = panel_csv(4, 150);
  const auto days = simulated_stamps("2022-01-01", SimulatedFrequency::daily, 120);
  for (int t = 0; t < 120; ++t) csv += fmt::format("flat,{},{},5,{}\n", days[t], 10 + t % 7, t % 3);
  for (int t = 0; t < 12; ++t)
    csv += fmt::format("short,2022-01-{:02d},{},{},{}\n", 1 + t, 10 + t % 5, t % 4, t % 3);
  const RunConfig config = panel_run(dir, csv);
  BatchOptions options;
  options.backtest = false;
  options.threads = 2;
  options.folder = dir / "run";
  const BatchResult r = run_batch(config, load_panel(config, {}), options);
  ASSERT_EQ(r.series.size(), 6u);
  EXPECT_EQ(r.count(SeriesStatus::ok), 4);
  EXPECT_EQ(r.count(SeriesStatus::bad_data), 2);
  for (const auto& s : r.series) {
    if (s.series == "flat") {
      EXPECT_EQ(s.status, SeriesStatus::bad_data);
      EXPECT_NE(s.reason.find("constant"), std::string::npos) << s.reason;
      EXPECT_NE(s.reason.find("temp"), std::string::npos) << s.reason;
    } else if (s.series == "short") {
      EXPECT_EQ(s.status, SeriesStatus::bad_data);
      EXPECT_NE(s.reason.find("too few"), std::string::npos) << s.reason;
    } else {
      EXPECT_EQ(s.status, SeriesStatus::ok) << s.reason;
      EXPECT_EQ(s.model, "models/" + s.series + ".json");
      EXPECT_TRUE(fs::exists(options.folder / s.model)) << s.model;
    }
  }
  // check_panel (validate) reports both bad series, not only the first.
  const auto checked = check_panel(config, load_panel(config, {}));
  int bad = 0;
  for (const auto& s : checked) bad += s.status == SeriesStatus::bad_data ? 1 : 0;
  EXPECT_EQ(bad, 2);
}

TEST(BatchSelection, OnlyTheNamedSeriesRunAndUnknownNamesAreRefused) {
  const fs::path dir = fresh_dir("only");
  const RunConfig config = panel_run(dir, panel_csv(5, 120));
  const auto parts = load_panel(config, {"zone_003", "zone_001"});
  ASSERT_EQ(parts.size(), 2u);
  EXPECT_EQ(parts[0].key, "zone_001");
  EXPECT_EQ(parts[1].key, "zone_003");
  try {
    load_panel(config, {"zone_01"});
    FAIL() << "an unknown series was accepted";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("--series 'zone_01'"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("did you mean"), std::string::npos) << e.what();
  }
}

// Series and candidates share the workers; the summary, each series' ranking and backtest do
// not depend on how many there are.
TEST(BatchThreads, OneAndTwoThreadsGiveIdenticalOutputs) {
  const fs::path dir = fresh_dir("threads");
  const RunConfig config = panel_run(
      dir, panel_csv(12, 160),
      "backtest:\n  first_origin: 130\n  step: 10\n  horizon: 3\n  shortlist: 3\n  refit: 0\n");
  std::string summary[2], ranking[2], backtest[2];
  for (int k = 0; k < 2; ++k) {
    BatchOptions options;
    options.threads = k + 1;
    options.folder = dir / fmt::format("run{}", k + 1);
    const BatchResult r = run_batch(config, load_panel(config, {}), options);
    ASSERT_TRUE(r.all_ok());
    write_batch_tables(options.folder, r);
    summary[k] = without_seconds(summary_csv(r.series));
    // fit_seconds is a timing column: compare the ranking without it.
    const CsvTable lb = read_csv(options.folder / "ranking.csv");
    const int timing = lb.column_index("fit_seconds");
    ASSERT_GE(timing, 0);
    for (const auto& row : lb.rows)
      for (int c = 0; c < lb.columns(); ++c) ranking[k] += (c == timing ? "" : row[c]) + ",";
    backtest[k] = testing::slurp(options.folder / "accuracy.csv") +
                  testing::slurp(options.folder / "forecasts.csv");
  }
  EXPECT_EQ(summary[0], summary[1]);
  EXPECT_EQ(ranking[0], ranking[1]);
  EXPECT_EQ(backtest[0], backtest[1]);
  EXPECT_FALSE(backtest[0].empty());
  EXPECT_NE(summary[0].find("zone_011,ok"), std::string::npos) << summary[0];
}

}  // namespace
}  // namespace lagsieve
