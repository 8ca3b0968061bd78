#pragma once
// Periodic re-validation of a deployed model: is the model in production still good on the data
// that arrived after its training rows, and is there a better one?
//
// Five pieces of evidence, then a verdict.
//  1. Performance: the deployed model, unchanged (re-filtered, never re-fitted), forecasts 1..K
//     steps from every origin inside the new period; per horizon MAE, MASE and coverage against
//     the accuracy of its own training-time backtest (from the model file; recomputed on the
//     training rows when the file has none), with the one-sided degradation test of checks.h.
//  2. Drift: the deployed structure re-fitted on all rows; each parameter's change in units of
//     its ORIGINAL standard error, flagged beyond `drift_threshold` (default 3). The re-fit shares
//     the training rows, so under "nothing changed" the change has a standard deviation of about
//     sqrt(1 - n_train / n_all) original SEs (0.5 for 300 + 100 rows): 3 is far out in the tail.
//  3. Residuals of the new period (one-step innovations of the deployed model, unchanged):
//     Ljung-Box, mean shift, variance change, coverage of the 1-step intervals (checks.h).
//  4. Challengers: a fresh search on all rows (the config's search and backtest sections); the
//     deployed structure's rank among them; then, on the new period's origins, the best challenger
//     (the best-ranked structure other than the deployed one) re-fitted as the config's backtest
//     says, against the deployed model as is and against the deployed structure re-fitted the
//     same way: Diebold-Mariano with the HLN correction, squared loss, one-sided, per horizon.
//     The challenger's structure was chosen with the new rows in view, a mild optimism that the
//     one-sided test at the Bonferroni level below more than absorbs in practice.
//
// Verdict rule. The tests that can move the verdict off `keep` are the degradation test at each
// horizon, the three residual tests (Ljung-Box, mean shift, variance change) and the test of the
// challenger against the deployed model at each horizon: m tests in all, each run at level
// alpha / m (Bonferroni; alpha = 0.05 by default), so the chance of a needless refit or replace
// when nothing has changed is at most alpha (plus the drift rule, which is a threshold, not a
// test, and almost never fires by chance, see 2). Coverage and the DM test against the re-fitted
// structure are reported but only the latter enters, and only in an intersection (below).
//   replace  the best challenger beats the deployed model significantly at some horizon AND beats
//            the deployed structure re-fitted significantly at some horizon (so re-fitting alone
//            would not catch up; both at alpha / m, an intersection, so the level stays alpha);
//   refit    otherwise, when any parameter drifted beyond the threshold, or a new effect (level
//            shift, outlier, ...) was detected in the new period (new_effects.h), or accuracy
//            degraded at some horizon, or a residual test rejects, or the challenger beats the
//            deployed model (but not its re-fit);
//   keep     otherwise.
// Every verdict comes with the reasons that produced it, numbers included.
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "backtest/backtest.h"
#include "core/config.h"
#include "core/series.h"
#include "evaluation/diebold_mariano.h"
#include "forecast/fitted_model.h"
#include "revalidate/checks.h"
#include "revalidate/new_effects.h"
#include "search/search.h"

namespace lagsieve {

// The files a re-validation writes besides run_files::kRevalidation (names chosen so the report
// does not take them for per-series files of a search).
inline constexpr const char* kRefitModelFile = "refit_model.json";
inline constexpr const char* kChallengerModelFile = "challenger_model.json";

enum class Verdict { keep, refit, replace };
std::string_view to_string(Verdict v);

struct RevalidateOptions {
  double alpha = 0.05;                 // family-wise false-alarm level of a verdict other than keep
  double drift_threshold = 3.0;        // |change| / original SE beyond which a parameter is flagged
  bool allow_revised_history = false;  // go on when the training rows differ from the model's
  // Fewest new observed target values accepted (the config's revalidate.min_new_rows, or
  // --min-new-rows). Few values are no error: the tests that need more say "not tested" and the
  // verdict says that the evidence is thin (docs/revalidation.md).
  int min_new_rows = 1;
  int ljung_box_lag = 0;     // 0: min(10, new rows / 5), at least ARMA terms + 1
  int comparison_refit = 0;  // re-fit every m-th new-period origin; 0: backtest.refit of
                             // the config, or 1 when that is 0 (never)
  int threads = 0;           // 0: the config's search.threads (0 = all cores)
  std::function<void(int, int)> progress;  // the challenger search's progress

  // Throws InputError naming the option for alpha outside (0, 1), a threshold <= 0, a negative
  // lag or refit interval, a minimum of new rows below 1.
  void validate() const;
};

// Below this many new one-step errors the verdict carries a note that the evidence is thin.
inline constexpr int kThinEvidenceRows = 20;

struct HistoryCheck {
  std::string source_file;
  int training_rows = 0;
  int rows = 0;       // of the merged series (training rows put back + the file)
  int file_rows = 0;  // of the data file as loaded
  int new_rows = 0;   // rows after the training rows
  // How the file met the training rows (model files that hold them; see overlap.h).
  bool checked_by_value =
      false;                   // false: fingerprint of the first training.rows rows (older files)
  int first_training_row = 1;  // 1-based training row the file starts on
  int prepended = 0;           // training rows taken from the model file
  int dropped_leading = 0;     // file rows before the training start, left out
  int overlap_rows = 0;
  int late_values = 0;                 // target values missing at training, observed now
  int refilled = 0;                    // values filled at training, observed now
  std::vector<std::string> revisions;  // the first revised values, described (1-based rows)
  int revision_count = 0;
  // Ragged edge: target values missing at the end of the training rows. Forecasts are scored
  // from the row after the last observed training value, so late values count as new.
  int ragged_edge = 0;
  int first_scored_row = 0;  // 1-based row of the first value scored (first origin + 1)
  int new_observed = 0;      // observed target values from there on
  std::string training_first_time, training_last_time;  // from the model file
  std::string new_first_time, new_last_time;            // of the new rows
  std::string expected_fingerprint, found_fingerprint;
  bool revised = false;  // the training rows differ (allowed by the option)
};

struct HorizonAccuracy {
  int horizon = 1;
  int count = 0;
  double mae = 0.0;
  double mase = 0.0;
  std::vector<double> coverage;  // per level
  double baseline_mae = 0.0;     // training-time (NaN when unknown)
  double baseline_mase = 0.0;
  int baseline_count = 0;
  std::vector<double> baseline_coverage;
  DegradationTest test;
  bool degraded = false;  // p below the per-test level
};

struct PerformanceCheck {
  std::string baseline_source;  // "model file", "recomputed on the training rows", "none"
  std::vector<double> levels;
  int first_origin = 0;  // first new row (forecasts start there)
  int origins = 0;
  double score = 0.0;           // new period, the config's measure, mean over horizons
  double baseline_score = 0.0;  // training time
  std::vector<HorizonAccuracy> by_horizon;
};

struct ParameterDrift {
  std::string name;
  double original = 0.0, original_se = 0.0;
  double refit = 0.0, refit_se = 0.0;
  double change = 0.0;
  double change_in_se = 0.0;  // change / original_se (NaN without a usable SE)
  bool flagged = false;
};

struct DriftCheck {
  double threshold = 3.0;
  std::string fit_status;
  std::string fit_message;
  std::vector<ParameterDrift> parameters;  // nonlinear then linear, as in the model file
};

struct ResidualCheck {
  int n = 0;  // new-period one-step residuals
  LjungBoxCheck ljung_box;
  MeanShiftCheck mean_shift;
  VarianceChangeCheck variance;
  std::vector<CoverageCheck> coverage;  // horizon-1 intervals, per level
};

struct ChallengerComparison {
  int horizon = 1;
  DieboldMarianoResult vs_deployed;  // loss a = deployed as is, b = challenger
  double p_vs_deployed = 1.0;        // one-sided: the challenger is better
  DieboldMarianoResult vs_refit;     // loss a = deployed structure re-fitted, b = challenger
  double p_vs_refit = 1.0;
};

struct ChallengerCheck {
  int candidates = 0;     // rows of the challenger search
  std::string ranked_by;  // "bic", ... or "backtest score" with a shortlist backtest
  std::string deployed_key;
  int deployed_rank = 0;         // 1 = best; 0 when not comparable (other transform/differencing)
  bool deployed_in_grid = true;  // false: fitted on the search's sample to place it
  std::string chosen_key;
  bool has_challenger = false;
  std::string challenger_key;
  ModelSpec challenger_spec;
  double score_deployed = 0.0;  // new-period origins, the config's measure
  double score_refit = 0.0;
  double score_challenger = 0.0;
  std::vector<ChallengerComparison> by_horizon;
  bool better_than_deployed = false;
  bool better_than_refit = false;
  std::string note;
  // Horizons of the backtest with too few paired forecasts for a Diebold-Mariano test (it needs
  // h + 3: its long-run variance uses h - 1 autocovariances), with the pairs there were.
  struct Untested {
    int horizon = 0;
    int pairs = 0;
  };
  std::vector<Untested> untested;
};

// What the report draws: the deployed model's one-step forecasts of the scored rows with their
// intervals, beside the actual values, after a stretch of the history before them.
struct NewPeriodView {
  std::vector<double> levels;
  std::vector<int> rows;  // 1-based
  std::vector<std::string> time;
  std::vector<double> actual, forecast;
  std::vector<std::vector<double>> lower, upper;  // per level, per row
  std::vector<int> context_rows;  // 1-based, the last rows before the first scored one
  std::vector<std::string> context_time;
  std::vector<double> context_actual;  // NaN where missing
};

// Few new rows: which tests could not run, and the smallest change in error they could show.
struct EvidenceNote {
  bool thin = false;  // fewer than kThinEvidenceRows new one-step errors
  int new_values = 0;
  std::vector<std::string> not_tested;  // each with the reason
  double detectable_ratio = 0.0;        // NaN below 2 values (see docs/revalidation.md)
};

struct RevalidationResult {
  Verdict verdict = Verdict::keep;
  std::vector<std::string> reasons;
  std::string series;
  std::string deployed_label;
  HistoryCheck history;
  PerformanceCheck performance;
  DriftCheck drift;
  ResidualCheck residuals;
  NewEffectsCheck new_effects;      // effects in the new period (new_effects.h)
  ChallengerCheck challengers;
  NewPeriodView new_period;
  EvidenceNote evidence;
  double alpha = 0.05;
  int tests = 0;                 // m, the tests that can move the verdict
  double alpha_per_test = 0.05;  // alpha / m
  // The deployed structure re-fitted on all rows, and the best challenger fitted on all rows;
  // each carries its new-period backtest accuracy as `backtest`, the baseline of the next check.
  std::optional<FittedModel> refit_model;
  std::optional<FittedModel> challenger_model;
  SearchResult search;        // the challenger search (ranked rows)
  BacktestResult comparison;  // new-period origins: deployed, re-fitted, challenger, naive
  double seconds = 0.0;
};

// Re-validates `model` on `data` (all rows: the training rows, then the new ones) with `config`
// (its search and backtest sections drive the challengers). `data` holds the training rows and
// the new ones; with a model file that stores its training rows it may start anywhere inside them
// (a rolling extract; see overlap.h). Throws InputError when fewer than options.min_new_rows new
// target values were observed, when a training value was revised (naming the first; unless
// allow_revised_history), or when an input of the model is missing from the data.
RevalidationResult revalidate(const FittedModel& model, const SeriesData& data,
                              const RunConfig& config, const RevalidateOptions& options = {});

// revalidation.json: verdict and reasons first (insertion order kept), then the evidence, flat
// enough for the report's generic tables.
nlohmann::ordered_json to_json(const RevalidationResult& r);

// The readable summary printed by `lagsieve revalidate`.
std::string summary_text(const RevalidationResult& r);

}  // namespace lagsieve
