#pragma once
// The search of a long-format panel (data.series_key) from Python: see panel.cpp.
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "batch/series_job.h"
#include "core/config.h"
#include "io/csv.h"
#include "objects.h"

namespace lagsieve::python {

// A finished panel search: one summary row per series (sorted by key) and the run folder's
// files staged in a private folder (series/<name>/, summary.csv, the ranking, the report).
struct PanelSearch {
  RunConfig config;
  std::vector<SeriesSummary> series;
  std::string fingerprint;
  std::unique_ptr<Scratch> scratch;
};

// The panel of data.file, or of a table from a DataFrame with the key column. Ctrl-C stops it
// (interrupt.h). Bad input for the whole panel (no key column, an empty key) is InputError;
// a bad series is its summary row.
std::shared_ptr<PanelSearch> search_panel_file(const RunConfig& config, std::optional<int> threads,
                                               bool backtest);
std::shared_ptr<PanelSearch> search_panel_table(RunConfig config, const CsvTable& table,
                                                std::optional<int> threads, bool backtest);

// complete, some_series_failed or no_usable_candidate (as the CLI's run marker).
std::string panel_status(const PanelSearch& p);

// The path of a staged file, relative to the run folder (e.g. "summary.csv").
std::string panel_file(const PanelSearch& p, const std::string& relative);

// Writes the run folder `lagsieve search` writes for the panel (locked, staged, swapped in);
// returns its status.
std::string write_panel(const PanelSearch& p, const std::string& out);

}  // namespace lagsieve::python
