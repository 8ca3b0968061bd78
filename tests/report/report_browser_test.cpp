// A real browser renders the report: Debian's chromium, headless, to PNG and to PDF, with the
// page's console captured; any uncaught script error or console error fails the test. Skipped
// (with a message) where /usr/bin/chromium is not installed; `.ci/run` installs it.
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

}  // namespace
}  // namespace lagsieve
