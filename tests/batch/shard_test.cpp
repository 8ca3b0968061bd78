// Shards for batch schedulers: the plan is a pure function of the keys and row counts, balanced
// by rows; a panel sharded 1, 3 and 7 ways and merged gives the tables of the unsharded run;
// merge refuses a missing or duplicated shard and shards of other data.
#include <gtest/gtest.h>

#include <set>

#include <filesystem>
#include <fstream>

#include "batch/shards.h"
#include "core/error.h"
#include "io/csv.h"
#include "panel_util.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using testing::run_lagsieve;

PanelPart part(const std::string& key, int rows) {
  PanelPart p;
  p.key = key;
  p.rows = rows;
  return p;
}

TEST(ShardPlan, BalancedByRowsAndAPureFunctionOfKeysAndRows) {
  std::vector<PanelPart> parts;
  for (int i = 0; i < 10; ++i) parts.push_back(part(fmt::format("s{}", i), 100 + 10 * i));
  const auto plan = shard_plan(parts, 3);
  EXPECT_EQ(plan, shard_plan(parts, 3));
  std::vector<long long> rows(3, 0);
  for (size_t i = 0; i < parts.size(); ++i) rows[plan[i]] += parts[i].rows;
  // 1450 rows in all. Most rows first, each to the lightest shard: 190 A, 180 B, 170 C, 160 C,
  // 150 B, 140 A, 130 A, 120 B, 110 C, 100 C; no shard exceeds another by more than the largest
  // series.
  EXPECT_EQ(rows, (std::vector<long long>{460, 450, 540}));
  const auto one = shard_plan(parts, 1);
  EXPECT_TRUE(std::all_of(one.begin(), one.end(), [](int s) { return s == 0; }));
}

TEST(ShardPlan, ShardOptionIsChecked) {
  EXPECT_EQ(parse_shard("3/8", "--shard").index, 3);
  for (const char* bad : {"0/3", "4/3", "3", "a/b", "1/0", "1/3x", "-1/3"})
    EXPECT_THROW(parse_shard(bad, "--shard"), InputError) << bad;
}

// Tables without the timing column `drop` (summary: seconds; ranking: fit_seconds).
std::string table_without(const fs::path& file, const std::string& drop) {
  const CsvTable t = read_csv(file);
  const int skip = t.column_index(drop);
  std::string out;
  for (const auto& row : t.rows) {
    for (int c = 0; c < t.columns(); ++c)
      if (c != skip) out += row[c] + ",";
    out += "\n";
  }
  return out;
}

TEST(ShardMerge, ShardedOneThreeAndSevenWaysMergesToTheUnshardedTables) {
  const fs::path dir = fs::temp_directory_path() / "lagsieve_batch_shards";
  fs::remove_all(dir);
  fs::create_directories(dir);
  std::ofstream(dir / "panel.csv") << testing::panel_csv(9, 120);
  std::ofstream(dir / "panel.yaml") << testing::panel_config("panel.csv");
  // Pages for the 2 worst by each measure and a sample of 1: fewer than the 9 series.
  const std::string pages = " --pages-worst 2 --pages-sample 1";
  ASSERT_EQ(run_lagsieve(dir, "search panel.yaml --out whole --quiet" + pages).code, 0);
  const std::string summary = table_without(dir / "whole" / "summary.csv", "seconds");
  const std::string ranking = table_without(dir / "whole" / "ranking.csv", "fit_seconds");
  const std::string forecasts = testing::slurp(dir / "whole" / "forecasts.csv");
  const auto page_folders = [](const fs::path& run) {
    std::set<std::string> names;
    if (fs::exists(run / "series"))
      for (const auto& e : fs::directory_iterator(run / "series"))
        names.insert(e.path().filename().string());
    return names;
  };
  const auto whole_pages = page_folders(dir / "whole");
  EXPECT_GE(whole_pages.size(), 2u);
  EXPECT_LT(whole_pages.size(), 9u);
  const auto journal_lines = [](const fs::path& file) {
    std::ifstream in(file);
    std::string line;
    int n = 0;
    while (std::getline(in, line)) n += line.empty() ? 0 : 1;
    return n;
  };
  for (const int n : {1, 3, 7}) {
    std::string folders;
    for (int k = 1; k <= n; ++k) {
      const auto r = run_lagsieve(
          dir, fmt::format("search panel.yaml --shard {}/{} --out s{}_{} --quiet{}", k, n, n, k,
                           pages));
      ASSERT_EQ(r.code, 0) << r.err;
      folders += fmt::format(" s{}_{}", n, n + 1 - k);  // any order
    }
    const auto m = run_lagsieve(dir, fmt::format("merge merged{}{}", n, folders));
    ASSERT_EQ(m.code, 0) << m.out << m.err;
    EXPECT_EQ(table_without(dir / fmt::format("merged{}", n) / "summary.csv", "seconds"), summary)
        << n;
    EXPECT_EQ(table_without(dir / fmt::format("merged{}", n) / "ranking.csv", "fit_seconds"),
              ranking)
        << n;
    const fs::path merged = dir / fmt::format("merged{}", n);
    EXPECT_EQ(testing::slurp(merged / "forecasts.csv"), forecasts) << n;
    for (int i = 0; i < 9; ++i)
      EXPECT_TRUE(fs::exists(merged / "models" / fmt::format("zone_{:03d}.json", i))) << n << i;
    // The pages of the whole run, each with its report page, and the journal of every candidate
    // (checked for the whole run: a resume of the merged folder fits nothing again).
    EXPECT_EQ(page_folders(merged), whole_pages) << n;
    for (const auto& name : whole_pages)
      EXPECT_TRUE(fs::exists(merged / "series" / name / "report.html")) << name;
    EXPECT_TRUE(fs::exists(merged / "report.html"));
    EXPECT_EQ(journal_lines(merged / "journal.jsonl"), journal_lines(dir / "whole" / "journal.jsonl"))
        << n;
  }
  // A missing shard, a shard given twice, a shard of other data: refused, naming it.
  auto r = run_lagsieve(dir, "merge bad s3_1 s3_2");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("shard 3/3 is missing"), std::string::npos) << r.err;
  r = run_lagsieve(dir, "merge bad s3_1 s3_2 s3_2 s3_3");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("given twice"), std::string::npos) << r.err;
  std::ofstream(dir / "panel.csv") << testing::panel_csv(10, 120);  // other data
  ASSERT_EQ(run_lagsieve(dir, "search panel.yaml --shard 3/3 --out other --quiet").code, 0);
  r = run_lagsieve(dir, "merge bad s3_1 s3_2 other");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("'other' is a shard of another config or data"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(dir / "bad"));
}

}  // namespace
}  // namespace lagsieve
