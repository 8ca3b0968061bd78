// SVG charts: well-formed, self-contained, escaped, and the plotted numbers read back exactly
// (data attributes) and sit where the axis scale puts them (pixel geometry).
#include "report/svg.h"

#include <gtest/gtest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "markup_check.h"

namespace lagsieve {
namespace {

using test::find_all;
using test::parse_markup;

std::vector<double> numbers(const std::string& list) {
  std::vector<double> v;
  std::istringstream in(list);
  std::string tok;
  while (in >> tok) v.push_back(tok == "NaN" ? std::nan("") : std::stod(tok));
  return v;
}

// Coordinates of "M x y L x y ..." paths, in order.
std::vector<std::pair<double, double>> path_points(const std::string& d) {
  std::vector<std::pair<double, double>> pts;
  std::string cleaned;
  for (char c : d) cleaned += (c == 'M' || c == 'L' || c == 'Z') ? ' ' : c;
  const std::vector<double> v = numbers(cleaned);
  for (size_t i = 0; i + 1 < v.size(); i += 2) pts.emplace_back(v[i], v[i + 1]);
  return pts;
}

void expect_same(const std::vector<double>& got, const std::vector<double>& want) {
  ASSERT_EQ(got.size(), want.size());
  for (size_t i = 0; i < got.size(); ++i) {
    if (std::isnan(want[i]))
      EXPECT_TRUE(std::isnan(got[i])) << i;
    else
      EXPECT_EQ(got[i], want[i]) << i;  // exact: the attribute is the shortest round-trip form
  }
}

void expect_wellformed_and_offline(const std::string& svg) {
  const auto r = parse_markup(svg);
  ASSERT_TRUE(r.ok) << r.error;
  ASSERT_FALSE(r.elements.empty());
  EXPECT_EQ(r.elements.front().name, "svg");
  EXPECT_EQ(r.elements.front().attrs.at("xmlns"), "http://www.w3.org/2000/svg");
  EXPECT_EQ(test::external_urls(svg), 0);
  EXPECT_EQ(svg.find(" id=\""), std::string::npos) << "ids would collide between charts";
}

TEST(Svg, EscapeMarkup) {
  EXPECT_EQ(escape_markup("a<b & c>d \"q\" 'x'"),
            "a&lt;b &amp; c&gt;d &quot;q&quot; &#39;x&#39;");
}

TEST(Svg, FormatExactRoundTrips) {
  for (double v : {0.1, 1.0 / 3.0, -2.5e-300, 123456789.123, 1e21, -0.0}) {
    EXPECT_EQ(std::stod(format_exact(v)), v);
  }
  EXPECT_EQ(format_exact(std::nan("")), "NaN");
}

TEST(Svg, PaletteIsOkabeIto) {
  const std::vector<std::string> want = {"#0072B2", "#D55E00", "#009E73", "#E69F00",
                                         "#CC79A7", "#56B4E9", "#F0E442", "#000000"};
  for (int i = 0; i < 8; ++i) EXPECT_EQ(palette_colour(i), want[static_cast<size_t>(i)]);
  EXPECT_EQ(palette_colour(8), "#0072B2");
  EXPECT_EQ(palette_colour(-1), "#000000");
}

TEST(Svg, NiceTicks) {
  EXPECT_EQ(nice_ticks(0.0, 10.0, 6), (std::vector<double>{0, 2, 4, 6, 8, 10}));
  EXPECT_EQ(nice_ticks(-0.37, 0.42, 6), (std::vector<double>{-0.4, -0.2, 0, 0.2, 0.4, 0.6}));
  EXPECT_EQ(nice_ticks(0.61, 0.99, 5), (std::vector<double>{0.6, 0.7, 0.8, 0.9, 1.0}));
  const auto t = nice_ticks(13.2, 987.0, 6);
  EXPECT_LE(t.front(), 13.2);
  EXPECT_GE(t.back(), 987.0);
  EXPECT_DOUBLE_EQ(t[1] - t[0], 200.0);
  const auto flat = nice_ticks(5.0, 5.0, 5);
  EXPECT_LT(flat.front(), 5.0);
  EXPECT_GT(flat.back(), 5.0);
  EXPECT_TRUE(nice_ticks(0.0, std::nan(""), 5).empty());
}

LineChart example_line_chart() {
  LineChart c;
  c.frame.title = "Demand <forecast> & history";
  c.frame.subtitle = "Look for: the actuals staying inside the band";
  c.frame.x_title = "Day (index)";
  c.frame.y_title = "Demand (MWh)";
  c.series.push_back({"history", {0, 1, 2, 3, 4}, {10.5, 11.25, std::nan(""), 9.0, 12.0}, -1, true,
                      LineStyle::solid, false});
  c.series.push_back({"model <A> & co", {4, 5, 6}, {12.0, 12.5, 13.1}, 0, false, LineStyle::dashed,
                      true});
  c.bands.push_back({"95%", {4, 5, 6}, {11.0, 10.0, 9.5}, {13.0, 15.0, 16.7}, 0, 0.2,
                     BandStyle::filled});
  c.x_rule = 4.0;
  c.x_rule_label = "origin";
  return c;
}

TEST(Svg, LineChartIsWellFormedAndEscaped) {
  const std::string svg = line_chart_svg(example_line_chart());
  expect_wellformed_and_offline(svg);
  EXPECT_EQ(svg.find("<A>"), std::string::npos);
  EXPECT_EQ(svg.find("<forecast>"), std::string::npos);
  EXPECT_NE(svg.find("model &lt;A&gt; &amp; co"), std::string::npos);
  const auto r = parse_markup(svg);
  const auto titles = find_all(r, "title");
  ASSERT_EQ(titles.size(), 1u);
  EXPECT_EQ(titles[0].text, "Demand <forecast> & history");
}

TEST(Svg, LineChartDataReadsBackAndMapsToPixels) {
  const LineChart chart = example_line_chart();
  const auto r = parse_markup(line_chart_svg(chart));
  ASSERT_TRUE(r.ok) << r.error;
  const auto series = find_all(r, "g", "series");
  ASSERT_EQ(series.size(), 2u);
  EXPECT_EQ(series[1].attrs.at("data-series"), "model <A> & co");
  for (size_t s = 0; s < 2; ++s) {
    expect_same(numbers(series[s].attrs.at("data-x")), chart.series[s].x);
    expect_same(numbers(series[s].attrs.at("data-values")), chart.series[s].y);
  }
  const auto bands = find_all(r, "path", "band");
  ASSERT_EQ(bands.size(), 1u);
  expect_same(numbers(bands[0].attrs.at("data-lower")), chart.bands[0].lower);
  expect_same(numbers(bands[0].attrs.at("data-upper")), chart.bands[0].upper);

  // Markers: one per point of the marked series, each at the pixel the (shared) linear scale
  // gives: fit the scale on two markers, check the third.
  const auto points = find_all(r, "circle", "point");
  ASSERT_EQ(points.size(), 3u);
  std::vector<double> value, cx, cy;
  for (const auto& p : points) {
    value.push_back(std::stod(p.attrs.at("data-value")));
    cx.push_back(std::stod(p.attrs.at("cx")));
    cy.push_back(std::stod(p.attrs.at("cy")));
  }
  expect_same(value, {12.0, 12.5, 13.1});
  const double slope = (cy[1] - cy[0]) / (value[1] - value[0]);
  EXPECT_LT(slope, 0.0);  // larger values higher up
  EXPECT_NEAR(cy[2], cy[0] + slope * (value[2] - value[0]), 0.02);
  EXPECT_NEAR(cx[2] - cx[1], cx[1] - cx[0], 0.02);  // equally spaced x

  // The history path breaks at the NaN: two subpaths, 4 points, on the same y scale.
  const auto paths = find_all(r, "path");
  std::string history_d;
  for (const auto& p : paths)
    if (p.attrs.count("stroke") && p.attrs.at("stroke") == "#000000" && p.attrs.count("d"))
      history_d = p.attrs.at("d");
  ASSERT_FALSE(history_d.empty());
  EXPECT_EQ(std::count(history_d.begin(), history_d.end(), 'M'), 2);
  const auto hp = path_points(history_d);
  ASSERT_EQ(hp.size(), 4u);
  const std::vector<double> hv = {10.5, 11.25, 9.0, 12.0};
  for (size_t i = 0; i < hp.size(); ++i)
    EXPECT_NEAR(hp[i].second, cy[0] + slope * (hv[i] - value[0]), 0.02) << i;
}

TEST(Svg, LineChartWithoutDataSaysSo) {
  LineChart c;
  c.frame.title = "Nothing yet";
  const std::string svg = line_chart_svg(c);
  expect_wellformed_and_offline(svg);
  EXPECT_NE(svg.find("No data to plot"), std::string::npos);
}

TEST(Svg, FanChartHasTwoBandFamilies) {
  FanChartData d;
  d.frame.title = "Inputs forecast widen the 95% band by a third";
  d.history_x = {0, 1, 2, 3};
  d.history = {5, 6, 5.5, 6.2};
  d.forecast_x = {3, 4, 5};
  d.forecast = {6.2, 6.4, 6.5};
  d.bands.push_back({"inputs forecast", {6.2, 5.6, 5.2}, {6.2, 7.2, 7.8}, {6.2, 5.0, 4.4},
                     {6.2, 7.8, 8.6}});
  d.bands.push_back({"inputs known", {6.2, 5.8, 5.5}, {6.2, 7.0, 7.5}, {6.2, 5.4, 4.9},
                     {6.2, 7.4, 8.1}});
  const LineChart lc = fan_chart(d);
  ASSERT_EQ(lc.bands.size(), 4u);
  EXPECT_EQ(lc.bands[0].name, "95% (inputs forecast)");
  EXPECT_EQ(lc.bands[3].name, "80% (inputs known)");
  EXPECT_EQ(lc.bands[0].style, BandStyle::filled);
  EXPECT_EQ(lc.bands[2].style, BandStyle::outline);
  ASSERT_TRUE(lc.x_rule.has_value());
  EXPECT_EQ(*lc.x_rule, 3.0);

  const std::string svg = fan_chart_svg(d);
  expect_wellformed_and_offline(svg);
  const auto r = parse_markup(svg);
  const auto bands = find_all(r, "path", "band");
  ASSERT_EQ(bands.size(), 4u);
  expect_same(numbers(bands[2].attrs.at("data-upper")), d.bands[1].outer_upper);
  EXPECT_EQ(bands[2].attrs.at("fill"), "none");
  const auto legend = find_all(r, "g", "legend");
  ASSERT_EQ(legend.size(), 1u);
}

BarChart example_bars() {
  BarChart b;
  b.frame.title = "Bars beyond the dashed band suggest the delay";
  b.frame.x_title = "Lag (weeks)";
  b.frame.y_title = "Cross-correlation";
  b.x = {-2, -1, 0, 1, 2, 3, 4};
  b.values = {0.05, -0.12, 0.08, 0.61, 0.33, std::nan(""), -0.31};
  b.band = {0.25};
  b.y_min = -1.0;
  b.y_max = 1.0;
  return b;
}

TEST(Svg, BarChartValuesAndGeometry) {
  const BarChart b = example_bars();
  const std::string svg = bar_chart_svg(b);
  expect_wellformed_and_offline(svg);
  const auto r = parse_markup(svg);
  const auto bars = find_all(r, "rect", "bar");
  ASSERT_EQ(bars.size(), 6u);  // NaN at lag 3 draws nothing
  const auto beyond = find_all(r, "rect", "beyond");
  ASSERT_EQ(beyond.size(), 3u);  // 0.61, 0.33, -0.31 exceed 0.25
  EXPECT_EQ(beyond[0].attrs.at("data-x"), "1");

  // Heights proportional to |value|; positive bars end at the zero line from above, negative
  // start at it.
  double per_unit = 0.0;
  double zero_y = 0.0;
  for (const auto& bar : bars) {
    const double v = std::stod(bar.attrs.at("data-value"));
    const double h = std::stod(bar.attrs.at("height"));
    const double y = std::stod(bar.attrs.at("y"));
    if (per_unit == 0.0) {
      per_unit = h / std::fabs(v);
      zero_y = v > 0 ? y + h : y;
    }
    EXPECT_NEAR(h, per_unit * std::fabs(v), 0.02) << v;
    EXPECT_NEAR(v > 0 ? y + h : y, zero_y, 0.02) << v;
  }
  std::vector<double> got;
  for (const auto& bar : bars) got.push_back(std::stod(bar.attrs.at("data-value")));
  expect_same(got, {0.05, -0.12, 0.08, 0.61, 0.33, -0.31});
  // The fixed -1..1 range: axis labels include both ends.
  EXPECT_NE(svg.find(">-1.0<"), std::string::npos);
  EXPECT_NE(svg.find(">1.0<"), std::string::npos);
}

TEST(Svg, BarChartVariableBand) {
  BarChart b = example_bars();
  b.band = {0.7, 0.7, 0.7, 0.7, 0.2, 0.2, 0.2};  // only lag 2 (0.33) and lag 4 (-0.31) beyond
  const auto r = parse_markup(bar_chart_svg(b));
  ASSERT_TRUE(r.ok) << r.error;
  const auto beyond = find_all(r, "rect", "beyond");
  ASSERT_EQ(beyond.size(), 2u);
  EXPECT_EQ(beyond[0].attrs.at("data-x"), "2");
  EXPECT_EQ(beyond[1].attrs.at("data-x"), "4");
  EXPECT_EQ(beyond[1].attrs.at("data-band"), "0.2");
  EXPECT_EQ(find_all(r, "path", "band-line").size(), 2u);
}

TEST(Svg, HorizonChart) {
  HorizonChart h;
  h.frame.title = "The chosen model's error stays lowest at every horizon";
  h.frame.x_title = "Horizon (steps ahead)";
  h.frame.y_title = "MASE";
  h.horizons = {1, 2, 3, 4};
  h.series.push_back({"chosen", {0.5, 0.7, 0.8, 0.95}, false});
  h.series.push_back({"seasonal naive", {1.0, 1.1, 1.15, 1.2}, true});
  h.series.push_back({"no inputs", {0.6, std::nan(""), 0.9}, false});  // short and with a gap
  const LineChart lc = horizon_line_chart(h);
  ASSERT_EQ(lc.x_ticks.size(), 4u);
  EXPECT_EQ(lc.series[1].style, LineStyle::dashed);
  const std::string svg = horizon_chart_svg(h);
  expect_wellformed_and_offline(svg);
  const auto r = parse_markup(svg);
  const auto pts = find_all(r, "circle", "point");
  ASSERT_EQ(pts.size(), 4u + 4u + 2u);
  EXPECT_EQ(pts[4].attrs.at("data-series"), "seasonal naive");
  EXPECT_EQ(pts[4].attrs.at("data-x"), "1");
  EXPECT_EQ(pts[4].attrs.at("data-value"), "1");
  EXPECT_EQ(pts[9].attrs.at("data-x"), "3");
  EXPECT_EQ(pts[9].attrs.at("data-value"), "0.9");
}

TEST(Svg, CoverageChart) {
  CoverageChart c;
  c.frame.title = "Points below the diagonal are over-confident intervals";
  c.frame.x_title = "Nominal coverage (%)";
  c.frame.y_title = "Empirical coverage (%)";
  c.nominal = {0.8, 0.95};
  c.series.push_back({"chosen", {0.78, 0.94}, 100});
  c.series.push_back({"A & B <test>", {0.62, 0.85}, 100});
  const std::string svg = coverage_chart_svg(c);
  expect_wellformed_and_offline(svg);
  const auto r = parse_markup(svg);
  const auto pts = find_all(r, "circle", "point");
  ASSERT_EQ(pts.size(), 4u);
  EXPECT_EQ(pts[3].attrs.at("data-series"), "A & B <test>");
  EXPECT_EQ(pts[3].attrs.at("data-nominal"), "0.95");
  EXPECT_EQ(pts[3].attrs.at("data-value"), "0.85");
  // Sampling range at 80%, n = 100: 0.8 +- 1.96 sqrt(0.8 * 0.2 / 100) = 0.8 +- 0.0784.
  const auto bars = find_all(r, "rect", "sampling");
  ASSERT_EQ(bars.size(), 2u);
  EXPECT_NEAR(std::stod(bars[0].attrs.at("data-lower")), 0.8 - 0.0784, 1e-12);
  EXPECT_NEAR(std::stod(bars[0].attrs.at("data-upper")), 0.8 + 0.0784, 1e-12);
  // Same scale on both axes: a point with empirical == nominal would sit on the diagonal, so
  // the chosen model's 0.78 at 0.8 lies just below it.
  const auto diag = find_all(r, "line", "diagonal");
  ASSERT_EQ(diag.size(), 1u);
  EXPECT_NE(svg.find(">80%<"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
