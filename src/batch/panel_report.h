#pragma once
// The report of a run of many series: report.html of the run folder opens with the panel (series
// by status, how many series use each input and at which delay, accuracy against the no-input
// benchmark across series, the worst series by backtest score and by residual tests). Per-series
// report pages (series/<name>/report.html) are written only for the worst series and a sample,
// not for all.
#include <filesystem>
#include <mutex>
#include <set>
#include <string>
#include <utility>
#include <vector>

#include "batch/series_job.h"
#include "core/config.h"

namespace lagsieve {

struct PanelReportOptions {
  int worst = 10;       // series listed (and given a page) per "worst" table (`--pages-worst`)
  int sample = 5;       // series, evenly spread over the panel's keys, given a page too
  double level = 0.05;  // "beats the benchmark significantly": Diebold-Mariano p below this
};

// The sample of a panel: `count` keys evenly spread over `keys` (sorted), the first included.
std::vector<std::string> sample_keys(const std::vector<std::string>& keys, int count);

// The series (indices into `rows`, sorted by key) that get a page of their own: the worst by
// backtest score, the worst by Ljung-Box p (ties: the first key), and the finished series of
// `sample` (default: sample_keys of the rows' keys); in key order.
std::vector<size_t> series_with_pages(const std::vector<SeriesSummary>& rows,
                                      const PanelReportOptions& options,
                                      const std::vector<std::string>* sample = nullptr);

// Decides, as series finish in any order, whether a series may still get a page, so only those
// series' folders are written: a series outside the worst so far can never enter the final
// worst (later series only push it further out). Keeps at most the worst `worst` by each measure
// plus the sample; thread-safe. The final pages (series_with_pages) are a subset of those kept.
class PageKeeper {
 public:
  PageKeeper(PanelReportOptions options, std::vector<std::string> sample);
  bool keep(const SeriesSummary& s);

 private:
  using Entry = std::pair<double, std::string>;  // badness, key
  struct Worse {
    bool operator()(const Entry& a, const Entry& b) const {
      return a.first != b.first ? a.first > b.first : a.second < b.second;
    }
  };
  bool enter(std::set<Entry, Worse>& worst, double badness, const std::string& key);

  PanelReportOptions options_;
  std::set<std::string> sample_;
  std::set<Entry, Worse> by_score_, by_residuals_;
  std::mutex mutex_;
};

// Writes folder/report.html and the per-series pages; returns the series given a page.
std::vector<std::string> write_panel_report(const std::filesystem::path& folder,
                                            const std::vector<SeriesSummary>& rows,
                                            const RunConfig& config,
                                            const PanelReportOptions& options = {},
                                            const std::vector<std::string>* sample = nullptr);

}  // namespace lagsieve
