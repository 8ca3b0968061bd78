// The panel report: pages only for the worst series and a sample; the panel's counts by status,
// by input and against the benchmark.
#include <gtest/gtest.h>

#include <fmt/format.h>

#include <algorithm>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "batch/panel_report.h"
#include "io/config.h"

namespace lagsieve {
namespace {

std::vector<SeriesSummary> rows(int n) {
  std::vector<SeriesSummary> out;
  for (int i = 0; i < n; ++i) {
    SeriesSummary s;
    s.series = fmt::format("s{:02d}", i);
    s.folder = "series/" + s.series;
    s.status = i == 5 ? SeriesStatus::bad_data : SeriesStatus::ok;
    s.reason = i == 5 ? "input 'x' is constant" : "";
    s.backtest_score = 1.0 + 0.01 * i;  // the last series are the worst
    s.benchmark_score = i < 10 ? 2.0 : 1.0;
    s.benchmark_p = i < 10 ? 0.001 : 0.5;
    s.ljung_box_p = i == 3 ? 1e-6 : 0.5;
    s.inputs = {{"x", i % 2 == 0, i % 3, 0, 0}, {"z", false, 0, 0, 0}};
    out.push_back(s);
  }
  return out;
}

TEST(PanelReport, PagesOnlyForTheWorstAndASample) {
  PanelReportOptions options;
  options.worst = 3;
  options.sample = 2;
  const auto r = rows(30);
  const auto pages = series_with_pages(r, options);
  // Worst by score: 29, 28, 27; by residuals: 3 first; a sample of 2 more; never the bad series.
  EXPECT_LE(pages.size(), 8u);
  EXPECT_GE(pages.size(), 6u);
  for (size_t i : {29u, 28u, 27u, 3u})
    EXPECT_NE(std::find(pages.begin(), pages.end(), i), pages.end()) << i;
  EXPECT_EQ(std::find(pages.begin(), pages.end(), 5u), pages.end());
  EXPECT_TRUE(std::is_sorted(pages.begin(), pages.end()));
}

TEST(PanelReport, OpensWithTheCountsOfThePanel) {
  const auto dir = std::filesystem::temp_directory_path() / "lagsieve_panel_report";
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  RunConfig config = parse_config(
      "data:\n  file: p.csv\n  series_key: k\ntarget:\n  column: y\ninputs:\n  - column: x\n"
      "  - column: z\n",
      dir / "p.yaml");
  PanelReportOptions options;
  options.worst = 0;
  options.sample = 0;
  EXPECT_TRUE(write_panel_report(dir, rows(30), config, options).empty());
  std::ifstream in(dir / "report.html");
  std::stringstream html;
  html << in.rdbuf();
  const std::string text = html.str();
  EXPECT_NE(text.find("Panel report: 30 series"), std::string::npos);
  EXPECT_NE(text.find("input &#39;x&#39; is constant"), std::string::npos) << text.substr(0, 3000);
  // x is used by the 15 even series (the bad s05 is odd).
  EXPECT_NE(text.find(">15<"), std::string::npos);
  // 9 finished series beat the benchmark significantly (0..9 without the bad s05).
  EXPECT_NE(text.find("better, significantly (Diebold-Mariano p &lt; 0.05)</dt><dd>9</dd>"),
            std::string::npos);
  EXPECT_NE(text.find("<dt>bad_data</dt><dd>1</dd>"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
