// The run report: built from a synthetic run folder with known numbers, it must be well-formed
// and self-contained, hold every section whose files exist (and no other), and every chart must
// carry exactly the numbers of the run files it was drawn from.
#include "report/report.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "core/error.h"
#include "markup_check.h"
#include "report_fixture.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

using test::Element;
using test::find_all;
using test::fresh_dir;
using test::json;
using test::parse_markup;
using test::write_text;
namespace fs = std::filesystem;

using lagsieve::testing::slurp;

std::vector<double> numbers(const std::string& list) {
  std::vector<double> v;
  std::istringstream in(list);
  std::string tok;
  while (in >> tok) v.push_back(tok == "NaN" ? std::nan("") : std::stod(tok));
  return v;
}

std::vector<double> from_json(const json& a) {
  std::vector<double> v;
  for (const auto& e : a) v.push_back(e.is_null() ? std::nan("") : e.get<double>());
  return v;
}

void expect_same(const std::vector<double>& got, const std::vector<double>& want,
                 const std::string& what) {
  ASSERT_EQ(got.size(), want.size()) << what;
  for (size_t i = 0; i < got.size(); ++i) {
    if (std::isnan(want[i]))
      EXPECT_TRUE(std::isnan(got[i])) << what << " [" << i << "]";
    else
      EXPECT_EQ(got[i], want[i]) << what << " [" << i << "]";  // shortest round-trip form: exact
  }
}

// A standalone chart: parsed, checked well-formed and offline, and found verbatim in the page.
test::ParseResult chart(const fs::path& dir, const std::string& file, const std::string& html) {
  const std::string svg = slurp(dir / "charts" / file);
  EXPECT_FALSE(svg.empty()) << file;
  EXPECT_NE(html.find(svg), std::string::npos) << file << " is not the chart in the page";
  EXPECT_EQ(test::external_urls(svg), 0) << file;
  auto r = parse_markup(svg);
  EXPECT_TRUE(r.ok) << file << ": " << r.error;
  return r;
}

const Element* series_named(const test::ParseResult& r, const std::string& name) {
  for (const auto& e : r.elements)
    if (e.name == "g" && e.attrs.count("data-series") && e.attrs.at("data-series") == name &&
        e.attrs.count("data-values"))
      return &e;
  return nullptr;
}

const Element* band_named(const test::ParseResult& r, const std::string& name) {
  for (const auto& e : r.elements)
    if (e.attrs.count("data-band") && e.attrs.at("data-band") == name &&
        e.attrs.count("data-lower"))
      return &e;
  return nullptr;
}

std::vector<std::string> headings(const test::ParseResult& r) {
  std::vector<std::string> out;
  for (const auto& e : find_all(r, "h2")) out.push_back(e.text);
  return out;
}

// Cells of the table whose caption starts with `caption`, row by row.
std::vector<std::vector<std::string>> table_cells(const std::string& html,
                                                  const std::string& caption) {
  const size_t at = html.find("<caption>" + caption);
  if (at == std::string::npos) return {};
  const size_t end = html.find("</table>", at);
  const size_t start = html.rfind("<table", at);
  const auto r = parse_markup(html.substr(start, end + 8 - start));
  std::vector<std::vector<std::string>> rows;
  for (const auto& e : r.elements) {
    if (e.name == "tr") rows.emplace_back();
    if (e.name == "td" && !rows.empty()) rows.back().push_back(e.text);
  }
  if (!rows.empty() && rows.front().empty()) rows.erase(rows.begin());  // header row
  return rows;
}

class ReportFolder : public ::testing::Test {
 protected:
  void SetUp() override {
    dir = fresh_dir("full");
    test::write_full_run(dir);
  }
  void TearDown() override { fs::remove_all(dir); }
  fs::path dir;
};

TEST_F(ReportFolder, PageIsWellFormedSelfContainedAndHasEverySection) {
  const ReportResult r = write_report(dir);
  EXPECT_EQ(r.path, dir / "report.html");
  const std::string html = slurp(r.path);
  const auto doc = parse_markup(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  EXPECT_EQ(test::external_urls(html), 0);
  EXPECT_EQ(html.find("<script src"), std::string::npos);
  EXPECT_EQ(html.find("<link"), std::string::npos);
  EXPECT_EQ(html.find("<img"), std::string::npos);

  const std::vector<std::string> want = {
      "Run summary",         "Inputs: cross-correlation and impulse response",
      "Ranking",         "Forecast",
      "The past, explained", "Backtest",
      "Chosen model diagnostics"};
  EXPECT_EQ(headings(doc), want);
  EXPECT_EQ(r.sections, want);
  EXPECT_TRUE(r.warnings.empty());

  // The config text sits in a collapsible block, escaped, and reads back verbatim.
  const auto pre = find_all(doc, "pre");
  ASSERT_EQ(pre.size(), 1u);
  EXPECT_EQ(pre[0].text, test::chosen_model("demand").training.config_text);
  EXPECT_EQ(find_all(doc, "details").size(), 1u);
  EXPECT_NE(html.find("&lt;b&gt;&amp;amp;&lt;/b&gt;"), std::string::npos);

  // Warnings of the screen and the fit are shown.
  EXPECT_NE(html.find("temp and price move together (corr 0.83)"), std::string::npos);
  EXPECT_NE(html.find("omega of temp is large"), std::string::npos);

  // One chart file per figure, every one of them embedded in the page.
  const std::vector<std::string> files = {"ccf_temp.svg",
                                          "impulse_temp.svg",
                                          "ccf_price.svg",
                                          "impulse_price.svg",
                                          "forecast_fan.svg",
                                          "past_fitted.svg",
                                          "past_residuals.svg",
                                          "past_contributions.svg",
                                          "past_residual_quantiles.svg",
                                          "backtest_error_by_horizon.svg",
                                          "backtest_inputs_known_vs_forecast.svg",
                                          "coverage.svg",
                                          "backtest_one_step.svg",
                                          "residual_acf.svg",
                                          "residual_ccf_temp.svg"};
  ASSERT_EQ(r.charts.size(), files.size());
  for (size_t i = 0; i < files.size(); ++i) {
    EXPECT_EQ(r.charts[i], dir / "charts" / files[i]);
    chart(dir, files[i], html);
  }
  EXPECT_EQ(find_all(doc, "svg").size(), files.size());
}

TEST_F(ReportFolder, CrossCorrelationBarsAreTheScreensNumbers) {
  const std::string html = slurp(write_report(dir).path);
  const json screen = test::screen_json("demand");
  for (size_t i = 0; i < 2; ++i) {
    const json& in = screen["inputs"][i];
    const std::string name = in["name"];
    const auto svg = chart(dir, "ccf_" + name + ".svg", html);
    const auto bars = find_all(svg, "rect", "bar");
    std::vector<double> lags, values;
    for (const auto& b : bars) {
      lags.push_back(std::stod(b.attrs.at("data-x")));
      values.push_back(std::stod(b.attrs.at("data-value")));
      EXPECT_EQ(std::stod(b.attrs.at("data-band")), 0.2);
    }
    std::vector<double> want_lags, want_values;  // null correlations draw no bar
    for (size_t k = 0; k < in["lags"].size(); ++k)
      if (!in["cross_correlation"][k].is_null()) {
        want_lags.push_back(in["lags"][k].get<double>());
        want_values.push_back(in["cross_correlation"][k].get<double>());
      }
    expect_same(lags, want_lags, name + " lags");
    expect_same(values, want_values, name + " correlations");
  }
  // Beyond the band: lags 1 and 2 of temp (0.62, 0.31 > 0.2).
  EXPECT_EQ(find_all(chart(dir, "ccf_temp.svg", html), "rect", "beyond").size(), 2u);
}

TEST_F(ReportFolder, ImpulseResponsesAreTheScreensAndTheChosenModels) {
  const std::string html = slurp(write_report(dir).path);
  const json temp = test::screen_json("demand")["inputs"][0];
  const auto svg = chart(dir, "impulse_temp.svg", html);
  const Element* est = series_named(svg, "screen estimate");
  ASSERT_NE(est, nullptr);
  expect_same(numbers(est->attrs.at("data-x")), {0, 1, 2, 3}, "lags");
  expect_same(numbers(est->attrs.at("data-values")), from_json(temp["impulse"]), "screen estimate");
  const Element* shape = series_named(svg, "screen shape b1 s0 r1");
  ASSERT_NE(shape, nullptr);
  expect_same(numbers(shape->attrs.at("data-values")), from_json(temp["impulse_fitted"]),
              "screen shape");
  // Closed form of omega_0 B / (1 - 0.5 B) with omega_0 = 2: 0, 2, 1, 0.5.
  const Element* chosen = series_named(svg, "chosen model b1 s0 r1");
  ASSERT_NE(chosen, nullptr);
  expect_same(numbers(chosen->attrs.at("data-values")), {0.0, 2.0, 1.0, 0.5}, "chosen");
  const Element* band = band_named(svg, "screen estimate \u00b1 2 s.e.");
  ASSERT_NE(band, nullptr);
  std::vector<double> lo, hi;
  for (size_t k = 0; k < 4; ++k) {
    lo.push_back(temp["impulse"][k].get<double>() - 2.0 * temp["impulse_se"][k].get<double>());
    hi.push_back(temp["impulse"][k].get<double>() + 2.0 * temp["impulse_se"][k].get<double>());
  }
  expect_same(numbers(band->attrs.at("data-lower")), lo, "band lower");
  expect_same(numbers(band->attrs.at("data-upper")), hi, "band upper");
  // price is not in the chosen model: no chosen model line.
  const auto price = chart(dir, "impulse_price.svg", html);
  for (const auto& e : find_all(price, "g", "series"))
    EXPECT_EQ(e.attrs.at("data-series").rfind("chosen", 0), std::string::npos);
}

TEST_F(ReportFolder, FanChartCarriesHistoryForecastAndBothBandSets) {
  const std::string html = slurp(write_report(dir).path);
  const json fj = test::forecast_json("demand");
  const json& fc = fj["forecast"];
  const auto svg = chart(dir, "forecast_fan.svg", html);
  const Element* hist = series_named(svg, "History");
  ASSERT_NE(hist, nullptr);
  expect_same(numbers(hist->attrs.at("data-values")), from_json(fj["history"]["values"]),
              "history");
  expect_same(numbers(hist->attrs.at("data-x")), {-4, -3, -2, -1, 0}, "history x");
  const Element* point = series_named(svg, "Forecast");
  ASSERT_NE(point, nullptr);
  expect_same(numbers(point->attrs.at("data-values")), from_json(fc["median"]), "median");
  expect_same(numbers(point->attrs.at("data-x")), {1, 2, 3}, "forecast x");
  const std::map<std::string, std::pair<std::string, std::string>> bands = {
      {"80% (inputs forecast)", {"lower", "0.8"}},
      {"95% (inputs forecast)", {"lower", "0.95"}},
      {"80% (inputs known)", {"lower_inputs_known", "0.8"}},
      {"95% (inputs known)", {"lower_inputs_known", "0.95"}}};
  for (const auto& [name, key] : bands) {
    const Element* b = band_named(svg, name);
    ASSERT_NE(b, nullptr) << name;
    const std::string upper = key.first == "lower" ? "upper" : "upper_inputs_known";
    expect_same(numbers(b->attrs.at("data-lower")), from_json(fc[key.first][key.second]), name);
    expect_same(numbers(b->attrs.at("data-upper")), from_json(fc[upper][key.second]), name);
  }
  // Dates label the time axis.
  bool dated = false;
  for (const auto& t : find_all(svg, "text"))
    dated = dated || t.text == "2024-04-10" || t.text == "2024-04-07" || t.text == "2024-04-05";
  EXPECT_TRUE(dated);
  // The table's input share: 1 - (15.5 - 8.5) / (17 - 7) = 30% at step 3.
  const auto rows = table_cells(html, "Forecast values");
  ASSERT_EQ(rows.size(), 3u);
  EXPECT_EQ(rows[2].back(), "30%");
  EXPECT_EQ(rows[0][1], "2024-04-10");
}

// The past charts plot fit.json "past" as it is; the fan borrows the fitted values of its
// history stretch; an event of the model file is marked in both.
TEST_F(ReportFolder, PastChartsAreFitJsonPastWithEventsMarked) {
  FittedModel model = test::chosen_model("demand");
  model.spec.inputs.push_back(InputTerm{"promo", InputOrder{0, 0, 0}});
  model.params.inputs.push_back(InputParams{{1.5}, {}});
  InputUse promo;
  promo.name = "promo";
  promo.is_event = true;
  promo.shape = EventShape::step;
  promo.at = "2024-04-07";
  model.inputs.push_back(promo);
  save_model(dir / "model.json", model);
  const std::string html = slurp(write_report(dir).path);
  const json past = test::past_json();
  const std::vector<double> x = {92, 93, 94, 95, 96, 97, 98, 99, 100};

  const auto fitted = chart(dir, "past_fitted.svg", html);
  const Element* actual = series_named(fitted, "Actual");
  const Element* fit = series_named(fitted, "Fitted (one step)");
  ASSERT_TRUE(actual && fit);
  expect_same(numbers(actual->attrs.at("data-x")), x, "rows");
  expect_same(numbers(actual->attrs.at("data-values")), from_json(past["actual"]), "actual");
  expect_same(numbers(fit->attrs.at("data-values")), from_json(past["fitted"]), "fitted");
  const auto marks = find_all(fitted, "g", "mark");
  ASSERT_EQ(marks.size(), 1u);
  EXPECT_EQ(marks[0].attrs.at("data-label"), "promo");
  EXPECT_EQ(marks[0].attrs.at("data-x"), "98");

  const auto res = chart(dir, "past_residuals.svg", html);
  const Element* band = band_named(res, "\u00b12\u03c3 (the model's residual sd)");
  ASSERT_NE(band, nullptr);
  std::vector<double> lower;
  for (double sd : from_json(past["residual_sd"])) lower.push_back(-2.0 * sd);
  expect_same(numbers(band->attrs.at("data-lower")), lower, "-2 sd");
  const auto largest = find_all(res, "g", "mark");
  ASSERT_EQ(largest.size(), 1u);  // -0.75 / 1.25 = -0.6 sd on 2024-04-07
  EXPECT_EQ(largest[0].attrs.at("data-label"), "largest: 2024-04-07");
  EXPECT_NE(html.find("The largest residual is -0.75 at 2024-04-07"), std::string::npos);

  const auto contrib = chart(dir, "past_contributions.svg", html);
  const Element* temp = band_named(contrib, "temp");
  ASSERT_NE(temp, nullptr);  // one input: from zero to its value, either side
  expect_same(numbers(temp->attrs.at("data-lower")), {0, 0, 0, -0.5, -1, 0, 0, 0, 0}, "lower");
  expect_same(numbers(temp->attrs.at("data-upper")), {1, 0.5, 0.25, 0, 0, 0.5, 1.5, 1, 0}, "upper");

  const auto qq = chart(dir, "past_residual_quantiles.svg", html);
  EXPECT_EQ(find_all(qq, "circle", "point").size(), 8u);  // the missing row has no residual
  EXPECT_EQ(table_cells(html, "Largest residuals").size(), 5u);

  const auto fan = chart(dir, "forecast_fan.svg", html);
  const Element* ffit = series_named(fan, "Fitted (one step)");
  ASSERT_NE(ffit, nullptr);
  expect_same(numbers(ffit->attrs.at("data-x")), {-4, -3, -2, -1, 0}, "fan fitted x");
  expect_same(numbers(ffit->attrs.at("data-values")), {9.5, 9.0, 9.5, 9.75, 10.0}, "fan fitted");
  const auto fan_marks = find_all(fan, "g", "mark");
  ASSERT_EQ(fan_marks.size(), 1u);
  EXPECT_EQ(fan_marks[0].attrs.at("data-x"), "-2");
}

TEST_F(ReportFolder, BacktestChartsAreTheAccuracyAndBacktestFiles) {
  const std::string html = slurp(write_report(dir).path);
  const std::string chosen = "temp b1 s0 r1 + ARMA(1,0)";
  const auto err = chart(dir, "backtest_error_by_horizon.svg", html);
  const Element* l = series_named(err, chosen + " (chosen model)");
  const Element* c = series_named(err, "temp b1 s1 r0 + ARMA(1,0)");
  const Element* bench = series_named(err, "benchmark: no inputs");
  ASSERT_TRUE(l && c && bench);
  expect_same(numbers(l->attrs.at("data-x")), {1, 2}, "horizons");
  expect_same(numbers(l->attrs.at("data-values")), {1.0, 1.5}, "chosen model MAE");
  expect_same(numbers(c->attrs.at("data-values")), {1.125, 1.625}, "runner-up MAE");
  expect_same(numbers(bench->attrs.at("data-values")), {1.75, 2.25}, "benchmark MAE");
  // Only the benchmark is dashed: the path right after each series group.
  for (size_t i = 0; i + 1 < err.elements.size(); ++i) {
    const Element& g = err.elements[i];
    if (g.name != "g" || !g.attrs.count("data-values")) continue;
    const bool dashed = err.elements[i + 1].attrs.count("stroke-dasharray") > 0;
    EXPECT_EQ(dashed, g.attrs.at("data-series") == "benchmark: no inputs")
        << g.attrs.at("data-series");
  }

  const auto oc = chart(dir, "backtest_inputs_known_vs_forecast.svg", html);
  const Element* prod = series_named(oc, "inputs as in production");
  const Element* oracle = series_named(oc, "inputs known (oracle)");
  ASSERT_TRUE(prod && oracle);
  expect_same(numbers(prod->attrs.at("data-values")), {1.0, 1.5}, "production");
  expect_same(numbers(oracle->attrs.at("data-values")), {0.875, 1.375}, "oracle");

  const auto cov = chart(dir, "coverage.svg", html);
  std::map<std::string, std::vector<double>> got;
  for (const auto& p : find_all(cov, "circle", "point"))
    got[p.attrs.at("data-series")].push_back(std::stod(p.attrs.at("data-value")));
  expect_same(got[chosen + " (chosen model)"], {0.775, 0.925}, "chosen model coverage");
  expect_same(got["temp b1 s1 r0 + ARMA(1,0)"], {0.7, 0.9}, "runner-up coverage");
  expect_same(got["benchmark: no inputs"], {0.8, 0.95}, "benchmark coverage");
  const auto sampling = find_all(cov, "rect", "sampling");
  ASSERT_EQ(sampling.size(), 2u);  // n = 40 from the chosen model's count
  EXPECT_NEAR(std::stod(sampling[0].attrs.at("data-upper")) - 0.8, 1.96 * std::sqrt(0.8 * 0.2 / 40),
              1e-12);

  // Chosen model, production, horizon 1, in file order: origins 80, 81, 82.
  const auto one = chart(dir, "backtest_one_step.svg", html);
  const Element* actual = series_named(one, "actual");
  const Element* fcast = series_named(one, "one-step forecast");
  ASSERT_TRUE(actual && fcast);
  expect_same(numbers(actual->attrs.at("data-values")), {9.75, 10.5, 8.0}, "actual");
  expect_same(numbers(fcast->attrs.at("data-values")), {9.5, 10.125, 8.5}, "forecast");
  const Element* b80 = band_named(one, "80% interval");
  const Element* b95 = band_named(one, "95% interval");
  ASSERT_TRUE(b80 && b95);
  expect_same(numbers(b80->attrs.at("data-lower")), {8, 8.625, 7.0}, "lower 80");
  expect_same(numbers(b95->attrs.at("data-upper")), {12, 12.625, 11.0}, "upper 95");

  // One row per model: chosen model, runner-up, benchmark; the oracle MASE in the last column.
  const auto acc = table_cells(html, "Accuracy over all horizons");
  ASSERT_EQ(acc.size(), 3u);
  EXPECT_EQ(acc[0], (std::vector<std::string>{chosen + " (chosen model)", "40", "1.250", "1.500",
                                              "0.8100", "77.5%", "92.5%", "8.250", "0.7300"}));
  EXPECT_EQ(acc[2][0], "benchmark: no inputs");
  EXPECT_EQ(acc[2][8], "\u2014");  // no oracle rows
  // Per challenger: where the chosen model (negative difference, p < 0.05) or the challenger wins.
  const auto dm = table_cells(html, "Is the chosen model better than each challenger?");
  ASSERT_EQ(dm.size(), 2u);
  EXPECT_EQ(dm[0], (std::vector<std::string>{"temp b1 s1 r0 + ARMA(1,0)", "2", "none", "1", "0.020",
                                             "-0.1250", "0.218",
                                             "horizon 5: not tested (fewer than h + 3 paired "
                                             "forecasts; more origins test more horizons)"}));
  EXPECT_EQ(dm[1],
            (std::vector<std::string>{"benchmark: no inputs", "4", "1\u20132, 4", "none", "< 0.001",
                                      "-0.7500", "0.001",
                                      "horizon 2: tested with the lag-0 variance only (the "
                                      "long-run variance was not positive)"}));
  // The subtitle says what the rows are sorted by.
  EXPECT_NE(html.find("candidates ranked by"), std::string::npos);
  const auto iv = table_cells(html, "What each input is worth");
  ASSERT_EQ(iv.size(), 1u);
  EXPECT_EQ(iv[0],
            (std::vector<std::string>{"temp", "0.8100", "1.250", "0.4400", "3.25", "0.002"}));
}

TEST_F(ReportFolder, RankingAndDiagnostics) {
  const std::string html = slurp(write_report(dir).path);
  const auto doc = parse_markup(html);
  const auto lb = table_cells(html, "Top 3 of 3 candidates");
  ASSERT_EQ(lb.size(), 3u);
  EXPECT_EQ(lb[0][1], "temp b1 s0 r1 + ARMA(1,0)");
  EXPECT_EQ(lb[0][2], "301.20");
  EXPECT_EQ(lb[1][3], "1.25");     // delta BIC
  EXPECT_EQ(lb[1][5], "< 0.001");  // Ljung-Box p
  EXPECT_EQ(lb[0][8], "ok");
  EXPECT_EQ(lb[1][8], "boundary: delta near 1");
  EXPECT_EQ(lb[2][2], "\u2014");  // failed fit: no criterion
  EXPECT_EQ(lb[2][8], "numerical_failure: singular <matrix>");
  EXPECT_EQ(find_all(doc, "table", "sortable").size(),
            4u);                                           // ranking, accuracy, DM, input value
  EXPECT_EQ(find_all(doc, "tr", "highlight").size(), 2u);  // the chosen model: ranking and accuracy

  const auto svg = chart(dir, "residual_acf.svg", html);
  std::vector<double> lags, values;
  for (const auto& b : find_all(svg, "rect", "bar")) {
    lags.push_back(std::stod(b.attrs.at("data-x")));
    values.push_back(std::stod(b.attrs.at("data-value")));
  }
  expect_same(lags, {1, 2, 3, 4, 5}, "acf lags");
  expect_same(values, {0.05, -0.21, 0.1, 0.0, -0.03}, "acf");
  // Residuals against the prewhitened input: the bars, band and test are fit.json's.
  const json fit = test::fit_json("demand");
  const json& rc = fit["diagnostics"]["residual_input_ccf"][0];
  const auto ccf_svg = chart(dir, "residual_ccf_temp.svg", html);
  lags.clear();
  values.clear();
  for (const auto& b : find_all(ccf_svg, "rect", "bar")) {
    lags.push_back(std::stod(b.attrs.at("data-x")));
    values.push_back(std::stod(b.attrs.at("data-value")));
  }
  expect_same(lags, from_json(rc["lags"]), "residual-input lags");
  expect_same(values, from_json(rc["values"]), "residual-input ccf");
  const std::string ccf_text = slurp(dir / "charts" / "residual_ccf_temp.svg");
  EXPECT_NE(ccf_text.find("transfer function misses"), std::string::npos);
  // The fixture's entry has no "prewhitened" (a file written before the field): a column then.
  ASSERT_FALSE(rc.contains("prewhitened"));
  EXPECT_NE(ccf_text.find("temp: column, prewhitened by AR(1); test over lags 0\u20133: S = 11.5, "
                          "df 2, p = 0.00315 (significant)"),
            std::string::npos);
  const auto rct = table_cells(html, "Residual\u2013input cross-correlation test");
  ASSERT_EQ(rct.size(), 1u);
  EXPECT_EQ(rct[0], (std::vector<std::string>{"temp", "0\u20133", "2", "11.52", "0.003", "2",
                                              "column, prewhitened by AR(1)"}));

  const auto lbx = table_cells(html, "Ljung-Box test");
  ASSERT_EQ(lbx.size(), 2u);
  EXPECT_EQ(lbx[1], (std::vector<std::string>{"24", "23", "20.25", "0.626"}));
  const auto est = table_cells(html, "Estimates");
  ASSERT_EQ(est.size(), 3u);
  EXPECT_EQ(est[0][3], "20.00");
  EXPECT_EQ(est[2][2], "\u2014");
  const auto roots = table_cells(html, "Polynomial roots");
  ASSERT_EQ(roots.size(), 2u);
  EXPECT_EQ(roots[0][2], "2.000");
}

TEST(Report, FitFileWithoutResidualInputCheckStillLoads) {
  // fit.json written before the residual-input check: the rest of the diagnostics as before.
  const fs::path dir = fresh_dir("old-fit");
  test::write_full_run(dir);
  json fit = test::fit_json("demand");
  fit["diagnostics"].erase("residual_input_ccf");
  write_text(dir / "fit.json", fit.dump(1));
  const ReportResult r = write_report(dir);
  const std::string html = slurp(r.path);
  ASSERT_TRUE(parse_markup(html).ok);
  EXPECT_TRUE(fs::exists(dir / "charts" / "residual_acf.svg"));
  EXPECT_FALSE(fs::exists(dir / "charts" / "residual_ccf_temp.svg"));
  EXPECT_TRUE(table_cells(html, "Residual\u2013input cross-correlation test").empty());
  EXPECT_EQ(table_cells(html, "Ljung-Box test").size(), 2u);
  fs::remove_all(dir);
}

TEST(Report, ResidualInputChecksNameTheTreatmentAsTheScreenDoes) {
  // An event and an indicator column, as fit.json writes them: not prewhitened, in the screen's
  // words, in the chart's subtitle and the table.
  const fs::path dir = fresh_dir("treatment");
  test::write_full_run(dir);
  json fit = test::fit_json("demand");
  json event = fit["diagnostics"]["residual_input_ccf"][0];
  event["input"] = "promo";
  event["input_kind"] = "event";
  event["prewhitened"] = false;
  event["ar_order"] = 0;
  json indicator = event;
  indicator["input"] = "strike";
  indicator["input_kind"] = "indicator";
  indicator["indicator_shape"] = "step";
  fit["diagnostics"]["residual_input_ccf"][0]["prewhitened"] = true;
  fit["diagnostics"]["residual_input_ccf"].push_back(event);
  fit["diagnostics"]["residual_input_ccf"].push_back(indicator);
  write_text(dir / "fit.json", fit.dump(1));
  // The screen's own entries: price read as a pulse indicator column.
  json screen = test::screen_json("demand");
  screen["inputs"][1]["indicator"] = {{"shape", "pulse"}};
  screen["inputs"][1]["prewhitened"] = false;
  write_text(dir / "screen.json", screen.dump(1));
  const std::string html = slurp(write_report(dir).path);
  ASSERT_TRUE(parse_markup(html).ok);
  EXPECT_NE(slurp(dir / "charts" / "ccf_temp.svg").find("column, prewhitened by AR(2), n = 100"),
            std::string::npos);
  EXPECT_NE(slurp(dir / "charts" / "ccf_price.svg")
                .find("indicator column (pulse), not prewhitened, n = 100"),
            std::string::npos);
  const auto rct = table_cells(html, "Residual\u2013input cross-correlation test");
  ASSERT_EQ(rct.size(), 3u);
  EXPECT_EQ(rct[0].back(), "column, prewhitened by AR(1)");
  EXPECT_EQ(rct[1].back(), "event, not prewhitened");
  EXPECT_EQ(rct[2].back(), "indicator column (step), not prewhitened");
  EXPECT_NE(slurp(dir / "charts" / "residual_ccf_promo.svg").find("promo: event, not prewhitened;"),
            std::string::npos);
  EXPECT_NE(slurp(dir / "charts" / "residual_ccf_strike.svg")
                .find("strike: indicator column (step), not prewhitened;"),
            std::string::npos);
  fs::remove_all(dir);
}

TEST(Report, SeveralSeriesGetTheirOwnSectionsAndCharts) {
  const fs::path dir = fresh_dir("panel");
  for (const std::string s : {"north", "south"}) {
    save_model(dir / ("model_" + s + ".json"), test::chosen_model(s));
    write_text(dir / ("screen_" + s + ".json"), test::screen_json(s).dump());
    write_text(dir / ("fit_" + s + ".json"), test::fit_json(s).dump());
    write_text(dir / ("forecast_" + s + ".json"), test::forecast_json(s).dump());
  }
  write_text(dir / "ranking.json", test::ranking_json({"north", "south"}).dump());
  // One accuracy file for the whole run, with a series column: filtered per series.
  std::string acc;
  std::istringstream in(test::accuracy_csv());
  std::string line;
  std::getline(in, line);
  acc = "series," + line + "\n";
  while (std::getline(in, line)) acc += "north," + line + "\n";
  write_text(dir / "accuracy.csv", acc);

  const ReportResult r = write_report(dir);
  const std::vector<std::string> want = {"Run summary",
                                         "Inputs: cross-correlation and impulse response · north",
                                         "Ranking · north",
                                         "Forecast · north",
                                         "The past, explained · north",
                                         "Backtest · north",
                                         "Chosen model diagnostics · north",
                                         "Inputs: cross-correlation and impulse response · south",
                                         "Ranking · south",
                                         "Forecast · south",
                                         "The past, explained · south",
                                         "Chosen model diagnostics · south"};
  EXPECT_EQ(r.sections, want);
  const std::string html = slurp(r.path);
  ASSERT_TRUE(parse_markup(html).ok);
  for (const std::string s : {"north", "south"}) {
    EXPECT_TRUE(fs::exists(dir / "charts" / ("forecast_fan_" + s + ".svg"))) << s;
    EXPECT_TRUE(fs::exists(dir / "charts" / ("ccf_temp_" + s + ".svg"))) << s;
    EXPECT_TRUE(fs::exists(dir / "charts" / ("past_residuals_" + s + ".svg"))) << s;
  }
  // north has accuracy rows; south has none, so no backtest section and no chart of north's
  // numbers.
  const auto north = parse_markup(slurp(dir / "charts" / "backtest_error_by_horizon_north.svg"));
  EXPECT_EQ(
      numbers(series_named(north, "temp b1 s0 r1 + ARMA(1,0) (chosen model)")->attrs.at("data-values")),
      (std::vector<double>{1.0, 1.5}));
  EXPECT_FALSE(fs::exists(dir / "charts" / "backtest_error_by_horizon_south.svg"));
  fs::remove_all(dir);
}

// The re-validation page reads like a report, not like the JSON: verdict and reasons first, one
// section per question with plain labels, the new-period chart, no flattened key names.
TEST(Report, RevalidationVerdictComesFirst) {
  const fs::path dir = fresh_dir("reval");
  test::write_full_run(dir);
  write_text(dir / "revalidation.json",
             slurp(fs::path(LAGSIEVE_TEST_DATA_DIR) / "report/fixtures/revalidation_seatbelts.json"));
  const ReportResult r = write_report(dir);
  ASSERT_GE(r.sections.size(), 5u);
  EXPECT_EQ(std::vector<std::string>(r.sections.begin(), r.sections.begin() + 5),
            (std::vector<std::string>{"Verdict", "Accuracy on the new rows", "Parameter drift",
                                      "Residuals of the new rows", "Challengers"}));
  const std::string html = slurp(r.path);
  const auto doc = parse_markup(html);
  ASSERT_TRUE(doc.ok) << doc.error;
  const auto notices = find_all(doc, "div", "notice");
  ASSERT_FALSE(notices.empty());
  EXPECT_NE(notices.front().attrs.at("class").find("tone-good"), std::string::npos);
  const size_t verdict = html.find("Verdict: keep");
  ASSERT_NE(verdict, std::string::npos);
  EXPECT_LT(verdict, html.find("<h2>Run summary</h2>"));
  const auto reasons = table_cells(html, "Why");
  ASSERT_EQ(reasons.size(), 3u);
  EXPECT_EQ(reasons[2][1].rfind("note: the evidence is thin: 10 new one-step errors", 0), 0u);
  const auto accuracy = table_cells(html, "Accuracy by horizon: now and at training time");
  ASSERT_EQ(accuracy.size(), 6u);
  EXPECT_EQ(accuracy[0][0], "1");
  EXPECT_EQ(accuracy[0][1], "10");
  EXPECT_EQ(accuracy[0][6], "100% / \u2014");
  EXPECT_EQ(accuracy[0][8], "not tested");
  const auto drift = table_cells(html, "Estimates: deployed and re-fitted");
  ASSERT_EQ(drift.size(), 5u);
  EXPECT_EQ(drift[3][0], "law.omega0");
  EXPECT_EQ(drift[3][6], "no");
  const auto dm = table_cells(html, "Is the challenger better? Diebold-Mariano, squared error, one-sided");
  ASSERT_EQ(dm.size(), 6u);
  EXPECT_EQ(dm[5][3], "not tested");
  EXPECT_NE(html.find("Not tested at 2 of 6 horizons"), std::string::npos);
  // The chart: 10 forecasts, 10 actuals, the history before them.
  EXPECT_NE(html.find("chart-new-period"), std::string::npos);
  EXPECT_EQ(find_all(doc, "circle", "point").size() >= 10u, true);
  for (const char* flat : {"Ljung box lag", "Drift threshold se", "Mae training"})
    EXPECT_EQ(html.find(flat), std::string::npos) << flat;
  fs::remove_all(dir);
}

// A level shift found in the new rows is its own section after the residuals, with its table.
TEST(Report, RevalidationListsNewEffects) {
  const fs::path dir = fresh_dir("reval_effects");
  test::write_full_run(dir);
  auto doc = nlohmann::json::parse(
      slurp(fs::path(LAGSIEVE_TEST_DATA_DIR) / "report/fixtures/revalidation_seatbelts.json"));
  doc["new_effects"] = {{"run", true},
                        {"critical", 3.5},
                        {"critical_rule", "the default rule at the training n"},
                        {"new_rows", 10},
                        {"tested_rows", 10},
                        {"effects",
                         {{{"name", "LS_1984_03"},
                           {"type", "level_shift"},
                           {"row", 171},
                           {"time", "1984-03"},
                           {"size", 412.25},
                           {"std_error", 57.5},
                           {"statistic", 7.14},
                           {"ambiguous_with", nlohmann::json::array()}}}}};
  write_text(dir / "revalidation.json", doc.dump());
  const ReportResult r = write_report(dir);
  const auto at = std::find(r.sections.begin(), r.sections.end(), "New effects in the new rows");
  ASSERT_NE(at, r.sections.end());
  EXPECT_EQ(*(at - 1), "Residuals of the new rows");
  const std::string html = slurp(r.path);
  const auto rows = table_cells(html, "Effects found after the training rows");
  ASSERT_EQ(rows.size(), 1u);
  EXPECT_EQ(rows[0][0], "level_shift");
  EXPECT_EQ(rows[0][1], "1984-03");
  EXPECT_EQ(rows[0][2], "171");
  EXPECT_NE(html.find("1 found; each is a reason to refit."), std::string::npos);
  fs::remove_all(dir);
}

TEST(Report, OnlyTheSectionsWhoseFilesExist) {
  const fs::path dir = fresh_dir("partial");
  write_text(dir / "ranking.json", test::ranking_json({"demand"}).dump());
  write_text(dir / "screen.json", test::screen_json("demand").dump());
  json fj = test::forecast_json("demand");
  fj["forecast"] = nullptr;
  fj["note"] = "no forecast from the end of the data: price needs future values";
  write_text(dir / "forecast.json", fj.dump());
  ReportOptions options;
  options.write_charts = false;
  options.ranking_rows = 2;
  const ReportResult r = write_report(dir, options);
  EXPECT_EQ(r.sections, (std::vector<std::string>{"Run summary",
                                                  "Inputs: cross-correlation and impulse response",
                                                  "Ranking", "Forecast"}));
  EXPECT_TRUE(r.charts.empty());
  EXPECT_FALSE(fs::exists(dir / "charts"));
  ASSERT_EQ(r.warnings.size(), 1u);  // a chosen model without its model or fit file
  EXPECT_NE(r.warnings[0].find("model.json"), std::string::npos);
  const std::string html = slurp(r.path);
  ASSERT_TRUE(parse_markup(html).ok);
  EXPECT_EQ(table_cells(html, "Top 2 of 3 candidates").size(), 2u);
  EXPECT_NE(html.find("price needs future values"), std::string::npos);
  EXPECT_EQ(html.find("<details>"), std::string::npos);  // no model file, no config text
  fs::remove_all(dir);
}

TEST(Report, FolderWrittenBeforeTheRenameStillReports) {
  // A run folder of the previous release: leaderboard.json with `leader_reason` (legacy names).
  const fs::path dir = fresh_dir("legacy_names");
  json ranking = test::ranking_json({"demand"});
  ranking["series_notes"] = json::array(
      {{{"series", "demand"}, {"sorted_by", "by BIC"}, {"leader_reason", "best by BIC"}}});  // legacy
  write_text(dir / "leaderboard.json", ranking.dump());  // legacy
  write_text(dir / "screen.json", test::screen_json("demand").dump());
  ReportOptions options;
  options.write_charts = false;
  const ReportResult r = write_report(dir, options);
  EXPECT_NE(std::find(r.sections.begin(), r.sections.end(), "Ranking"), r.sections.end());
  const std::string html = slurp(r.path);
  EXPECT_EQ(table_cells(html, "Top 3 of 3 candidates").size(), 3u);
  EXPECT_NE(html.find("best by BIC"), std::string::npos);
  fs::remove_all(dir);
}

void expect_input_error(const fs::path& dir, const std::vector<std::string>& parts) {
  try {
    write_report(dir);
    ADD_FAILURE() << "no InputError for " << dir;
  } catch (const InputError& e) {
    for (const auto& p : parts)
      EXPECT_NE(std::string(e.what()).find(p), std::string::npos) << e.what();
  }
}

TEST(Report, ClearErrorsForWhatIsNotARunFolder) {
  const fs::path dir = fresh_dir("errors");
  expect_input_error(dir / "missing", {"missing", "no such folder"});
  write_text(dir / "notes.txt", "hello");
  expect_input_error(dir, {"not a run folder", "ranking.json", "model.json"});
  EXPECT_FALSE(fs::exists(dir / "report.html"));
  fs::remove_all(dir);
}

TEST(Report, MalformedFilesAreNamed) {
  const fs::path dir = fresh_dir("malformed");
  test::write_full_run(dir);
  write_text(dir / "fit.json", "{\"label\": ");
  expect_input_error(dir, {"fit.json", "not valid JSON"});

  test::write_full_run(dir);
  json lb = test::ranking_json({"demand"});
  lb["rows"][1].erase("key");
  write_text(dir / "ranking.json", lb.dump());
  expect_input_error(dir, {"ranking.json", "rows[1].key", "missing"});

  test::write_full_run(dir);
  json sc = test::screen_json("demand");
  sc["inputs"][0]["cross_correlation"][2] = "high";
  write_text(dir / "screen.json", sc.dump());
  expect_input_error(dir, {"screen.json", "inputs[0].cross_correlation[2]", "not a number"});

  test::write_full_run(dir);
  write_text(dir / "accuracy.csv", "model,mode,horizon,count,mae\nm,production,1,20,lots\n");
  expect_input_error(dir, {"accuracy.csv:2", "mae", "lots"});

  test::write_full_run(dir);
  write_text(dir / "input_value.csv", "input,score_with\ntemp,1\n");
  expect_input_error(dir, {"input_value.csv", "score_without", "missing"});

  test::write_full_run(dir);
  write_text(dir / "revalidation.json", "{\"reasons\": []}");
  expect_input_error(dir, {"revalidation.json", "verdict"});
  fs::remove_all(dir);
}

TEST(Report, RejectsBadOptions) {
  ReportOptions o;
  o.ranking_rows = 0;
  EXPECT_THROW(o.validate(), InputError);
}

// `lagsieve report DIR` from the command line: exit 0 and the file; exit 2 and the message.
TEST(Report, CommandLine) {
  const fs::path binary = LAGSIEVE_BINARY;
  if (!fs::exists(binary)) GTEST_SKIP() << "the lagsieve binary is not built: " << binary;
  const fs::path dir = fresh_dir("cli");
  test::write_full_run(dir);
  const std::string out = (dir / "out.txt").string();
  int rc =
      std::system((binary.string() + " report " + dir.string() + " > " + out + " 2>&1").c_str());
  EXPECT_EQ(WEXITSTATUS(rc), 0) << slurp(out);
  EXPECT_TRUE(fs::exists(dir / "report.html"));
  EXPECT_NE(slurp(out).find("report.html"), std::string::npos);
  const fs::path empty = dir / "empty";
  fs::create_directories(empty);
  rc = std::system((binary.string() + " report " + empty.string() + " > " + out + " 2>&1").c_str());
  EXPECT_EQ(WEXITSTATUS(rc), 2);
  EXPECT_NE(slurp(out).find("not a run folder"), std::string::npos) << slurp(out);
  fs::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
