#pragma once
// The second stage of a search: the top candidates by the information criterion are backtested
// with two benchmarks (the best model without inputs, a seasonal naive forecast); the final
// ranking is by backtest score, and the model is re-chosen by it.
#include "backtest/backtest.h"
#include "search/search.h"

namespace lagsieve {

struct ShortlistBacktest {
  BacktestOptions options;
  std::vector<BacktestCandidate> candidates;
  BacktestResult result;
};

// The backtest plan of a search's shortlist without running it: the options from the config
// and the candidates, the top `size` usable rows in rank order (named by their keys), then the
// two benchmarks. Benchmarks time run_backtest on it.
ShortlistBacktest shortlist_plan(const SeriesData& data, const RunConfig& config,
                                 const SearchResult& search, int size, int threads);

// Backtests the shortlist (config.backtest.shortlist rows), fills backtest_score / backtest_rank of
// its rows, re-ranks the rows (backtested rows first, by score), re-fits the new chosen model with
// standard errors, and measures the value of each of the chosen model's inputs. `cancel`
// (BacktestOptions::cancel) stops it before the next origin, throwing Cancelled (`search` may
// then be re-ranked already: a caller that catches it drops the search); the returned options
// hold no cancel flag.
ShortlistBacktest backtest_shortlist(const SeriesData& data, const RunConfig& config,
                                     SearchResult& search, int threads,
                                     const std::atomic<bool>* cancel = nullptr);

}  // namespace lagsieve
