#pragma once
// The run configuration: the parsed and validated YAML file. One schema serves a single fit
// (every range collapsed to one value) and a search. Defaults are documented beside each field;
// the YAML key is the field name unless noted. README.md, "Defaults in one place", lists them for
// users: keep it in step when a default changes.
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "core/spec.h"

namespace lagsieve {

// Inclusive integer range; YAML accepts `3` or `[1, 3]`.
struct IntRange {
  int min = 0;
  int max = 0;
  bool operator==(const IntRange&) const = default;
};

enum class MissingPolicy { error, interpolate, skip };  // skip: target only
enum class GapPolicy { insert, error };
enum class EventShape { pulse, step, ramp };
enum class FutureMode { known, forecast };
enum class ConstantMode { yes, no, automatic };  // YAML: true | false | auto
enum class Strategy { exhaustive, guided, stepwise };
enum class Criterion { aic, aicc, bic };
enum class WindowKind { expanding, sliding };
// Effects the data do not announce, found by outlier detection (src/outliers/).
enum class OutlierType { additive, level_shift, temporary, innovational };

struct DataConfig {
  std::filesystem::path file;               // resolved relative to the config file
  std::string time;                         // time column; "" = none (rows are the index)
  std::string time_format;                  // strftime-like, e.g. "%d/%m/%Y"; "" = recognised
  // Missing target values: skip (left out of the likelihood: exact likelihood of the observed
  // values), interpolate (filled linearly, never scored as data) or error.
  MissingPolicy missing = MissingPolicy::skip;
  // Missing input values: interpolate or error (default: interpolate when `missing` is
  // interpolate, else error).
  std::optional<MissingPolicy> missing_inputs;
  GapPolicy gaps = GapPolicy::insert;       // a missing period of a regular calendar
  // Long format: the column that names the series. "" = one series per target column (wide).
  // With a key, each distinct value is a series with its own rows, time range and input values
  // (data/panel.h); the target is one column (`target.column`).
  std::string series_key;
  MissingPolicy input_policy() const {
    if (missing_inputs) return *missing_inputs;
    return missing == MissingPolicy::interpolate ? MissingPolicy::interpolate
                                                 : MissingPolicy::error;
  }
};

struct TargetConfig {
  std::vector<std::string> columns;         // `column: x` or `columns: [x, y]` (panel run)
  TargetTransform transform;                // transform: none | log | boxcox; lambda
};

// Own model of an input whose future must be forecast: ARMA on the input after the model's
// differencing. Absent orders: chosen by AIC over p, q in 0..2 and recorded.
struct InputModelConfig {
  std::optional<int> p;
  std::optional<int> q;
};

struct InputConfig {
  std::string name;                         // `column: x` (a data column) or `event: name`
  bool is_event = false;
  EventShape shape = EventShape::pulse;     // events only
  // Events only: a time stamp or a row index; several occurrences (a YAML list, or an event
  // file) are joined by ';' and a window is "from..to" (data/events.h).
  std::string at;
  IntRange delay;                           // b (default 0)
  IntRange numerator;                       // s (default 0)
  IntRange denominator;                     // r (default 0)
  bool optional = false;                    // the search may leave it out
  FutureMode future = FutureMode::known;    // events are always known
  int known_steps = 0;                      // with future: forecast, the first m steps known
  InputModelConfig own_model;               // `model: {ar: 1, ma: 0}`
  int line = 0;                             // YAML line, for messages
};

struct NoiseConfig {
  IntRange ar;                              // p (default 0)
  IntRange ma;                              // q (default 0)
  IntRange seasonal_ar;                     // P (default 0)
  IntRange seasonal_ma;                     // Q (default 0)
  int period = 1;                           // S (default: differencing.period)
  ConstantMode constant = ConstantMode::automatic;
};

struct SearchConfig {
  Strategy strategy = Strategy::exhaustive;
  Criterion criterion = Criterion::bic;
  int budget = 20000;                       // candidates at most (stepwise, and a cap overall)
  int threads = 0;                          // 0 = all cores
};

struct BacktestConfig {
  bool enabled = false;                     // true when the YAML has a backtest section
  int first_origin = 0;                     // row index of the first origin (0 = auto: 2/3 of rows)
  int step = 1;
  int horizon = 1;                          // K
  WindowKind window = WindowKind::expanding;
  int window_length = 0;                    // sliding only; 0 = first_origin
  int refit = 1;                            // refit every m-th origin; 0 = never
  int shortlist = 10;
  std::vector<double> levels{0.8, 0.95};
  std::string score = "mase";               // mase | rmse | mae | interval_score
  // How the model is chosen from the backtested shortlist (src/search/selection.h):
  // simplest_within_noise (default) | best_score; the one-sided Diebold-Mariano level of
  // "significantly worse than the best"; the fit statuses that may lead.
  std::string selection = "simplest_within_noise";
  double selection_level = 0.05;
  std::vector<std::string> chosen_statuses{"ok", "no_convergence"};
};

// `fit:` at the top level: how every fit of the run estimates (src/model/fit.h).
struct FitConfig {
  // estimated (default): the r pre-sample states of each 1/delta(B) are linear parameters,
  // counted in k; zero: the filter starts from zeros (compare with tables that do so).
  FilterStart filter_start = FilterStart::estimated;
  // ml (default): exact maximum likelihood; restricted: the linear parameters integrated out of
  // the objective of the nonlinear ones (less small-sample bias of the noise parameters).
  Estimation estimation = Estimation::ml;
};

struct ForecastConfig {
  int horizon = 0;                          // 0 = backtest.horizon or 12
  std::vector<double> levels{0.8, 0.95};
  bool parameter_uncertainty = true;        // intervals include the parameters' estimation error
};

// `outliers:` at the top level: automatic detection of additive outliers, level shifts, temporary
// changes and innovational outliers, joint with the fit (src/outliers/detect.h). Off when the
// section is absent.
struct OutliersConfig {
  bool enabled = false;  // true when the YAML has an `outliers` section
  std::vector<OutlierType> detect{OutlierType::additive, OutlierType::level_shift,
                                  OutlierType::temporary};
  double critical = 0.0;  // `critical: auto` (0 here) = the rule of default_critical_value(n)
  int max = 10;           // effects at most
  double decay = 0.7;     // delta of the temporary change's decay delta^(t - T)
};

// `revalidate:` at the top level: settings of `lagsieve revalidate` that belong with the data's
// cadence (see docs/revalidation.md).
struct RevalidateConfig {
  // Fewest new observed target values a re-validation accepts. 1 by default: a monthly series
  // re-checked every month has one new value; the tests that need more rows say "not tested" and
  // the verdict says that the evidence is thin.
  int min_new_rows = 1;
};

struct OutputConfig {
  std::filesystem::path dir = "runs/out";   // resolved relative to the config file
};

struct RunConfig {
  std::filesystem::path config_file;
  // The YAML text the config was read from (kept in model files; callers without a file, such as
  // the Python module, have only the text).
  std::string text;
  DataConfig data;
  TargetConfig target;
  Differencing differencing;
  std::vector<InputConfig> inputs;
  NoiseConfig noise;
  SearchConfig search;
  BacktestConfig backtest;
  FitConfig fit;
  ForecastConfig forecast;
  OutliersConfig outliers;
  RevalidateConfig revalidate;
  OutputConfig output;
  // Seasonal terms used without a period: the period is the one the data's frequency suggests
  // (apply_seasonal_default in data/load.h fills it in and says so in `seasonal_note`).
  bool differencing_period_from_data = false;
  bool noise_period_from_data = false;
  std::string seasonal_note;
};

}  // namespace lagsieve
