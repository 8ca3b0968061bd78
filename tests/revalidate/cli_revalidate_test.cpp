// The built binary end to end: `search` on the training rows writes the deployed model file (with
// its training-time backtest), then `revalidate` on the extended file must exit 0 for new rows from
// the same process, 10 or 11 after a change (matching the verdict in revalidation.json), 2 for a
// revised history, and go on with --allow-revised-history.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include <nlohmann/json.hpp>

#include "revalidate_test_util.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using namespace lagsieve::testing;

std::string yaml(const std::string& csv, const std::string& out) {
  return "data: {file: " + csv +
         ", time: t}\n"
         "target: {column: y}\n"
         "inputs:\n"
         "  - column: x\n"
         "    delay: [1, 3]\n"
         "    denominator: [0, 1]\n"
         "noise: {ar: [0, 1], constant: true}\n"
         "search: {threads: 1}\n"
         "backtest: {horizon: 3, refit: 10, shortlist: 3}\n"
         "output: {dir: " +
         out + "}\n";
}

void write(const fs::path& p, const std::string& text) { std::ofstream(p) << text; }

std::string verdict_in(const fs::path& folder) {
  return nlohmann::json::parse(slurp(folder / "revalidation.json"))["verdict"].get<std::string>();
}

int code_of(const std::string& verdict) {
  return verdict == "keep" ? 0 : verdict == "refit" ? 10 : 11;
}

TEST(RevalidateCommand, ExitCodesFollowTheVerdict) {
  ASSERT_TRUE(fs::exists(LAGSIEVE_BINARY)) << "build the lagsieve target before test_revalidate";
  const fs::path dir =
      fs::temp_directory_path() / ("lagsieve_revalidate_cli_" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  const std::uint64_t seed = 7001;
  const SeriesData same = simulate(truth(seed));
  const SeriesData changed = spliced(same, simulate(truth(seed, 1.0, 2)));
  write_series_csv(dir / "train.csv", head(same, kTrainingRows));
  write_series_csv(dir / "same.csv", same);
  write_series_csv(dir / "changed.csv", changed);
  SeriesData revised = same;
  revised.target[40] += 0.25;
  write_series_csv(dir / "revised.csv", revised);
  write(dir / "train.yaml", yaml("train.csv", "run"));
  for (const char* name : {"same", "changed", "revised"})
    write(dir / (std::string(name) + ".yaml"), yaml(std::string(name) + ".csv", "unused"));

  const CommandResult search = run_lagsieve(dir, "search train.yaml --quiet");
  ASSERT_EQ(search.code, 0) << search.err;
  const auto model = nlohmann::json::parse(slurp(dir / "run" / "model.json"));
  ASSERT_TRUE(model.contains("backtest"));

  const CommandResult keep =
      run_lagsieve(dir, "revalidate run/model.json same.yaml --out same_out --quiet");
  EXPECT_EQ(keep.code, 0) << keep.out << keep.err;
  EXPECT_EQ(verdict_in(dir / "same_out"), "keep");
  EXPECT_NE(keep.out.find("Verdict: keep"), std::string::npos) << keep.out;
  EXPECT_TRUE(fs::exists(dir / "same_out" / "refit_model.json"));
  EXPECT_TRUE(fs::exists(dir / "same_out" / "ranking.json"));
  const auto doc = nlohmann::json::parse(slurp(dir / "same_out" / "revalidation.json"));
  EXPECT_EQ(doc["performance"]["baseline"], "model file");

  const CommandResult change =
      run_lagsieve(dir, "revalidate run/model.json changed.yaml --out changed_out --quiet --json");
  ASSERT_TRUE(change.code == 10 || change.code == 11) << change.code << change.err;
  EXPECT_EQ(change.code, code_of(verdict_in(dir / "changed_out")));
  EXPECT_EQ(nlohmann::json::parse(change.out)["verdict"], verdict_in(dir / "changed_out"));
  EXPECT_TRUE(fs::exists(dir / "changed_out" / "challenger_model.json"));

  const CommandResult refused =
      run_lagsieve(dir, "revalidate run/model.json revised.yaml --out revised_out --quiet");
  EXPECT_EQ(refused.code, 2);
  EXPECT_NE(refused.err.find("a training value was revised: row 41 of "), std::string::npos)
      << refused.err;
  EXPECT_FALSE(fs::exists(dir / "revised_out" / "revalidation.json"));

  const CommandResult allowed = run_lagsieve(
      dir,
      "revalidate run/model.json revised.yaml --out revised_out --quiet --allow-revised-history");
  EXPECT_NE(allowed.code, 2) << allowed.err;
  EXPECT_EQ(allowed.code, code_of(verdict_in(dir / "revised_out")));
  EXPECT_EQ(nlohmann::json::parse(
                slurp(dir / "revised_out" / "revalidation.json"))["history"]["history_revised"],
            true);
  fs::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
