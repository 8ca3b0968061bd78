// A real browser renders the report: Debian's chromium, headless, to PNG and to PDF, with the
// page's console captured; any uncaught script error or console error fails the test. Skipped
// (with a message) where /usr/bin/chromium is not installed; `.ci/run` installs it.
// The re-validation report (from tests/report/fixtures/revalidation_seatbelts.json, written by
// `lagsieve revalidate` on R's Seatbelts with a rolling extract) is laid out at 1,280 px: no table
// may be wider than its box or the page; its screenshot is kept as revalidation_report.png in the
// test's working folder.
#include <gtest/gtest.h>

#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include "report/report.h"
#include "report_fixture.h"
#include "run_binary.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
const fs::path kChromium = "/usr/bin/chromium";

using lagsieve::testing::slurp;

struct Render {
  int exit_code = -1;
  std::string log;  // chromium's stderr: console messages land here
};

// One headless run; `what` is "--screenshot=FILE" or "--print-to-pdf=FILE".
Render render(const fs::path& page, const std::string& what, const fs::path& work) {
  const fs::path profile = work / "profile";
  const fs::path log = work / "chromium.log";
  const std::string cmd =
      "timeout 90 " + kChromium.string() +
      " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run"
      " --disable-background-networking --disable-component-update --disable-sync"
      " --disable-dev-shm-usage --enable-logging=stderr --v=0 --window-size=1280,2400"
      " --user-data-dir=" +
      profile.string() + " " + what + " file://" + page.string() + " > " + log.string() + " 2>&1";
  Render r;
  const int rc = std::system(cmd.c_str());
  r.exit_code = WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
  r.log = slurp(log);
  return r;
}

// Console errors and uncaught exceptions of the page (not chromium's own start-up noise).
bool console_error(const std::string& log) {
  return log.find("Uncaught") != std::string::npos ||
         log.find("ERROR:CONSOLE") != std::string::npos ||
         log.find(":CONSOLE(") != std::string::npos;
}

// Lays `page` out at 1,280 px and returns what a script measured: "viewport=W page=W tables=N
// too-wide=[...]": a table whose box sticks out of the viewport, a table beyond the page that does
// not scroll inside its box, and any table of the re-validation sections that needs to scroll.
std::string layout_check(const fs::path& page, const fs::path& work) {
  const std::string script = R"(<script>
(function () {
  // Strict sections: their tables must fit without scrolling; elsewhere a table may scroll inside
  // its box, but no box may stick out of the page.
  var strict = ['Verdict', 'Accuracy on the new rows', 'Parameter drift', 'Residuals of the new rows',
                'Challengers'];
  var vw = document.documentElement.clientWidth, bad = [];
  document.querySelectorAll('table').forEach(function (t, i) {
    var box = t.parentElement, sec = t.closest('section'), h = sec ? sec.querySelector('h2') : null;
    var inStrict = h && strict.indexOf(h.textContent) >= 0;
    var name = (t.caption ? t.caption.textContent : 'table ' + i) + ' ' + Math.round(t.scrollWidth) + 'px';
    if (box.getBoundingClientRect().right > vw + 0.5) bad.push(name + ' (box beyond the page)');
    else if (t.getBoundingClientRect().right > vw + 0.5 &&
             ['auto', 'scroll'].indexOf(getComputedStyle(box).overflowX) < 0)
      bad.push(name + ' (beyond the page)');
    else if (inStrict && t.scrollWidth > box.clientWidth + 1) bad.push(name + ' (scrolls)');
  });
  var m = document.createElement('pre');
  m.id = 'layout-check';
  m.textContent = 'viewport=' + vw + ' page=' + document.documentElement.scrollWidth + ' tables=' +
    document.querySelectorAll('table').length + ' too-wide=[' + bad.join('; ') + ']';
  document.body.appendChild(m);
})();
</script>)";
  std::string html = slurp(page);
  html.replace(html.rfind("</body>"), 7, script + "</body>");
  const fs::path probe = work / "layout_probe.html";
  test::write_text(probe, html);
  const fs::path dom = work / "dom.html";
  const std::string cmd =
      "timeout 90 " + kChromium.string() +
      " --headless --no-sandbox --disable-gpu --no-first-run --hide-scrollbars"
      " --disable-background-networking --disable-component-update --disable-sync"
      " --disable-dev-shm-usage --window-size=1280,3000 --user-data-dir=" +
      (work / "profile").string() + " --dump-dom file://" + probe.string() + " > " + dom.string() +
      " 2>/dev/null";
  if (std::system(cmd.c_str()) != 0) return "chromium failed";
  const std::string out = slurp(dom);
  const auto at = out.find("<pre id=\"layout-check\">");
  if (at == std::string::npos) return "no measurement";
  const auto from = out.find('>', at) + 1;
  return out.substr(from, out.find("</pre>", from) - from);
}

// Lays `page` out at 1,280 px and measures every chart's text: "charts=N titles=[...]
// problems=[...]", a problem being a label that sticks out of its chart or two x-axis tick labels
// that overlap. The titles let a test see which charts were drawn.
std::string chart_text_check(const fs::path& page, const fs::path& work) {
  const std::string script = R"(<script>
(function () {
  var bad = [], titles = [], charts = document.querySelectorAll('svg.chart');
  charts.forEach(function (svg, i) {
    var t = svg.querySelector('title'), name = t ? t.textContent.slice(0, 40) : 'chart ' + i;
    titles.push(name);
    var box = svg.getBoundingClientRect();
    var ticks = [];
    svg.querySelectorAll('text').forEach(function (el) {
      var r = el.getBoundingClientRect();
      if (r.width === 0) return;
      if (r.left < box.left - 0.5 || r.right > box.right + 0.5 || r.top < box.top - 0.5 ||
          r.bottom > box.bottom + 0.5)
        bad.push(name + ': "' + el.textContent + '" outside the chart');
      if (el.parentElement.getAttribute('class') === 'axes' && el.getAttribute('text-anchor') === 'middle')
        ticks.push({r: r, text: el.textContent});
    });
    ticks.sort(function (a, b) { return a.r.left - b.r.left; });
    for (var k = 1; k < ticks.length; ++k)
      if (Math.abs(ticks[k].r.top - ticks[k - 1].r.top) < 1 && ticks[k].r.left < ticks[k - 1].r.right)
        bad.push(name + ': ticks "' + ticks[k - 1].text + '" and "' + ticks[k].text + '" overlap');
  });
  var m = document.createElement('pre');
  m.id = 'chart-check';
  m.textContent = 'charts=' + charts.length + ' titles=[' + titles.join('; ') + '] problems=[' +
    bad.join('; ') + ']';
  document.body.appendChild(m);
})();
</script>)";
  std::string html = slurp(page);
  html.replace(html.rfind("</body>"), 7, script + "</body>");
  const fs::path probe = work / "chart_probe.html";
  test::write_text(probe, html);
  const fs::path dom = work / "chart_dom.html";
  const std::string cmd =
      "timeout 90 " + kChromium.string() +
      " --headless --no-sandbox --disable-gpu --no-first-run --hide-scrollbars"
      " --disable-background-networking --disable-component-update --disable-sync"
      " --disable-dev-shm-usage --window-size=1280,3000 --user-data-dir=" +
      (work / "profile").string() + " --dump-dom file://" + probe.string() + " > " + dom.string() +
      " 2>/dev/null";
  if (std::system(cmd.c_str()) != 0) return "chromium failed";
  const std::string out = slurp(dom);
  const auto at = out.find("<pre id=\"chart-check\">");
  if (at == std::string::npos) return "no measurement";
  const auto from = out.find('>', at) + 1;
  return out.substr(from, out.find("</pre>", from) - from);
}

class Browser : public ::testing::Test {
 protected:
  void SetUp() override {
    if (!fs::exists(kChromium))
      GTEST_SKIP() << kChromium
                   << " not found: install Debian's chromium (apt-get install -y chromium) "
                   << "to run the browser test";
    work = test::fresh_dir("browser");
    run = work / "run";
    fs::create_directories(run);
    test::write_full_run(run);
    page = write_report(run).path;
  }
  void TearDown() override {
    if (!work.empty()) fs::remove_all(work);
  }
  fs::path work, run, page;
};

TEST_F(Browser, RendersToPngWithoutConsoleErrors) {
  const fs::path png = work / "report.png";
  const Render r = render(page, "--screenshot=" + png.string(), work);
  ASSERT_EQ(r.exit_code, 0) << r.log;
  EXPECT_FALSE(console_error(r.log)) << r.log;
  const std::string bytes = slurp(png);
  ASSERT_GT(bytes.size(), 20000u) << "a blank page is a few kB";
  EXPECT_EQ(bytes.substr(1, 3), "PNG");
}

TEST_F(Browser, PrintsToPdfWithoutConsoleErrors) {
  const fs::path pdf = work / "report.pdf";
  const Render r = render(page, "--no-pdf-header-footer --print-to-pdf=" + pdf.string(), work);
  ASSERT_EQ(r.exit_code, 0) << r.log;
  EXPECT_FALSE(console_error(r.log)) << r.log;
  const std::string bytes = slurp(pdf);
  ASSERT_GT(bytes.size(), 20000u);
  EXPECT_EQ(bytes.substr(0, 5), "%PDF-");
}

// The check itself can fail: a page with a script error is caught.
TEST_F(Browser, DetectsAScriptError) {
  const fs::path broken = work / "broken.html";
  test::write_text(
      broken,
      "<!DOCTYPE html><html><body><p>x</p><script>undefinedFunction();</script></body></html>");
  const Render r = render(broken, "--screenshot=" + (work / "broken.png").string(), work);
  EXPECT_TRUE(console_error(r.log)) << r.log;
}

TEST_F(Browser, RevalidationReportFitsThePageAt1280Pixels) {
  const fs::path dir = work / "revalidation";
  fs::create_directories(dir);
  test::write_full_run(dir, "drivers");
  test::write_text(dir / "revalidation.json", slurp(fs::path(LAGSIEVE_TEST_DATA_DIR) /
                                                    "report/fixtures/revalidation_seatbelts.json"));
  const fs::path reval_page = write_report(dir).path;
  const std::string check = layout_check(reval_page, work);
  EXPECT_NE(check.find("viewport=1280 page=1280 "), std::string::npos) << check;
  EXPECT_NE(check.find("too-wide=[]"), std::string::npos) << check;
  EXPECT_EQ(check.find("tables=0"), std::string::npos) << check;
  const fs::path png = fs::current_path() / "revalidation_report.png";
  const Render r = render(reval_page, "--window-size=1280,3200 --screenshot=" + png.string(), work);
  ASSERT_EQ(r.exit_code, 0) << r.log;
  EXPECT_FALSE(console_error(r.log)) << r.log;
  EXPECT_GT(slurp(png).size(), 20000u);
}

// Every chart of the report, those of the past included, keeps its labels inside and its x-axis
// ticks apart.
TEST_F(Browser, ChartLabelsStayInsideTheirChartAndTicksDoNotOverlap) {
  const std::string check = chart_text_check(page, work);
  EXPECT_NE(check.find("problems=[]"), std::string::npos) << check;
  for (const char* title : {"Fitted values (one step ahead)", "Residuals over time",
                            "Which input moved the target when", "Residual quantiles against"})
    EXPECT_NE(check.find(title), std::string::npos) << title << " not drawn: " << check;
}

// The chart check can fail: overlapping tick labels and a label beyond the edge are caught.
TEST_F(Browser, DetectsOverlappingTicksAndCutLabels) {
  const fs::path page_file = work / "ticks.html";
  test::write_text(page_file,
                   "<!DOCTYPE html><html><body><svg class=\"chart\" width=\"300\" height=\"100\" "
                   "font-size=\"12\"><title>crowded</title><g class=\"axes\">"
                   "<text x=\"100\" y=\"80\" text-anchor=\"middle\">2024-01-01</text>"
                   "<text x=\"120\" y=\"80\" text-anchor=\"middle\">2024-01-02</text>"
                   "<text x=\"298\" y=\"80\" text-anchor=\"middle\">2024-01-03</text>"
                   "</g></svg></body></html>");
  const std::string check = chart_text_check(page_file, work);
  EXPECT_NE(check.find("\"2024-01-01\" and \"2024-01-02\" overlap"), std::string::npos) << check;
  EXPECT_NE(check.find("\"2024-01-03\" outside the chart"), std::string::npos) << check;
}

// The layout check can fail: a table of 40 wide columns is caught, outside a scrolling box anywhere
// and inside one in a re-validation section.
TEST_F(Browser, DetectsATableWiderThanThePage) {
  std::string wide =
      "<!DOCTYPE html><html><body><div><table>"  // no scrolling box: beyond the page
      "<caption>wide</caption><tr>";
  for (int i = 0; i < 40; ++i) wide += "<td>column_number_" + std::to_string(i) + "</td>";
  wide += "</tr></table></div>";
  // The same table in a re-validation section, where scrolling inside the box is not enough.
  wide +=
      "<section><h2>Parameter drift</h2><div class=\"table-wrap\" style=\"overflow-x: "
      "auto\"><table><caption>"
      "strict</caption><tr>";
  for (int i = 0; i < 40; ++i) wide += "<td>column_number_" + std::to_string(i) + "</td>";
  wide += "</tr></table></div></section></body></html>";
  const fs::path page_file = work / "wide.html";
  test::write_text(page_file, wide);
  const std::string check = layout_check(page_file, work);
  EXPECT_NE(check.find("too-wide=[wide "), std::string::npos) << check;
  EXPECT_NE(check.find("(beyond the page); strict "), std::string::npos) << check;
  EXPECT_NE(check.find("px (scrolls)]"), std::string::npos) << check;
}

}  // namespace
}  // namespace lagsieve
