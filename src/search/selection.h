#pragma once
// Choosing the chosen model of a backtested shortlist without chasing noise.
//
// Rule `simplest_within_noise` (the default):
//  1. Eligible candidates: backtested, with a finite score and a fit status listed in
//     `backtest.chosen_statuses` (default ok and no_convergence: `boundary` — a unit root or a
//     non-invertible MA — and `rejected` never lead unless listed; benchmarks never lead).
//  2. The best: the eligible candidate with the lowest backtest score.
//  3. Each eligible candidate's per-origin loss (the mean over horizons of the score's error:
//     |e|/scale for mase and interval_score, |e| for mae, e^2 for rmse) is compared with the
//     best's by the Diebold-Mariano test with the Harvey-Leybourne-Newbold correction, one-sided
//     (H1: the candidate's loss is larger), with ceil(K / step) - 1 autocovariances (overlapping
//     windows of K steps make per-origin losses autocorrelated up to that lag), capped at n / 3.
//     A candidate is "significantly worse" when that p-value is below `selection_level`
//     (default 0.05). With too few origins to test (n < lags + 4) nobody is significantly worse.
//  4. The chosen model: among candidates not significantly worse, the fewest parameters, then the
//     lowest information criterion, then the lowest backtest score, then the label.
// Rule `best_score`: the eligible candidate with the lowest backtest score (step 2 alone).
#include <string>
#include <vector>

#include "backtest/backtest.h"
#include "search/search.h"

namespace lagsieve {

struct SelectionOptions {
  bool parsimonious = true;  // false: best_score
  double level = 0.05;       // one-sided DM level of "significantly worse than the best"
  std::vector<FitStatus> statuses{FitStatus::ok, FitStatus::no_convergence};
  Criterion criterion = Criterion::bic;
  AccuracyMeasure score = AccuracyMeasure::mase;
  int horizon = 1;  // K
  int step = 1;
};

// From the config's backtest and search sections.
SelectionOptions selection_options(const RunConfig& config);

struct SelectionCandidate {
  const CandidateRow* row = nullptr;  // its status, parameter count and criterion
  int model = -1;                     // index into BacktestResult::models
};

struct SelectionResult {
  int chosen = -1;  // index into the candidates; -1: none eligible
  int best = -1;    // lowest score among the eligible
  std::vector<double>
      p_worse;  // per candidate: one-sided p of "worse than the best" (NaN: untested)
  std::vector<std::string> notes;  // per candidate: its part in the choice, in words
  std::string reason;              // why the model was chosen
};

SelectionResult choose_model(const std::vector<SelectionCandidate>& candidates,
                              const BacktestResult& backtest, const SelectionOptions& options);

// Per origin of `origins`: the mean over horizons of the loss the score averages (NaN when the
// model has no record at that origin).
std::vector<double> loss_by_origin(const ForecastRecords& records, const std::vector<int>& origins,
                                   AccuracyMeasure measure);

}  // namespace lagsieve
