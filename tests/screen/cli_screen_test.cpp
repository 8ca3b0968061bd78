// `lagsieve screen` end to end on Series M (runs the built binary; build target `lagsieve` first).
#include <gtest/gtest.h>

#include <sys/wait.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include <nlohmann/json.hpp>

#include "fixture.h"

namespace lagsieve {
namespace {

struct Run {
  int code = -1;
  std::string out;
};

Run run_binary(const std::string& args) {
  if (!std::filesystem::exists(LAGSIEVE_BINARY))
    throw std::runtime_error(std::string("binary missing: ") + LAGSIEVE_BINARY +
                             " (build target lagsieve first)");
  const std::string cmd = std::string(LAGSIEVE_BINARY) + " " + args + " 2>&1";
  Run r;
  FILE* pipe = popen(cmd.c_str(), "r");
  if (pipe == nullptr) throw std::runtime_error("popen failed");
  std::array<char, 4096> buf{};
  size_t got = 0;
  while ((got = fread(buf.data(), 1, buf.size(), pipe)) > 0) r.out.append(buf.data(), got);
  const int status = pclose(pipe);
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return r;
}

std::string write_series_m_config() {
  const auto dir = std::filesystem::temp_directory_path() / "lagsieve_screen_cli_test";
  std::filesystem::create_directories(dir);
  const auto path = dir / "series_m.yaml";
  std::ofstream(path) << "data:\n  file: " << testing::reference_path("data/bjsales.csv")
                      << "\n  time: t\ntarget:\n  column: sales\ndifferencing:\n  regular: 1\n"
                         "inputs:\n  - column: lead\n";
  return path.string();
}

TEST(ScreenCommand, JsonCarriesTheSuggestions) {
  const auto r = run_binary("screen " + write_series_m_config() + " --json");
  ASSERT_EQ(r.code, 0) << r.out;
  const auto j = nlohmann::json::parse(r.out);
  EXPECT_EQ(j["target"], "sales");
  const auto& lead = j["inputs"][0];
  EXPECT_EQ(lead["name"], "lead");
  EXPECT_EQ(lead["suggested_delay"].get<int>(), 3);  // Box, Jenkins, Reinsel & Ljung (2015)
  EXPECT_TRUE(lead["relevant"].get<bool>());
  EXPECT_EQ(lead["cross_correlation"].size(), 41u);
  EXPECT_EQ(j["noise"]["q"].get<int>(), 1);
}

TEST(ScreenCommand, TablePrintsSuggestionAndBands) {
  const auto r = run_binary("screen " + write_series_m_config());
  ASSERT_EQ(r.code, 0) << r.out;
  EXPECT_NE(r.out.find("suggestion: b = 3, s = 0, r = 1"), std::string::npos) << r.out;
  // The band is a column of its own ("lag", "family"), explained once; no ruler inside a bar.
  EXPECT_NE(r.out.find("beyond: \"lag\" = outside the per-lag band"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find(" family "), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("-1                   0"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("0.0000"), std::string::npos) << r.out;  // weights keep their size
  // One glyph, one meaning: the bar's sign is the number's ASCII minus, bands are written with
  // one plus-minus sign, and the legend explains the bar.
  EXPECT_EQ(r.out.find("\u2212"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("+-"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("bar: the sign of r(k), then one cell per 0.1 of |r(k)|"), std::string::npos);
  EXPECT_NE(r.out.find("noise: suggested p = 0, q = 1"), std::string::npos);
}

TEST(ScreenCommand, BadLagOptionIsBadInput) {
  const auto r = run_binary("screen " + write_series_m_config() + " --lags 0");
  EXPECT_EQ(r.code, 2) << r.out;
}

}  // namespace
}  // namespace lagsieve
