#pragma once
// The model search: candidates from the config, fitted in parallel (TBB) on one common sample,
// ranked by an information criterion, every outcome a row; a journal makes runs resumable.
#include <atomic>
#include <filesystem>
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "core/config.h"
#include "core/series.h"
#include "model/fit.h"
#include "outliers/effects.h"
#include "screen/screen.h"
#include "search/journal.h"
#include "search/stages.h"

namespace lagsieve {

// One candidate's outcome: a ranking row (the fitted values themselves are not kept).
struct CandidateRow {
  std::string series;
  std::string key;  // model label; unique within a series
  ModelSpec spec;
  FitStatus status = FitStatus::numerical_failure;
  std::string message;
  double loglik = std::numeric_limits<double>::quiet_NaN();
  double aic = std::numeric_limits<double>::quiet_NaN();
  double aicc = std::numeric_limits<double>::quiet_NaN();
  double bic = std::numeric_limits<double>::quiet_NaN();
  int n_obs = 0;
  int n_params = 0;
  double ljung_box_p = std::numeric_limits<double>::quiet_NaN();  // at the largest lag tested
  double seconds = 0.0;
  int evaluations = 0;
  int rank = 0;  // 1 = best; failures ranked last
  // Filled by the backtest stage for the shortlist (NaN elsewhere).
  double backtest_score = std::numeric_limits<double>::quiet_NaN();
  int backtest_rank = 0;  // 1 = lowest backtest score
  std::string selection;  // its part in the choice of the model (selection.h), in words
  // Names of the detected effects fitted with this row (search_outliers.h); empty: fitted
  // without. `spec` and `key` stay those of the candidate itself.
  std::vector<std::string> effects;
  // Nonlinear estimates in natural coordinates (pack_nonlinear order) of a usable fit: the warm
  // start of neighbouring candidates in a staged search; kept in the journal, not in rankings.
  std::vector<double> nonlinear;

  double criterion(Criterion c) const {
    return c == Criterion::aic ? aic : c == Criterion::aicc ? aicc : bic;
  }
  bool rankable() const {
    return status == FitStatus::ok || status == FitStatus::boundary ||
           status == FitStatus::no_convergence;
  }
};

nlohmann::json to_json(const CandidateRow& row);
CandidateRow candidate_row_from_json(const nlohmann::json& j, const ModelSpec& spec);

// How to run a search; what to search (strategy, criterion, budget) is the config's `search`.
struct SearchOptions {
  int threads = 0;             // 0: all cores; kInCallerArena (backtest.h): the caller's arena
  Journal* journal = nullptr;  // rows found there are reused; new rows are appended
  // Called after every finished candidate (from worker threads, serialised by the search).
  std::function<void(int done, int total)> progress;
  // guided: true fits in stages (search/guided.h); false fits the whole guided grid, as the
  // strategy did before (benchmarks and checks compare the two).
  bool staged_guided = true;
  // Set (from any thread) to stop: checked before every candidate; the search then throws
  // Cancelled (core/error.h) once the candidates already running have finished.
  const std::atomic<bool>* cancel = nullptr;
};

// Throws Cancelled when `cancel` is set (a null flag never cancels).
void check_cancel(const std::atomic<bool>* cancel);

// Outlier detection in a search (config `outliers`; search_outliers.h): one detection on the
// best candidate by the criterion, its set shared by every shortlisted candidate.
struct SearchOutliers {
  std::string detected_on;  // key of the candidate detection ran on
  double critical = 0.0;
  int rounds = 0;
  std::vector<OutlierEffect> effects;  // the shared set; sizes from the chosen model's fit
  std::vector<OutlierEffect> dropped;  // found, then below the critical value in the joint fit
  int shortlisted = 0;                 // rows re-fitted with the set
  double seconds = 0.0;                // detection plus the re-fits
  std::string note;                    // why nothing was detected, when detection failed
};

struct SearchResult {
  std::string series;
  std::vector<CandidateRow> rows;  // ranked
  int start = 0;                   // common first differenced index of every likelihood
  long long grid_size = 0;         // candidates the strategy considered
  int fitted = 0;                  // fitted in this run
  int resumed = 0;                 // taken from the journal
  long long full_grid_size = 0;    // candidates of the config's whole grid
  std::vector<StageReport> stages;  // what each stage fitted and skipped (stages.h)
  double seconds = 0.0;
  std::optional<ScreenResult> screen;  // guided and stepwise
  FitResult chosen;                    // the top row re-fitted with standard errors
  // What the rows are sorted by, why the model was chosen, and what the run should warn about
  // (filled by the search, then by the shortlist backtest); shown by the CLI and the report.
  std::string sorted_by;
  std::string chosen_reason;
  std::vector<Warning> warnings;
  std::optional<SearchOutliers> outliers;  // with an `outliers` section
  bool has_chosen() const { return chosen.usable(); }
};

// Ranks rows in place: rankable rows by criterion (ties by key), then rejected, then failures.
void rank_rows(std::vector<CandidateRow>& rows, Criterion criterion);

// Fits one candidate into a row (never throws for numerical trouble; bad data is a failure row),
// from `warm` when given (FitOptions::warm_start), else from the regression start values.
CandidateRow fit_candidate(const SeriesData& data, const ModelSpec& spec, int start,
                           const std::optional<ModelParams>& warm = std::nullopt);
// The same on a problem already built for the candidate (problem.spec is the candidate).
CandidateRow fit_candidate(const SeriesData& data, const LikelihoodProblem& problem,
                           const std::optional<ModelParams>& warm);

SearchResult run_search(const SeriesData& data, const RunConfig& config,
                        const SearchOptions& options);

// Adds a warning (to the result and to the chosen model's fit) when the chosen model's residuals fail a
// Ljung-Box test at the 1 % level at any lag tested.
void warn_on_chosen_residuals(SearchResult& result);

}  // namespace lagsieve

namespace lagsieve {

// Identifies a run for its journal: the config text and every series' data.
std::string run_fingerprint(const RunConfig& config, const std::vector<SeriesData>& series);

}  // namespace lagsieve
