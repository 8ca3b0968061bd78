#pragma once
// The report of a run of many series: report.html of the run folder opens with the panel (series
// by status, how many series use each input and at which delay, accuracy against the no-input
// benchmark across series, the worst series by backtest score and by residual tests). Per-series
// report pages (series/<name>/report.html) are written only for the worst series and a sample,
// not for all.
#include <filesystem>
#include <string>
#include <vector>

#include "batch/series_job.h"
#include "core/config.h"

namespace lagsieve {

struct PanelReportOptions {
  int worst = 10;       // series listed (and given a page) per "worst" table
  int sample = 5;       // further series, evenly spread over the keys, given a page
  double level = 0.05;  // "beats the benchmark significantly": Diebold-Mariano p below this
};

// The series (indices into `rows`) that get a page of their own: the worst by backtest score,
// the worst by Ljung-Box p, then an even sample of the other finished series; in key order.
std::vector<size_t> series_with_pages(const std::vector<SeriesSummary>& rows,
                                      const PanelReportOptions& options);

// Writes folder/report.html and the per-series pages; returns the series given a page.
std::vector<std::string> write_panel_report(const std::filesystem::path& folder,
                                            const std::vector<SeriesSummary>& rows,
                                            const RunConfig& config,
                                            const PanelReportOptions& options = {});

}  // namespace lagsieve
