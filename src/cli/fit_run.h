#pragma once
// The fit behind `lagsieve fit` (also called by the Python module on data from a DataFrame).
#include <optional>
#include <string>

#include "core/config.h"
#include "core/series.h"
#include "forecast/fitted_model.h"
#include "model/fit.h"
#include "outliers/detect.h"

namespace lagsieve::cli {

struct FitRun {
  FitResult fit;
  std::optional<OutlierFit> detected;  // with `outliers.enabled`: the joint fit and its effects
};

// Fits the one model the config describes on `data` (with outlier detection when enabled).
// Throws InputError, naming `config_name`, when the fit failed because inputs are nearly
// collinear; any other failure is the fit's status.
FitRun fit_single(const RunConfig& config, const SeriesData& data, const std::string& config_name);

// The model file of a usable fit (the detected effects included).
FittedModel fitted_model_of(const FitRun& run, const RunConfig& config, const SeriesData& data);

}  // namespace lagsieve::cli
