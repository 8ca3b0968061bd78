#pragma once
// The run report: reads the files of a run folder (names in search/run_folder.h) and writes one
// self-contained report.html plus every chart as a standalone SVG under charts/ (for slides).
// Used by `lagsieve report DIR` and at the end of search, backtest and revalidate.
//
// Sections, each present only when the files behind it exist (per series when a run has
// several; per-series files carry the suffix of run_files::per_series):
//   Verdict            revalidation.json: the verdict and its reasons first, then its evidence
//   Run summary        model file (training data, range, config text), screen and fit warnings
//   Inputs             screen.json (+ the chosen model's impulse response from the model file)
//   Ranking        ranking.json: the top rows, sortable
//   Forecast           forecast.json: fan chart, inputs forecast beside inputs known
//   Backtest           accuracy.csv, backtest.csv, comparisons.csv, input_value.csv
//   Detected effects   fit.json `outliers`: history with the effects marked, their table
//   Chosen model diagnostics fit.json: residual ACF, Ljung-Box, gains, roots, estimates, warnings
//
// Backtest files that carry no series suffix (and no `series` column) are taken to belong to
// every series of the run; with a `series` column their rows are filtered per series. In the
// error-by-horizon chart, models that are not ranking candidates are benchmarks (dashed).
#include <filesystem>
#include <string>
#include <vector>

namespace lagsieve {

struct ReportOptions {
  int ranking_rows = 15;    // top rows per series in the ranking table
  int backtest_models = 6;      // most models drawn in the error-by-horizon chart (chosen model first)
  int forecast_table_rows = 24; // forecast steps listed under the fan chart
  bool write_charts = true;     // also write charts/*.svg
  std::string title;            // empty: "Run report: <folder name>"
  std::string folder_name;  // empty: the name of run_dir (a run staged elsewhere passes its own)
  std::string footer = "lagsieve";

  // Throws InputError naming the option when a count is not positive.
  void validate() const;
};

struct ReportResult {
  std::filesystem::path path;                 // report.html
  std::vector<std::filesystem::path> charts;  // standalone SVGs written, in page order
  std::vector<std::string> sections;          // section headings, in page order
  std::vector<std::string> warnings;          // what the report could not show, and why
};

// Builds the report of `run_dir` and writes it (atomically) to run_dir/report.html and
// run_dir/charts/. Throws InputError when run_dir is missing or holds none of the run files
// ("not a run folder"), or naming the file and the field when a file is malformed.
ReportResult write_report(const std::filesystem::path& run_dir, const ReportOptions& options = {});

}  // namespace lagsieve
