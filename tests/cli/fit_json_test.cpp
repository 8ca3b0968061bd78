// `lagsieve fit CONFIG --json` on the demo data (data/heat_demand.csv, drawn from the model in
// configs/demo_single.yaml): the diagnostics carry the residual-input cross-correlation of every
// input, shaped as documented, and a wrong delay is flagged with its missing lag.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <string>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

using lagsieve::testing::slurp;

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
  size_t at = s.find(from);
  if (at == std::string::npos) throw std::runtime_error("test setup: '" + from + "' not found");
  for (; at != std::string::npos; at = s.find(from, at + to.size())) s.replace(at, from.size(), to);
  return s;
}

// Writes the demo config (with `from` replaced by `to`) into a fresh folder, runs `fit --json`
// there and parses what it prints.
json fit_json(const std::string& from, const std::string& to) {
  std::random_device rd;
  const fs::path dir = fs::temp_directory_path() / ("lagsieve-fitjson-" + std::to_string(rd()));
  fs::create_directories(dir);
  std::string yaml = slurp(fs::path(LAGSIEVE_SOURCE_DIR) / "configs" / "demo_single.yaml");
  yaml = replace_all(yaml, "../data/heat_demand.csv",
                     std::string(LAGSIEVE_SOURCE_DIR) + "/data/heat_demand.csv");
  if (!from.empty()) yaml = replace_all(yaml, from, to);
  std::ofstream(dir / "cfg.yaml") << yaml;
  const auto run = lagsieve::testing::run_lagsieve(dir, "fit cfg.yaml --json");
  EXPECT_EQ(run.code, 0) << run.err;
  json j = json::parse(run.out);
  fs::remove_all(dir);
  return j;
}

// A residual_input_correlation warning naming `input` ("" = any input).
bool warned_about(const json& d, const std::string& input) {
  for (const auto& w : d["warnings"]) {
    const std::string text = w.get<std::string>();
    if (text.rfind("residual_input_correlation: ", 0) == 0 && text.find(input) != std::string::npos)
      return true;
  }
  return false;
}

TEST(CliFitJson, DiagnosticsCarryTheResidualInputCrossCorrelation) {
  const json j = fit_json("", "");
  ASSERT_TRUE(j["diagnostics"].contains("residual_input_ccf"));
  const json& checks = j["diagnostics"]["residual_input_ccf"];
  ASSERT_EQ(checks.size(), 3u);
  // Spec order; r + s + 1 = 2, 1 and 1 fitted terms.
  const std::pair<const char*, int> inputs[] = {
      {"outdoor_temp", 2}, {"wind_speed", 1}, {"tariff_change", 1}};
  for (size_t i = 0; i < 3; ++i) {
    const json& c = checks[i];
    SCOPED_TRACE(inputs[i].first);
    EXPECT_EQ(c["input"], inputs[i].first);
    for (const char* key : {"lags", "values", "band", "statistic", "df", "p_value"})
      EXPECT_TRUE(c.contains(key)) << key;
    const int n = c["n"].get<int>();
    EXPECT_EQ(n, j["n_obs"].get<int>() - c["ar_order"].get<int>() -
                     c["extra_differences"].get<int>());
    // As in the screen: the two weather columns are prewhitened, the tariff step (an event) is
    // not; a single step in this undifferenced model is differenced once into a pulse.
    const bool event = i == 2;
    EXPECT_EQ(c["prewhitened"].get<bool>(), !event);
    EXPECT_EQ(c["input_kind"], event ? "event" : "column");
    EXPECT_EQ(c["extra_differences"].get<int>(), event ? 1 : 0);
    if (event) EXPECT_EQ(c["ar_order"].get<int>(), 0);
    else EXPECT_GE(c["ar_order"].get<int>(), 1);
    const int L = std::min(24, n / 4);
    ASSERT_EQ(c["lags"].size(), size_t(2 * L + 1));
    ASSERT_EQ(c["values"].size(), size_t(2 * L + 1));
    EXPECT_EQ(c["lags"].front().get<int>(), -L);
    EXPECT_EQ(c["lags"].back().get<int>(), L);
    EXPECT_DOUBLE_EQ(c["band"].get<double>(), 1.96 / std::sqrt(double(n)));
    EXPECT_EQ(c["df"].get<int>(), L + 1 - inputs[i].second);
    // S from the written values (to their printed precision).
    double s = 0.0;
    for (int k = 0; k <= L; ++k) {
      const double r = c["values"][size_t(k + L)].get<double>();
      s += r * r / (n - k);
    }
    EXPECT_NEAR(c["statistic"].get<double>(), double(n) * (n + 2) * s,
                1e-9 * c["statistic"].get<double>());
    // The true model: nothing left for any input at the 1% level.
    EXPECT_GT(c["p_value"].get<double>(), 0.01);
  }
  EXPECT_FALSE(warned_about(j["diagnostics"], ""));
}

TEST(CliFitJson, WrongDelayIsFlagged) {
  // wind_speed acts at delay 0; a fit at delay 2 leaves its effect in the residuals at lag 0.
  const json j =
      fit_json("  - column: wind_speed\n    delay: 0", "  - column: wind_speed\n    delay: 2");
  const json& checks = j["diagnostics"]["residual_input_ccf"];
  ASSERT_EQ(checks.size(), 3u);
  const json& wind = checks[1];
  ASSERT_EQ(wind["input"], "wind_speed");
  EXPECT_LT(wind["p_value"].get<double>(), 1e-6);
  EXPECT_EQ(wind["largest_lag"].get<int>(), 0);
  EXPECT_TRUE(warned_about(j["diagnostics"], "wind_speed"));
}

}  // namespace
