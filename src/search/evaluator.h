#pragma once
// Fits batches of candidates of one series in parallel: rows found in the journal are reused,
// candidates that differ only in the noise share one prepared problem (the transformed,
// differenced target and input columns, checked once), and each fit may be warm-started.
#include <mutex>
#include <optional>
#include <vector>

#include "core/series.h"
#include "core/spec.h"
#include "model/params.h"
#include "search/search.h"

namespace lagsieve {

class Evaluator {
 public:
  Evaluator(const SeriesData& data, int start, const SearchOptions& options, int threads)
      : data_(data), start_(start), options_(options), threads_(threads) {}

  // Fits every spec not in the journal; returns their rows in input order. `warm`, when given,
  // holds one optional start per spec (search/warm_start.h). Results never depend on the
  // thread count: each fit reads only its own spec, its start and the shared read-only data.
  std::vector<CandidateRow> evaluate(const std::vector<ModelSpec>& specs, int total_hint,
                                     const std::vector<std::optional<ModelParams>>* warm = nullptr);

  int fitted() const { return fitted_; }
  int resumed() const { return resumed_; }

 private:
  void report(int total);

  const SeriesData& data_;
  int start_;
  const SearchOptions& options_;
  int threads_;
  std::mutex mutex_;
  int done_ = 0;
  int fitted_ = 0;
  int resumed_ = 0;
};

// What a journal line holds: the row plus its nonlinear estimates (the warm start of later
// candidates, so a resumed run starts each fit where the first run did).
nlohmann::json journal_json(const CandidateRow& row);

}  // namespace lagsieve
