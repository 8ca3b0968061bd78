// The report's "Detected effects" section: the history with each effect marked in its type's
// colour, the table (type, time stamp, size, s.e., statistic), the ambiguity note for an effect
// at the end of the data; and end to end, R's Nile as a CSV through `search` and `report`.
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>
#include <variant>

#include "fixture.h"
#include "report/effects_section.h"
#include "report/svg.h"
#include "report_fixture.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

using nlohmann::json;

json fit_with_effects() {
  json values = json::array();
  json time = json::array();
  for (int t = 0; t < 100; ++t) {
    values.push_back(t < 28 ? 1100.0 : 850.0);
    time.push_back(std::to_string(1871 + t));
  }
  json o = {{"detected_on", "no inputs ~ (1,1) +c"},
            {"critical", 3.76},
            {"ambiguity_rule", "RULE-TEXT"},
            {"shared_set_rule", "SHARED"},
            {"backtest_rule", "ORIGINS"},
            {"history", {{"time", time}, {"values", values}}}};
  o["effects"] = json::array({{{"name", "LS@1899"},
                               {"type", "level_shift"},
                               {"row", 28},
                               {"time", "1899"},
                               {"size", -249.07},
                               {"std_error", 32.80},
                               {"statistic", -7.59},
                               {"ambiguous_with", json::array()}},
                              {{"name", "AO@1970"},
                               {"type", "additive"},
                               {"row", 99},
                               {"time", "1970"},
                               {"size", 300.0},
                               {"std_error", 120.0},
                               {"statistic", 2.5},
                               {"ambiguous_with", json::array({"level_shift", "temporary"})}}});
  o["dropped"] = json::array();
  return {{"label", "x"}, {"outliers", o}};
}

TEST(ReportEffects, TableMarkersAndAmbiguityNote) {
  const auto s = effects_section(fit_with_effects(), "");
  ASSERT_TRUE(s.has_value());
  EXPECT_EQ(s->section.heading, "Detected effects");
  const HtmlTable* table = nullptr;
  const HtmlNotice* notice = nullptr;
  for (const auto& b : s->section.blocks) {
    if (const auto* t = std::get_if<HtmlTable>(&b)) table = t;
    if (const auto* n = std::get_if<HtmlNotice>(&b)) notice = n;
  }
  ASSERT_NE(table, nullptr);
  ASSERT_EQ(table->rows.size(), 2u);
  EXPECT_EQ(std::get<std::string>(table->rows[0][0]), "LS@1899");
  EXPECT_EQ(std::get<std::string>(table->rows[0][1]), "level shift");
  EXPECT_EQ(std::get<std::string>(table->rows[0][2]), "1899");
  EXPECT_DOUBLE_EQ(std::get<double>(table->rows[0][3]), -249.07);
  EXPECT_DOUBLE_EQ(std::get<double>(table->rows[0][4]), 32.80);
  EXPECT_DOUBLE_EQ(std::get<double>(table->rows[0][5]), -7.59);
  EXPECT_EQ(std::get<std::string>(table->rows[1][6]), "level shift, temporary");
  // The effect at the last observation is flagged as ambiguous, with the rule.
  ASSERT_NE(notice, nullptr);
  EXPECT_NE(notice->text.find("AO@1970 (additive or level shift, temporary)"), std::string::npos);
  EXPECT_NE(notice->text.find("RULE-TEXT"), std::string::npos);
  // Markers at the effects' rows (1-based x), in each type's colour.
  const std::string& svg = s->chart_svg;
  EXPECT_NE(svg.find("data-series=\"level shift\" data-x=\"29\" data-value=\"850\""),
            std::string::npos);
  EXPECT_NE(svg.find("data-series=\"additive\" data-x=\"100\""), std::string::npos);
  EXPECT_NE(svg.find(std::string(palette_colour(effect_colour("level_shift")))), std::string::npos);
  EXPECT_NE(svg.find(std::string(palette_colour(effect_colour("additive")))), std::string::npos);
  // The level shift also as the mean before and after it.
  EXPECT_NE(svg.find("data-series=\"mean between level shifts\""), std::string::npos);
}

TEST(ReportEffects, NoSectionWithoutDetection) {
  EXPECT_FALSE(effects_section(json{{"label", "x"}}, "").has_value());
}

// R's Nile exported with write.csv, searched with detection on: the shift of 1899 is found, every
// shortlisted candidate carries it, the chosen model's size matches R's arima with the step as a
// regressor (the chosen model is that model: AR(1) and a mean), and the report lists and marks it.
TEST(ReportEffects, NileSearchAndReportEndToEnd) {
  const auto dir = test::fresh_dir("nile-effects");
  std::filesystem::copy_file(testing::reference_path("outliers/nile.csv"), dir / "nile.csv");
  test::write_text(dir / "nile.yaml",
                   "data: {file: nile.csv, time: year}\n"
                   "target: {column: flow}\n"
                   "noise: {ar: [0, 2], ma: [0, 1], constant: true}\n"
                   "search: {strategy: exhaustive, criterion: bic, threads: 1}\n"
                   "backtest: {first_origin: 60, step: 1, horizon: 5, shortlist: 4}\n"
                   "outliers: {detect: [additive, level_shift, temporary]}\n"
                   "output: {dir: run}\n");
  const auto r = testing::run_lagsieve(dir, "search nile.yaml --quiet");
  ASSERT_EQ(r.code, 0) << r.err << r.out;
  EXPECT_NE(r.out.find("LS@1899"), std::string::npos) << r.out;
  const json fit = json::parse(testing::slurp(dir / "run" / "fit.json"));
  ASSERT_TRUE(fit.contains("outliers"));
  const auto& effects = fit["outliers"]["effects"];
  ASSERT_EQ(effects.size(), 1u);
  EXPECT_EQ(effects[0]["name"], "LS@1899");
  EXPECT_EQ(fit["outliers"]["shortlisted"], 4);
  const auto ref = testing::load_fixture("outliers/nile_level_shift.json");
  const double step = ref["step"].get<double>();
  EXPECT_NEAR(effects[0]["size"].get<double>(), step, 1e-3 * std::abs(step));
  EXPECT_NEAR(effects[0]["std_error"].get<double>(), ref["step_se"].get<double>(),
              0.02 * ref["step_se"].get<double>());
  const std::string model = testing::slurp(dir / "run" / "model.json");
  EXPECT_NE(model.find("\"detected\""), std::string::npos);
  const std::string board = testing::slurp(dir / "run" / "ranking.csv");
  int with = 0;
  for (size_t at = board.find(",LS@1899\n"); at != std::string::npos;
       at = board.find(",LS@1899\n", at + 1))
    ++with;
  EXPECT_EQ(with, 4) << board;
  const std::string html = testing::slurp(dir / "run" / "report.html");
  EXPECT_NE(html.find("Detected effects"), std::string::npos);
  EXPECT_NE(html.find("LS@1899"), std::string::npos);
  EXPECT_NE(html.find("Detected effects</th>"), std::string::npos) << "no effects column";
  const std::string chart = testing::slurp(dir / "run" / "charts" / "effects.svg");
  EXPECT_NE(chart.find("data-series=\"level shift\" data-x=\"29\""), std::string::npos);
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
