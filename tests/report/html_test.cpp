// HTML page builder: well-formed, self-contained (no network URL), escaped, numbers formatted
// per column with exact sort keys, the sort script only when a table asks for it.
#include "report/html.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "markup_check.h"
#include "report/svg.h"

namespace lagsieve {
namespace {

using test::find_all;
using test::parse_markup;

HtmlPage example_page(bool sortable) {
  HtmlPage page;
  page.title = "Run <heat> & demand";
  page.subtitle = "config.yaml, 2024-05-01";
  page.footer = "lagsieve test";

  HtmlSection summary;
  summary.heading = "Summary";
  summary.intro = "What was run & on which data.";
  summary.blocks.push_back(HtmlNotice{Tone::good, "Model kept", "MASE 0.81 < 0.9 threshold"});
  summary.blocks.push_back(HtmlKeyValues{{{"target", "demand"}, {"rows", "1..500"}}});
  summary.blocks.push_back(HtmlParagraph{"Plain <text> stays text."});
  page.sections.push_back(summary);

  HtmlSection board;
  board.heading = "Ranking";
  HtmlTable t;
  t.caption = "Top candidates";
  t.columns = {{"model", "", NumberFormat::automatic, 3},
               {"AICc", "", NumberFormat::fixed, 2},
               {"MASE", "", NumberFormat::automatic, 3},
               {"coverage", "80%", NumberFormat::percent, 1},
               {"DM p", "", NumberFormat::p_value, 3},
               {"params", "", NumberFormat::automatic, 3}};
  t.rows = {{std::string("temp b=2 <r=1>"), 1234.5678, 0.81234, 0.7875, 0.0004, 7LL},
            {std::string("no inputs"), 1250.0, std::nan(""), 0.8, 0.0312, 5LL},
            {std::string("short row"), 1260.25}};
  t.sortable = sortable;
  t.highlighted_rows = {0};
  t.note = "k counts sigma^2.";
  board.blocks.push_back(t);
  BarChart b;
  b.frame.title = "Cross-correlation";
  b.x = {0, 1, 2};
  b.values = {0.1, 0.5, -0.2};
  b.band = {0.3};
  board.blocks.push_back(HtmlFigureRow{{{bar_chart_svg(b), "Prewhitened"}, {bar_chart_svg(b), "Raw"}}});
  page.sections.push_back(board);
  return page;
}

TEST(Html, FormatTableValue) {
  const TableColumn automatic{"x", "", NumberFormat::automatic, 3};
  EXPECT_EQ(format_table_value(1234.5678, automatic), "1235");
  EXPECT_EQ(format_table_value(0.81234, automatic), "0.8123");
  EXPECT_EQ(format_table_value(12.3456, automatic), "12.35");
  EXPECT_EQ(format_table_value(0.0, automatic), "0");
  EXPECT_EQ(format_table_value(2.5e-7, automatic), "2.500e-07");
  EXPECT_EQ(format_table_value(std::nan(""), automatic), "\u2014");
  EXPECT_EQ(format_table_value(42LL, automatic), "42");
  EXPECT_EQ(format_table_value(std::string("a<b"), automatic), "a<b");  // escaped when written
  EXPECT_EQ(format_table_value(TableValue{}, automatic), "");
  EXPECT_EQ(format_table_value(1234.5678, {"x", "", NumberFormat::fixed, 2}), "1234.57");
  EXPECT_EQ(format_table_value(0.7875, {"x", "", NumberFormat::percent, 1}), "78.8%");
  EXPECT_EQ(format_table_value(0.0004, {"x", "", NumberFormat::p_value, 3}), "< 0.001");
  EXPECT_EQ(format_table_value(0.0312, {"x", "", NumberFormat::p_value, 3}), "0.031");
}

TEST(Html, PageIsWellFormedAndSelfContained) {
  const std::string html = render_html(example_page(true));
  const auto r = parse_markup(html);
  ASSERT_TRUE(r.ok) << r.error;
  EXPECT_EQ(test::external_urls(html), 0);
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
  // Escaping: no raw markup from user text.
  EXPECT_EQ(html.find("<heat>"), std::string::npos);
  EXPECT_EQ(html.find("<r=1>"), std::string::npos);
  EXPECT_EQ(html.find("<text>"), std::string::npos);
  EXPECT_NE(html.find("Run &lt;heat&gt; &amp; demand"), std::string::npos);
  // Two SVG figures inline, each with only the namespace URL.
  EXPECT_EQ(find_all(r, "svg").size(), 2u);
  EXPECT_EQ(find_all(r, "figure").size(), 2u);
  EXPECT_EQ(find_all(r, "section").size(), 2u);
  EXPECT_EQ(find_all(r, "a").size(), 2u);  // table of contents
  EXPECT_EQ(find_all(r, "style").size(), 1u);
  EXPECT_NE(find_all(r, "style")[0].text.find("@media print"), std::string::npos);
}

TEST(Html, TableCellsCarryExactSortKeys) {
  const auto r = parse_markup(render_html(example_page(true)));
  ASSERT_TRUE(r.ok) << r.error;
  const auto tables = find_all(r, "table", "sortable");
  ASSERT_EQ(tables.size(), 1u);
  const auto cells = find_all(r, "td");
  ASSERT_EQ(cells.size(), 18u);  // 3 rows x 6 columns, the short row padded
  EXPECT_EQ(cells[0].text, "temp b=2 <r=1>");
  EXPECT_EQ(cells[0].attrs.count("data-sort"), 0u);
  EXPECT_EQ(cells[1].text, "1234.57");
  EXPECT_EQ(std::stod(cells[1].attrs.at("data-sort")), 1234.5678);
  EXPECT_EQ(cells[2].attrs.at("data-sort"), "0.81234");
  EXPECT_EQ(cells[3].text, "78.8%");
  EXPECT_EQ(cells[4].text, "< 0.001");
  EXPECT_EQ(cells[5].attrs.at("data-sort"), "7");
  EXPECT_EQ(cells[8].attrs.at("data-sort"), "NaN");  // NaN MASE
  EXPECT_EQ(cells[8].text, "\u2014");
  EXPECT_EQ(cells[16].attrs.at("data-sort"), "NaN");  // padded numeric cell
  EXPECT_EQ(cells[16].text, "");
  EXPECT_EQ(cells[1].attrs.at("class"), "num");
  EXPECT_EQ(find_all(r, "tr", "highlight").size(), 1u);
  const auto heads = find_all(r, "th");
  ASSERT_EQ(heads.size(), 6u);
  EXPECT_EQ(heads[3].text, "coverage ");  // unit in a nested span
  EXPECT_EQ(find_all(r, "span", "unit").size(), 1u);
}

TEST(Html, SortScriptOnlyWhenAsked) {
  const auto with = parse_markup(render_html(example_page(true)));
  const auto without = parse_markup(render_html(example_page(false)));
  ASSERT_TRUE(with.ok && without.ok);
  const auto scripts = find_all(with, "script");
  ASSERT_EQ(scripts.size(), 1u);
  EXPECT_EQ(scripts[0].attrs.count("src"), 0u);  // inline, never fetched
  EXPECT_NE(scripts[0].text.find("table.sortable"), std::string::npos);
  EXPECT_TRUE(find_all(without, "script").empty());
  EXPECT_TRUE(find_all(without, "table", "sortable").empty());
}

TEST(Html, EmptyPage) {
  HtmlPage page;
  page.title = "Empty";
  const std::string html = render_html(page);
  const auto r = parse_markup(html);
  ASSERT_TRUE(r.ok) << r.error;
  EXPECT_TRUE(find_all(r, "nav").empty());
}

}  // namespace
}  // namespace lagsieve
