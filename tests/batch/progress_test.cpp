// Progress of many series: a scheduler's log gets one plain line per interval and one at the end,
// never a line per candidate; a terminal gets a redrawn line, throttled.
#include <gtest/gtest.h>

#include <algorithm>

#include "batch/progress.h"

namespace lagsieve {
namespace {

struct FakeClock {
  ProgressPrinter::Clock::time_point t{};
  void advance(double seconds) {
    t += std::chrono::duration_cast<ProgressPrinter::Clock::duration>(
        std::chrono::duration<double>(seconds));
  }
};

TEST(Progress, OffTerminalOneLinePerIntervalAndOneAtTheEnd) {
  FakeClock clock;
  std::string log;
  ProgressPrinter p(
      {false}, [&](const std::string& s) { log += s; }, [&] { return clock.t; });
  // 10 series x 100 candidates over 95 s: a call per candidate.
  BatchProgress state{0, 10, 0};
  for (int s = 0; s < 10; ++s) {
    for (int c = 0; c < 100; ++c) {
      clock.advance(0.095);
      ++state.candidates_done;
      p(state);
    }
    ++state.series_done;
    p(state);
  }
  // Lines at about 30, 60 and 90 s, and the final one.
  EXPECT_EQ(p.lines_written(), 4) << log;
  EXPECT_EQ(std::count(log.begin(), log.end(), '\n'), 4);
  EXPECT_EQ(log.find('\r'), std::string::npos);
  EXPECT_NE(log.find("10/10 series · 1000 candidates"), std::string::npos) << log;
}

TEST(Progress, TerminalRedrawsAreThrottled) {
  FakeClock clock;
  std::string out;
  ProgressPrinter p(
      {true}, [&](const std::string& s) { out += s; }, [&] { return clock.t; });
  BatchProgress state{0, 2, 0};
  for (int c = 0; c < 1000; ++c) {  // 1000 candidates in 1 s
    clock.advance(0.001);
    ++state.candidates_done;
    p(state);
  }
  state.series_done = 2;
  p(state);
  EXPECT_LE(p.lines_written(), 6);  // first draw, every 0.25 s, the end
  EXPECT_EQ(out.back(), '\n');
}

TEST(Progress, LineSaysSeriesRateAndTimeLeft) {
  EXPECT_EQ(ProgressPrinter::line({5, 20, 1000}, 10.0),
            "5/20 series · 1000 candidates · 100/s · 30 s left");
  EXPECT_EQ(ProgressPrinter::line({0, 20, 0}, 0.0),
            "0/20 series · 0 candidates · 0/s · time left unknown");
  EXPECT_NE(ProgressPrinter::line({1, 100, 10}, 30.0).find("· 50 min left"), std::string::npos);
  EXPECT_NE(ProgressPrinter::line({1, 100, 10}, 60.0).find("· 1.6 h left"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
