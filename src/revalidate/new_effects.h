#pragma once
// Re-validation question "did something happen in the new period?": the detection of
// outliers/detect.h on the new rows' one-step residuals of the deployed model, unchanged.
//
// The deployed model is re-filtered over all rows (never re-fitted). For every new row T and
// type the statistic tau = omega sqrt(sum h^2) / sigma of detect.h is computed from the residuals
// from T to the end (sigma: the robust scale of all residuals, training rows included); the
// largest |tau| above the critical value is recorded and its effect removed from the residuals,
// until none exceeds it or `outliers.max` effects are found. Only rows of the new period are
// tested. The critical value is the one the model's own detection used: `outliers.critical`, or
// the default rule at the training sample's n (default_critical_value(model n_obs, types)), so a
// new effect is judged as the deployed model's effects were. An effect within a few rows of the
// end of the data is reported as ambiguous between types (kAmbiguityRule).
//
// It runs when the config has an `outliers` section or the model holds detected effects, and
// counts toward the verdict as a threshold rule like the drift rule: any new effect makes the
// verdict at least `refit` (the effect enters the re-fit as an event input). Its chance of firing
// when nothing happened is about 5 % x new rows / training rows at the default critical value
// (the Bonferroni bound spent over fewer rows), so it is not one of the m tests of the
// Bonferroni split.
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "forecast/fitted_model.h"
#include "outliers/effects.h"

namespace lagsieve {

struct NewEffectsCheck {
  bool run = false;  // false: asked for by neither the config nor the model
  double critical = 0.0;
  int new_rows = 0;
  int tested_rows = 0;               // new rows with a residual
  std::vector<OutlierEffect> found;  // row order; size and statistic at the deployed parameters
  std::string note;                  // why it did not run, when asked
};

// The check on the rows after model.training.rows of `data` (which holds the model's effect
// columns, see with_model_effects).
NewEffectsCheck new_effects_check(const FittedModel& model, const SeriesData& data,
                                  const OutliersConfig& config);

// `data` plus one column per detected effect of the model (regenerated from its time stamp, or
// row index, as forecasts do), so the model can be re-filtered and re-fitted on new rows.
SeriesData with_model_effects(const FittedModel& model, const SeriesData& data);

// "level shift at 1984-03 (row 123): size 12.3, statistic 5.10".
std::string describe_new_effect(const OutlierEffect& e);

nlohmann::ordered_json new_effects_json(const NewEffectsCheck& c);

}  // namespace lagsieve
