// The search of a long-format panel (data.series_key) from Python: the batch of `lagsieve search`
// (src/batch) run into a private staging folder, whose files are the object's results and are
// copied into the run folder `write(dir)` asks for. The tables are the CLI's by construction.
#include "panel.h"

#include <fmt/format.h>

#include <set>

#include "batch/batch.h"
#include "batch/panel_report.h"
#include "core/error.h"
#include "data/panel.h"
#include "forecast/fitted_model.h"
#include "interrupt.h"
#include "io/config.h"
#include "search/run_dir.h"
#include "search/run_folder.h"
#include "search/search.h"

namespace fs = std::filesystem;

namespace lagsieve::python {
namespace {

// What identifies a panel from a DataFrame: the config's fingerprint over every series' rows.
std::string frame_fingerprint(const RunConfig& config, const std::vector<PanelPart>& parts) {
  std::string all = run_fingerprint(config, {}) + "|key=" + config.data.series_key + "|";
  for (const auto& p : parts) {
    all += p.key + "{";
    for (const auto& row : p.table.rows)
      for (const auto& cell : row) all += cell + ";";
    all += "}";
  }
  return text_fingerprint(all);
}

fs::path stage_of(const PanelSearch& p) { return p.scratch->path() / "run"; }

std::shared_ptr<PanelSearch> search_panel(RunConfig config, std::vector<PanelPart> parts,
                                          std::string fingerprint, std::optional<int> threads,
                                          bool backtest) {
  auto p = std::make_shared<PanelSearch>();
  p->fingerprint = std::move(fingerprint);
  p->scratch = std::make_unique<Scratch>();
  const fs::path stage = stage_of(*p);
  fs::create_directories(stage);
  BatchOptions options;
  options.threads = cli::checked_threads(threads, config.search.threads);
  options.backtest = backtest;
  options.folder = stage;
  BatchResult result = run_interruptible([&](const std::atomic<bool>* cancel) {
    Journal journal(stage / run_files::kJournal, p->fingerprint, false);
    BatchOptions o = options;
    o.journal = &journal;
    o.cancel = cancel;
    BatchResult r = run_batch(config, std::move(parts), o);
    write_batch_tables(stage, r);
    write_panel_report(stage, r.series, config);
    return r;
  });
  p->series = std::move(result.series);
  p->config = std::move(config);
  return p;
}

}  // namespace

std::shared_ptr<PanelSearch> search_panel_file(const RunConfig& config, std::optional<int> threads,
                                               bool backtest) {
  auto parts = load_panel(config, {});
  std::string fingerprint = batch_fingerprint(config, parts, {});
  return search_panel(config, std::move(parts), std::move(fingerprint), threads, backtest);
}

std::shared_ptr<PanelSearch> search_panel_table(RunConfig config, const CsvTable& table,
                                                std::optional<int> threads, bool backtest) {
  CsvTable copy = table;
  auto parts = split_by_key(std::move(copy), config.data.series_key,
                            "data.series_key in " + config.config_file.string());
  std::string fingerprint = frame_fingerprint(config, parts);
  return search_panel(std::move(config), std::move(parts), std::move(fingerprint), threads,
                      backtest);
}

std::string panel_status(const PanelSearch& p) {
  size_t ok = 0;
  for (const auto& s : p.series) ok += s.status == SeriesStatus::ok ? 1 : 0;
  return ok == p.series.size() ? "complete" : ok > 0 ? "some_series_failed" : "no_usable_candidate";
}

std::string panel_file(const PanelSearch& p, const std::string& relative) {
  return (stage_of(p) / relative).string();
}

std::string write_panel(const PanelSearch& p, const std::string& out) {
  RunDir dir(out, {"search", p.fingerprint, false, "write(dir)"});
  fs::copy(stage_of(p), dir.staging(),
           fs::copy_options::recursive | fs::copy_options::overwrite_existing);
  write_panel_report(dir.staging(), p.series, p.config);  // drawn again: it names its folder
  const std::string status = panel_status(p);
  dir.commit(status);
  return status;
}

}  // namespace lagsieve::python
