#include "batch/progress.h"

#include <fmt/format.h>

#include <cmath>

namespace lagsieve {
namespace {

std::string duration_text(double seconds) {
  if (!std::isfinite(seconds) || seconds < 0) return "?";
  if (seconds < 90) return fmt::format("{:.0f} s", seconds);
  if (seconds < 5400) return fmt::format("{:.0f} min", seconds / 60);
  return fmt::format("{:.1f} h", seconds / 3600);
}

}  // namespace

ProgressPrinter::ProgressPrinter(ProgressOptions options,
                                 std::function<void(const std::string&)> write,
                                 std::function<Clock::time_point()> now)
    : options_(options),
      write_(std::move(write)),
      now_(std::move(now)),
      start_(now_()),
      last_(start_) {}

std::string ProgressPrinter::line(const BatchProgress& p, double seconds) {
  const double rate = seconds > 0 ? static_cast<double>(p.candidates_done) / seconds : 0.0;
  // Time left from the series finished so far (series differ, candidates per series too).
  const std::string left =
      p.series_done >= p.series_total ? "done"
      : p.series_done > 0
          ? duration_text(seconds / p.series_done * (p.series_total - p.series_done)) + " left"
          : "time left unknown";
  return fmt::format("{}/{} series · {} candidates · {:.0f}/s · {}", p.series_done, p.series_total,
                     p.candidates_done, rate, left);
}

void ProgressPrinter::operator()(const BatchProgress& p) {
  const auto now = now_();
  const double since = std::chrono::duration<double>(now - last_).count();
  const double total = std::chrono::duration<double>(now - start_).count();
  const bool finished = p.series_done >= p.series_total;
  if (options_.terminal) {
    if (!finished && any_ && since < options_.redraw_interval) return;
    write_("\r" + line(p, total) + "   " + (finished ? "\n" : ""));
  } else {
    if (!finished && since < options_.log_interval) return;
    write_("lagsieve: " + line(p, total) + "\n");
  }
  any_ = true;
  last_ = now;
  ++lines_;
}

}  // namespace lagsieve
