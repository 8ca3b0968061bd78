// `--json` of validate, search and backtest, as a caller parses it: one object on stdout with the
// exit code and its meaning, statuses, and paths that exist; warnings with codes and numbers in
// fit.json; every problem of a bad config listed, each with file, line and key.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <string>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using lagsieve::testing::run_lagsieve;
using lagsieve::testing::slurp;
using nlohmann::json;

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
  size_t at = s.find(from);
  if (at == std::string::npos) throw std::runtime_error("test setup: '" + from + "' not found");
  for (; at != std::string::npos; at = s.find(from, at + to.size())) s.replace(at, from.size(), to);
  return s;
}

// A fresh folder with the demo config (data path made absolute), edited by `edits`.
fs::path demo_folder(const std::vector<std::pair<std::string, std::string>>& edits,
                     const std::string& extra = "") {
  std::random_device rd;
  const fs::path dir = fs::temp_directory_path() / ("lagsieve-json-" + std::to_string(rd()));
  fs::create_directories(dir);
  std::string yaml = slurp(fs::path(LAGSIEVE_SOURCE_DIR) / "configs" / "demo_single.yaml");
  yaml = replace_all(yaml, "../data/heat_demand.csv",
                     std::string(LAGSIEVE_SOURCE_DIR) + "/data/heat_demand.csv");
  yaml = replace_all(yaml, "../runs/demo_single", "run");
  for (const auto& [from, to] : edits) yaml = replace_all(yaml, from, to);
  std::ofstream(dir / "cfg.yaml") << yaml << extra;
  return dir;
}

json parse_stdout(const lagsieve::testing::CommandResult& r) {
  try {
    return json::parse(r.out);
  } catch (const json::exception& e) {
    ADD_FAILURE() << "stdout is not one JSON object: " << e.what() << "\n" << r.out << r.err;
    return json::object();
  }
}

// A small search: outdoor_temp's delay 0..1, wind_speed at delay 2 (the truth is 0, so the
// residuals still correlate with it at lag 0).
const std::vector<std::pair<std::string, std::string>> kSearch = {
    {"    delay: 1\n    numerator: 0", "    delay: [0, 1]\n    numerator: 0"},
    {"  - column: wind_speed\n    delay: 0", "  - column: wind_speed\n    delay: 2"}};

TEST(CliJson, SearchPrintsOneObjectWithStatusesFilesAndCodedWarnings) {
  const fs::path dir = demo_folder(kSearch);
  const auto r = run_lagsieve(dir, "search cfg.yaml --json --quiet");
  ASSERT_EQ(r.code, 0) << r.err;
  const json j = parse_stdout(r);
  EXPECT_EQ(j["command"], "search");
  EXPECT_EQ(j["exit_code"], 0);
  EXPECT_EQ(j["exit_meaning"], "ok");
  EXPECT_EQ(j["ran"]["series"], 1);
  EXPECT_EQ(j["ran"]["candidates"], 2);
  EXPECT_EQ(j["ran"]["fitted"], 2);
  EXPECT_EQ(j["ran"]["backtest"], false);
  EXPECT_EQ(j["by_status"]["ok"], 1);
  ASSERT_EQ(j["series"].size(), 1u);
  const json& s = j["series"][0];
  EXPECT_EQ(s["status"], "ok");
  EXPECT_EQ(s["series"], "heat_mwh");
  for (const char* f : {"model", "fit", "forecast"}) {
    ASSERT_TRUE(s["files"][f].is_string()) << f;
    EXPECT_TRUE(fs::exists(s["files"][f].get<std::string>())) << f;
  }
  for (const char* f : {"run_folder", "ranking_csv", "ranking_json", "report"}) {
    ASSERT_TRUE(j["files"][f].is_string()) << f;
    EXPECT_TRUE(fs::exists(j["files"][f].get<std::string>())) << f;
  }
  EXPECT_TRUE(j["files"]["run_folder"].get<std::string>().ends_with("run"));
  // fit.json: the text warning and the same warning with its code and numbers.
  const json fit = json::parse(slurp(s["files"]["fit"].get<std::string>()));
  const json& d = fit["diagnostics"];
  ASSERT_EQ(d["warnings"].size(), d["warning_codes"].size());
  bool found = false;
  for (size_t i = 0; i < d["warning_codes"].size(); ++i) {
    const json& w = d["warning_codes"][i];
    EXPECT_EQ(w["message"], d["warnings"][i]);
    if (w["code"] != "residual_input_correlation" || w["values"]["input"] != "wind_speed") continue;
    found = true;
    EXPECT_LT(w["values"]["p_value"].get<double>(), 1e-6);
    EXPECT_EQ(w["values"]["lag"].get<int>(), 0);
    EXPECT_GT(w["values"]["statistic"].get<double>(), 0.0);
    EXPECT_TRUE(w["values"].contains("band"));
    // The same numbers as the check the diagnostics list for the input.
    for (const auto& c : d["residual_input_ccf"])
      if (c["input"] == "wind_speed") {
        EXPECT_DOUBLE_EQ(w["values"]["p_value"].get<double>(), c["p_value"].get<double>());
        EXPECT_EQ(w["values"]["lag"], c["largest_lag"]);
      }
  }
  EXPECT_TRUE(found) << d.dump(1);
  fs::remove_all(dir);
}

TEST(CliJson, BacktestPrintsModelsAndFiles) {
  const fs::path dir = demo_folder({},
                                   "\nbacktest:\n  first_origin: 1000\n  step: 30\n  "
                                   "horizon: 7\n  refit: 0\n");
  const auto r = run_lagsieve(dir, "backtest cfg.yaml --json --out bt");
  ASSERT_EQ(r.code, 0) << r.err;
  const json j = parse_stdout(r);
  EXPECT_EQ(j["command"], "backtest");
  EXPECT_EQ(j["exit_code"], 0);
  EXPECT_EQ(j["ran"]["origins"], 4);  // 1000, 1030, 1060, 1090 of 1096 rows
  ASSERT_EQ(j["models"].size(), 2u);  // the config's model and the seasonal naive benchmark
  for (const auto& m : j["models"]) EXPECT_EQ(m["status"], "ok") << m.dump();
  EXPECT_TRUE(j["chosen"].is_string());
  for (const char* f : {"backtest_csv", "accuracy_csv", "report"}) {
    ASSERT_TRUE(j["files"][f].is_string()) << f;
    EXPECT_TRUE(fs::exists(j["files"][f].get<std::string>())) << f;
  }
  fs::remove_all(dir);
}

TEST(CliJson, ValidateListsEveryProblemWithFileLineAndKey) {
  // Two sections with a problem each: a typo in noise and a negative backtest step.
  const fs::path dir =
      demo_folder({{"  ma: 1\n", "  mma: 1\n"}}, "\nbacktest:\n  first_origin: 1000\n  step: -3\n");
  const auto r = run_lagsieve(dir, "validate cfg.yaml --json");
  EXPECT_EQ(r.code, 2) << r.out << r.err;
  const json j = parse_stdout(r);
  EXPECT_EQ(j["command"], "validate");
  EXPECT_EQ(j["valid"], false);
  EXPECT_EQ(j["exit_code"], 2);
  ASSERT_EQ(j["problems"].size(), 2u) << j.dump(1);
  EXPECT_EQ(j["problems"][0]["key"], "noise.mma");
  EXPECT_EQ(j["problems"][1]["key"], "backtest.step");
  const std::string yaml = slurp(dir / "cfg.yaml");
  for (const auto& p : j["problems"]) {
    EXPECT_TRUE(p["file"].get<std::string>().ends_with("cfg.yaml"));
    // The line holds the key the problem names.
    const int line = p["line"].get<int>();
    size_t at = 0;
    for (int k = 1; k < line; ++k) at = yaml.find('\n', at) + 1;
    const std::string text = yaml.substr(at, yaml.find('\n', at) - at);
    const std::string key = p["key"].get<std::string>();
    EXPECT_NE(text.find(key.substr(key.find('.') + 1)), std::string::npos) << text;
  }
  // The data were still read: the series is listed.
  ASSERT_EQ(j["series"].size(), 1u);
  EXPECT_EQ(j["series"][0]["rows"], 1096);
  fs::remove_all(dir);
}

TEST(CliJson, ValidateOfAGoodConfigIsValid) {
  const fs::path dir = demo_folder(kSearch);
  const auto r = run_lagsieve(dir, "validate cfg.yaml --json");
  ASSERT_EQ(r.code, 0) << r.err;
  const json j = parse_stdout(r);
  EXPECT_EQ(j["valid"], true);
  EXPECT_TRUE(j["problems"].empty());
  EXPECT_EQ(j["grid_size"], 2);
  fs::remove_all(dir);
}

TEST(CliJson, BadInputIsAnErrorObjectAndExitTwo) {
  const fs::path dir = demo_folder({{"  ar: 1\n", "  ar: -1\n"}});
  const auto r = run_lagsieve(dir, "search cfg.yaml --json --quiet");
  EXPECT_EQ(r.code, 2);
  const json j = parse_stdout(r);
  EXPECT_EQ(j["exit_code"], 2);
  EXPECT_EQ(j["error"]["kind"], "bad_input");
  EXPECT_EQ(j["error"]["key"], "noise.ar");
  EXPECT_TRUE(j["error"]["line"].is_number());
  EXPECT_NE(r.err.find("lagsieve: error:"), std::string::npos);  // still said to people
  EXPECT_FALSE(fs::exists(dir / "run"));
  // A missing config: no file/line from the reader, still an object.
  const auto m = run_lagsieve(dir, "backtest missing.yaml --json");
  EXPECT_EQ(m.code, 2);
  EXPECT_EQ(parse_stdout(m)["error"]["kind"], "bad_input");
  fs::remove_all(dir);
}

}  // namespace
