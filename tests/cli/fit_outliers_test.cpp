// `lagsieve fit` with an `outliers` section on R's Nile series as exported by write.csv: the level
// shift appears in the text and JSON output, `--save` writes it into the model file, and
// `forecast` from that file keeps the shifted level.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <string>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

TEST(CliFitOutliers, NileShiftInTextJsonModelFileAndForecast) {
  std::random_device rd;
  const fs::path dir = fs::temp_directory_path() / ("lagsieve-outliers-" + std::to_string(rd()));
  fs::create_directories(dir);
  std::ofstream(dir / "nile.yaml")
      << "data: {file: " << LAGSIEVE_TEST_DATA_DIR << "/reference/outliers/nile.csv, time: year}\n"
      << "target: {column: flow}\nnoise: {ar: 1, ma: 0}\n"
      << "outliers: {detect: [additive, level_shift, temporary], critical: auto, max: 10}\n";
  const auto text = lagsieve::testing::run_lagsieve(dir, "fit nile.yaml --save m.json");
  ASSERT_EQ(text.code, 0) << text.err;
  EXPECT_NE(text.out.find("LS@1899"), std::string::npos) << text.out;
  EXPECT_NE(text.out.find("level shift"), std::string::npos);

  const auto js = lagsieve::testing::run_lagsieve(dir, "fit nile.yaml --json");
  ASSERT_EQ(js.code, 0) << js.err;
  const json j = json::parse(js.out);
  ASSERT_EQ(j["outliers"]["effects"].size(), 1u);
  const auto& e = j["outliers"]["effects"][0];
  EXPECT_EQ(e["name"], "LS@1899");
  EXPECT_EQ(e["type"], "level_shift");
  EXPECT_NEAR(e["size"].get<double>(), -249.07, 0.05);
  double constant = 0.0;
  for (const auto& p : j["params"])
    if (p["name"] == "constant") constant = p["value"].get<double>();

  const json model = json::parse(lagsieve::testing::slurp(dir / "m.json"));
  EXPECT_EQ(model["spec"]["inputs"][0]["detected"]["type"], "level_shift");
  const auto fc = lagsieve::testing::run_lagsieve(
      dir, "forecast m.json --data " + std::string(LAGSIEVE_TEST_DATA_DIR) +
               "/reference/outliers/nile.csv --horizon 30 --json");
  ASSERT_EQ(fc.code, 0) << fc.err;
  const json f = json::parse(fc.out);
  const auto median = f["scenarios"][0]["median"].get<std::vector<double>>();
  EXPECT_NEAR(median.back(), constant + e["size"].get<double>(), 1e-3);

  // Unknown keys in the section suggest the closest.
  std::ofstream(dir / "bad.yaml") << "data: {file: x.csv}\ntarget: {column: y}\n"
                                  << "outliers: {critcal: 3}\n";
  const auto bad = lagsieve::testing::run_lagsieve(dir, "fit bad.yaml");
  EXPECT_EQ(bad.code, 2);
  EXPECT_NE(bad.err.find("critical"), std::string::npos) << bad.err;
  fs::remove_all(dir);
}

}  // namespace
