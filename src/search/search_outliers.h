#pragma once
// Outlier detection in a search (config `outliers`), run on the shortlist.
//
// Rule: one shared set. After the grid is ranked by the criterion, detection (outliers/detect.h)
// runs once, on the best candidate by the criterion (the first row whose status may lead), on the search's
// common sample. Its effects then enter every shortlisted candidate (the top
// `backtest.shortlist` rankable rows) as the same event inputs, and those candidates are fitted
// again with them: every shortlisted fit has the same sample, the same effect columns and the
// same k added, so their criteria stay comparable with one another and the ranking among them is
// by the criterion with the set. Rows beyond the shortlist keep their fits without effects and
// rank after the shortlist (their criteria are not comparable with the shortlist's).
//
// Cost: one detection (a few to a dozen warm-started fits of one model) plus one fit per
// shortlisted candidate (in parallel); measured in SearchOutliers::seconds.
//
// In the shortlist backtest the set is part of every model but the seasonal naive, under the
// origin rule of known_at_origin (backtest.h): an effect dated at or after an origin is left out
// of that origin's fit.
#include <nlohmann/json.hpp>

#include "backtest/backtest.h"
#include "core/config.h"
#include "core/series.h"
#include "search/search.h"

namespace lagsieve {

inline constexpr const char* kSharedSetRule =
    "detection ran once, on the best candidate by the criterion; its effects enter every shortlisted candidate "
    "as the same event inputs (same sample, same columns, same added parameters), so their "
    "criteria stay comparable; rows beyond the shortlist are fitted without them and rank after";
inline constexpr const char* kBacktestOriginRule =
    "in the backtest an effect dated at or after an origin cannot be known there and is left out "
    "of that origin's fit (the origin is kept)";

// Detection on the best candidate by the criterion and the re-fits of the shortlist with its set; re-ranks
// result.rows (shortlist first) and fills result.outliers. A detection that fails is a note,
// never an exception.
void detect_on_shortlist(const SeriesData& data, const RunConfig& config, SearchResult& result,
                         int threads);

// The data with one column per detected effect (the data itself when there are none).
SeriesData search_data(const SeriesData& data, const SearchResult& result);

// The spec a row was fitted with: its own plus the effects it lists.
ModelSpec fitted_spec(const CandidateRow& row, const SearchResult& result);

// The detected effects a row was fitted with, in the order of its spec's effect terms.
std::vector<OutlierEffect> row_effects(const CandidateRow& row, const SearchResult& result);

// A backtest candidate for a row: candidate_from_spec plus the uses of its effects.
BacktestCandidate row_candidate(const std::string& name, const CandidateRow& row,
                                const SearchResult& result, const RunConfig& config);

// Sizes, s.e. and statistics of the set from the chosen model's fit (after a chosen model change).
void update_effect_sizes(SearchResult& result);

// The `outliers` entry of a search's fit.json: {detected_on, critical, critical_rule, rounds,
// shared_set_rule, backtest_rule, ambiguity_rule, shortlisted, seconds, effects, dropped[, note],
// history: {time, values}} (history: the target, for the report's chart).
nlohmann::json search_outliers_json(const SearchOutliers& o, const SeriesData& data);

}  // namespace lagsieve
