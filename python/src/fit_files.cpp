// A fit's run-folder files and the charts the report draws from them. The charts are not redrawn
// here: the files a search writes for its chosen model are written for the fit into a private folder,
// and the report (src/report) draws them exactly as it draws a run folder's.
#include <stdlib.h>

#include <stdexcept>
#include <system_error>

#include "batch/series_job.h"
#include "data/load.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "model/past.h"
#include "model/spec_from_config.h"
#include "objects.h"
#include "outliers/json.h"
#include "report/report.h"
#include "screen/screen.h"
#include "search/run_folder.h"

namespace fs = std::filesystem;

namespace lagsieve::python {

Scratch::Scratch() {
  std::string pattern = (fs::temp_directory_path() / "lagsieve-py-XXXXXX").string();
  if (!::mkdtemp(pattern.data()))
    throw std::runtime_error("cannot create a temporary folder under " +
                             fs::temp_directory_path().string() + "; check TMPDIR");
  path_ = pattern;
}

Scratch::~Scratch() {
  std::error_code ec;
  fs::remove_all(path_, ec);
}

const std::optional<FittedModel>& Fit::fitted() const {
  std::lock_guard lock(model_mutex_);
  if (!model_made_) {
    if (result.fit.usable())
      fitted_ = cli::fitted_model_of(result, run->loaded.config, run->loaded.series[series]);
    model_made_ = true;
  }
  return fitted_;
}

void Fit::set_fitted(FittedModel model) {
  std::lock_guard lock(model_mutex_);
  fitted_ = std::move(model);
  model_made_ = true;
}

std::string fit_json(const Fit& f, bool with_past) {
  const SeriesData& data = f.run->loaded.series[f.series];
  const FitResult& fit = f.result.fit;
  auto j = fit_to_json(fit);
  j["series"] = data.target_name;
  j["frequency"] = data.frequency;
  j["missing"] = describe_missing(data);
  const auto& note = f.run->loaded.config.seasonal_note;
  if (!note.empty()) j["seasonal_note"] = note;
  if (f.result.detected) j["outliers"] = outliers_to_json(*f.result.detected);
  if (with_past && fit.usable())
    j["past"] = past_to_json(explain_past(f.data(), fit.spec, fit.params, fit.start));
  return j.dump(1) + "\n";
}

void write_fit_files(const fs::path& folder, const Fit& f) {
  const RunConfig& config = f.run->loaded.config;
  const SeriesData& data = f.run->loaded.series[f.series];
  write_file_atomic(folder / run_files::kScreen, to_json(screen_series(data, config)).dump(1) + "\n");
  write_file_atomic(folder / run_files::kFit, fit_json(f, true));
  const auto& model = f.fitted();
  if (!model) return;  // no model: the report shows the fit's status and the screen
  const FitResult& fit = f.result.fit;
  save_model(folder / run_files::model_file(data.target_name, false), *model);
  write_file_atomic(folder / run_files::kPast,
                    past_csv(explain_past(f.data(), fit.spec, fit.params, fit.start)));
  write_chosen_forecast(folder / run_files::kForecast, *model, f.data(), config);
}

fs::path fit_charts(Fit& f) {
  if (!f.charts) {
    auto scratch = std::make_shared<Scratch>();
    write_fit_files(scratch->path(), f);
    ReportOptions options;
    options.title = "Fit: " + model_label(f.result.fit.spec);
    options.folder_name = f.run->loaded.series[f.series].target_name;
    write_report(scratch->path(), options);
    f.charts = std::move(scratch);
  }
  return f.charts->path() / run_files::kCharts;
}

}  // namespace lagsieve::python
