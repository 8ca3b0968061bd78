#pragma once
// Rolling-origin backtest (Tashman 2000): forecasts 1..K from a sequence of origins, each from
// the data before it, inputs treated as in production and, side by side, with their real future
// (oracle). Refit at every origin, every m-th origin, or never (re-filter the first fit).
#include <atomic>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <tbb/info.h>
#include <tbb/task_arena.h>

#include "core/config.h"
#include "core/series.h"
#include "core/warning.h"
#include "evaluation/diebold_mariano.h"
#include "evaluation/metrics.h"
#include "forecast/fitted_model.h"

namespace lagsieve {

// Thread counts of the parallel stages (search, backtest): > 0 that many workers in an arena of
// their own, 0 all cores, kInCallerArena the caller's task arena. A batch of series runs its
// series in one arena and the candidates of each series as tasks of that same arena, so series
// and candidates share one pool of workers (never more threads than asked); the work is
// isolated, so a thread waiting for its own candidates never picks up another series midway.
inline constexpr int kInCallerArena = -1;
template <class Body>
void run_in_arena(int threads, Body&& body) {
  if (threads == kInCallerArena) {
    tbb::this_task_arena::isolate(body);
    return;
  }
  tbb::task_arena arena(threads > 0 ? threads : tbb::info::default_concurrency());
  arena.execute(body);
}

struct BacktestOptions {
  int first_origin = 0;  // row of the first origin (forecasts start there)
  int step = 1;
  int horizon = 1;  // K
  WindowKind window = WindowKind::expanding;
  int window_length = 0;  // sliding: rows in the window (0 = first_origin)
  int refit = 1;          // every m-th origin; 0 = never (re-filter the first fit)
  std::vector<double> levels{0.8, 0.95};
  AccuracyMeasure score = AccuracyMeasure::mase;  // overall score: mean over horizons 1..K
  int season = 1;   // period of the MASE scale and of the naive benchmark
  int start = -1;   // first differenced index of every fit (-1: the spec's)
  int threads = 0;  // 0: all cores; kInCallerArena: the caller's arena
  // Set (from any thread) to stop: every candidate checks it before each origin, and
  // run_backtest (and input_value) then throws Cancelled (core/error.h) once the origins already
  // running have finished; nothing of the run is returned. Null (the default) never cancels.
  const std::atomic<bool>* cancel = nullptr;
  // Called after each origin of each candidate (from the worker threads, not serialised), e.g.
  // to count progress or to cancel midway.
  std::function<void()> origin_done;
};

// Validated options from the config (InputError naming the backtest key otherwise).
BacktestOptions backtest_options(const RunConfig& config, int rows);

// An event can only be estimated from a window that holds rows where it is active: the first
// origin at which every candidate of the config's grid that includes `event` can be fitted is
// at least event row + largest delay + numerator + denominator + 1 (the event's first active
// row in the window must leave every lag of its transfer function one row). One entry per event
// of the config whose bound lies after the configured first origin.
struct EventOriginBound {
  std::string event;
  int event_row = 0;  // 1-based row of the data where the event starts
  std::string event_time;
  int first_origin = 0;  // the smallest origin that can estimate it (backtest.first_origin)
};
std::vector<EventOriginBound> event_origin_bounds(const RunConfig& config, const SeriesData& data,
                                                  int first_origin);

// One model to backtest: a spec fitted at the origins, a fixed model (model files), or the
// seasonal naive benchmark.
struct BacktestCandidate {
  enum class Kind { model, seasonal_naive };
  std::string name;
  Kind kind = Kind::model;
  bool benchmark = false;
  ModelSpec spec;
  std::vector<InputUse> inputs;                // production treatment of each spec input
  std::vector<InputModelConfig> input_orders;  // own-model orders of inputs forecast (per input)
  std::optional<FittedModel> fixed;            // a deployed model: its parameters are the first fit
};

struct ModelBacktest {
  std::string name;
  bool benchmark = false;
  ForecastRecords production;  // inputs as in production
  ForecastRecords oracle;      // inputs' real future
  AccuracyTable production_accuracy;
  AccuracyTable oracle_accuracy;
  double score = 0.0;          // production, mean over horizons of the chosen measure
  int failed_origins = 0;      // origins where the fit or forecast failed
  std::vector<int> failed_at;  // those origins, in order
  std::string note;            // the first failure's cause
};

struct ComparisonRow {
  std::string chosen, challenger;
  int horizon = 0;
  std::string loss = "squared";
  bool tested = true;  // false: too few pairs at this horizon (see note)
  DieboldMarianoResult test;
  std::string note;  // why the test was not run, or its fallback, in words
};

struct InputValueRow {
  std::string input;
  double score_with = 0.0;
  double score_without = 0.0;
  DieboldMarianoResult test;  // per-origin mean scaled absolute error, chosen model vs without
};

struct BacktestResult {
  // The origins every model and benchmark is scored on (an origin is the number of rows before
  // the first forecast: the window is rows 1..origin, 1-based). Origins some candidate could not
  // forecast from are dropped for all (dropped_origins) so every table, chart and test compares
  // the same forecasts; `warnings` names the cause and the count.
  std::vector<int> origins;
  std::vector<std::string> origin_times;  // time stamp of the origin's last row (1..origin)
  std::vector<int> dropped_origins;
  std::vector<Warning> warnings;
  std::vector<std::string> row_times;  // the data's time stamps (backtest.csv `time` column)
  std::vector<ModelBacktest> models;   // candidate order
  int chosen = -1;                     // best score among non-benchmark models
  std::vector<ComparisonRow> comparisons;
  std::vector<InputValueRow> input_value;
  std::vector<double> levels;
};

// Backtests every candidate (parallel over candidates; origins in order so refits warm-start
// from the previous origin's parameters). Results do not depend on the thread count. Throws
// Cancelled when options.cancel is set before the last origin of every candidate has run.
BacktestResult run_backtest(const SeriesData& data,
                            const std::vector<BacktestCandidate>& candidates,
                            const BacktestOptions& options);

// The candidate as it can be fitted at `origin` from the window of rows from..origin-1: a
// detected effect (an input with `effect`) dated at or after the origin cannot be known there and
// is left out of that origin's fit (rather than dropping the origin); one whose column is
// constant over the window (it began before a sliding window) is left out as well. Other inputs
// are kept.
BacktestCandidate known_at_origin(const BacktestCandidate& c, const SeriesData& window, int from,
                                  int origin);

// Diebold-Mariano tests of the chosen model against every other model, per horizon (squared loss).
std::vector<ComparisonRow> compare_to_chosen(const BacktestResult& result);

// For the chosen model: the backtest with each of its inputs left out (the rest re-fitted).
std::vector<InputValueRow> input_value(const SeriesData& data, const BacktestCandidate& chosen,
                                       const ModelBacktest& chosen_result,
                                       const BacktestOptions& options);

// A candidate from a spec and the config's input settings.
BacktestCandidate candidate_from_spec(const std::string& name, const ModelSpec& spec,
                                      const RunConfig& config);
BacktestCandidate candidate_from_model(const std::string& name, const FittedModel& model);
BacktestCandidate seasonal_naive_candidate(int season);

// The output files (run_folder.h): CSV text.
std::string backtest_csv(const BacktestResult& r);
std::string accuracy_csv(const BacktestResult& r);
std::string comparisons_csv(const BacktestResult& r);
std::string input_value_csv(const BacktestResult& r);
// Accuracy of one model as JSON (stored in its model file for re-validation).
nlohmann::json accuracy_json(const ModelBacktest& m, const BacktestOptions& options);

}  // namespace lagsieve
