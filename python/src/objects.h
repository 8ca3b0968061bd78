#pragma once
// The objects the module hands to Python (as opaque handles the package wraps): a loaded run,
// a model, a fit, a search and a panel search. Each holds what the CLI computed, nothing more.
#include <filesystem>
#include <memory>
#include <mutex>
#include <optional>
#include <string>

#include "cli/common.h"
#include "cli/fit_run.h"
#include "cli/search_run.h"
#include "forecast/fitted_model.h"

namespace lagsieve::python {

// A private temporary folder, removed with everything in it when the owner goes.
class Scratch {
 public:
  Scratch();  // creates it under the system's temporary folder (TMPDIR)
  ~Scratch();
  Scratch(const Scratch&) = delete;
  Scratch& operator=(const Scratch&) = delete;
  const std::filesystem::path& path() const { return path_; }

 private:
  std::filesystem::path path_;
};

// A config read and checked once: every call of the package that takes a config reads it into
// this handle first, and the calls it makes take the handle.
struct Config {
  RunConfig config;
};
using ConfigPtr = std::shared_ptr<const Config>;

// A config with the data it describes, loaded as `lagsieve` commands load them.
struct Run {
  cli::LoadedRun loaded;
};
using RunPtr = std::shared_ptr<const Run>;

// A model with the config it came from (parsed from the config text the model file holds).
struct Model {
  FittedModel fitted;
  RunConfig config;
};
using ModelPtr = std::shared_ptr<const Model>;

// One fit (of `fit`, or a search's chosen model) on its series.
struct Fit {
  RunPtr run;
  size_t series = 0;
  cli::FitRun result;
  std::optional<SeriesData> fitted_on;   // a chosen model's data with its detected effects' columns
  std::shared_ptr<Scratch> charts;       // the report's charts of this fit, once drawn

  const SeriesData& data() const {
    if (fitted_on) return *fitted_on;
    return result.detected ? result.detected->data : run->loaded.series[series];
  }

  // The model file's content when the fit is usable (else empty): made on first use (a save, a
  // forecast, the charts), not by the fit itself. Safe from several threads.
  const std::optional<FittedModel>& fitted() const;
  void set_fitted(FittedModel model);  // a search's chosen model, already made

 private:
  mutable std::mutex model_mutex_;
  mutable bool model_made_ = false;
  mutable std::optional<FittedModel> fitted_;
};

// A finished search: its computation, and the journal its candidates were written to (kept in a
// private temporary folder until the object goes, copied into every run folder written).
struct Search {
  RunPtr run;
  cli::SearchComputation computed;
  std::unique_ptr<Scratch> scratch;
  std::unique_ptr<Scratch> folder;  // the run folder written once for its report's charts
};

// The run folder files of a fit that the report draws from (model.json, fit.json with its past,
// past.csv, screen.json, forecast.json), written into `folder`.
void write_fit_files(const std::filesystem::path& folder, const Fit& f);

// fit.json of a fit: what `lagsieve fit --json` prints (with `past` when `with_past`).
std::string fit_json(const Fit& f, bool with_past);

// The report of the fit's files drawn once into f.charts; returns the charts folder.
std::filesystem::path fit_charts(Fit& f);

}  // namespace lagsieve::python
