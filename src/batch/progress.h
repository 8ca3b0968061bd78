#pragma once
// Progress of a run of many series, for people and for schedulers' logs. On a terminal one line
// redrawn in place (at most a few times a second): series done/total, candidates per second and
// the time left. Elsewhere (a log file, a batch scheduler) one plain line every `log_interval`
// seconds and one at the end, never a redraw per candidate.
#include <chrono>
#include <functional>
#include <string>

#include "batch/batch.h"

namespace lagsieve {

struct ProgressOptions {
  bool terminal = false;
  double redraw_interval = 0.25;  // seconds between redraws on a terminal
  double log_interval = 30.0;     // seconds between lines elsewhere
};

class ProgressPrinter {
 public:
  using Clock = std::chrono::steady_clock;
  // `write` receives each piece of text to print (stderr in the CLI); `now` is the clock (tests
  // pass their own).
  ProgressPrinter(ProgressOptions options, std::function<void(const std::string&)> write,
                  std::function<Clock::time_point()> now = Clock::now);
  void operator()(const BatchProgress& p);
  int lines_written() const { return lines_; }

  // The text of one progress line (no line end).
  static std::string line(const BatchProgress& p, double seconds);

 private:
  ProgressOptions options_;
  std::function<void(const std::string&)> write_;
  std::function<Clock::time_point()> now_;
  Clock::time_point start_;
  Clock::time_point last_;
  bool any_ = false;
  int lines_ = 0;
};

}  // namespace lagsieve
