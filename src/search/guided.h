#pragma once
// The staged `guided` strategy: instead of fitting the whole grid around the screen's
// suggestions, it chooses one input at a time (the others held), growing orders only while they
// pay, then the noise with the chosen inputs, then single moves from the best until none
// improves. Every fit starts from its nearest fitted neighbour. See docs/search.md.
#include <string>
#include <vector>

#include "core/config.h"
#include "search/candidates.h"
#include "search/search.h"
#include "search/stages.h"

namespace lagsieve {

class Evaluator;

struct StagedSearch {
  std::vector<CandidateRow> rows;     // every candidate evaluated, in evaluation order
  std::vector<StageReport> stages;    // inputs, noise, polish (the screen stage is the caller's)
  std::vector<Warning> warnings;      // e.g. search_budget_reached
};

// `grid` is the guided grid (guided_grid); `start` the screen's suggestion (suggested_spec).
// Fits at most `budget` candidates. Deterministic: every choice is made on whole batches, ties by
// the model label, and warm starts come only from batches finished before.
StagedSearch staged_search(const CandidateGrid& grid, const ModelSpec& start, Criterion criterion,
                           int budget, Evaluator& evaluator);

// Why a candidate of the grid was not fitted, per input option (exposed for the tests).
enum class OptionFate { evaluated, left_out, orders_stopped, not_reached };

// Candidates of `grid` not evaluated, by reason: the first input (grid order) with an option
// never evaluated gives its fate; with every option evaluated, the combination was off the
// search path. `fates[i][k]` is the fate of option k of input i (options_of order), `evaluated`
// the number of distinct candidates evaluated.
struct SkipCounts {
  long long left_out = 0, orders_stopped = 0, not_reached = 0, off_path = 0;
};
SkipCounts count_skipped(const CandidateGrid& grid,
                         const std::vector<std::vector<OptionFate>>& fates, long long evaluated);

// The options of input i of a grid, in a fixed order: left out (if optional), then every
// (b, s, r) in range (if allowed in). nullopt = left out.
std::vector<std::optional<InputOrder>> options_of(const CandidateGrid::InputRanges& in);

}  // namespace lagsieve
