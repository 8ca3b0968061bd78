// Outlier detection in a search: one detection on the best candidate by the criterion, the same set fitted with
// every shortlisted candidate (same sample, same columns), the rows ranked with it, and in the
// shortlist backtest an effect left out of the fits at origins before its date.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "model/likelihood.h"
#include "outliers/detect.h"
#include "search/search.h"
#include "search/search_outliers.h"
#include "search/shortlist.h"
#include "search_test_util.h"

namespace lagsieve {
namespace {

using testing::SearchCase;

constexpr int kShiftRow = 150;

// One input through 1.5 B / (1 - 0.6 B), AR(1) noise; the search tries b, s, r and p, q in small
// ranges, so the shortlist holds several structures.
SearchCase shift_case(std::uint64_t seed) {
  SearchCase c;
  c.name = "outliers";
  c.n = 240;
  c.seed = seed;
  c.inputs = {{"x", {1, 0, 1}, {1.5}, {0.6}, 0.5, {0, 2}, {0, 1}, {0, 1}, false}};
  c.noise = {1, 0, 0, 0, 1};
  c.phi = {0.5};
  c.ar = {0, 2};
  c.ma = {0, 1};
  c.constant = 5.0;
  return c;
}

// The series with a level shift of `size` innovation standard deviations from kShiftRow on.
SeriesData shifted(const SearchCase& c, double size) {
  SeriesData data = simulate(testing::simulation_of(c));
  for (int t = kShiftRow; t < data.rows(); ++t) data.target[t] += size;
  return data;
}

RunConfig outlier_config(const SearchCase& c, int shortlist) {
  RunConfig config = testing::config_of(c, 2);
  config.outliers.enabled = true;
  config.backtest.shortlist = shortlist;
  return config;
}

SearchOptions options_of(const RunConfig& config) {
  SearchOptions o;
  o.threads = config.search.threads;
  return o;
}

const OutlierEffect* shift_near(const std::vector<OutlierEffect>& effects, int row) {
  for (const auto& e : effects)
    if (e.type == OutlierType::level_shift && std::abs(e.row - row) <= 1) return &e;
  return nullptr;
}

TEST(SearchOutliers, PlantedLevelShiftSharedByEveryShortlistedCandidate) {
  const SearchCase c = shift_case(31);
  const SeriesData data = shifted(c, 5.0);
  const RunConfig config = outlier_config(c, 6);
  const SearchResult r = run_search(data, config, options_of(config));
  ASSERT_TRUE(r.outliers.has_value());
  const auto& o = *r.outliers;
  ASSERT_NE(shift_near(o.effects, kShiftRow), nullptr) << "the planted level shift was not found";
  EXPECT_EQ(o.shortlisted, 6);
  std::vector<std::string> names;
  for (const auto& e : o.effects) names.push_back(e.name);

  // The first six rows are the shortlist, each fitted with the whole set on the same sample; each
  // fit is the candidate's own spec plus the set, on the search's data plus the set's columns.
  const SeriesData augmented = with_effect_columns(data, o.effects);
  int n_obs = -1;
  for (int i = 0; i < 6; ++i) {
    const auto& row = r.rows[i];
    ASSERT_TRUE(row.rankable()) << row.key;
    EXPECT_EQ(row.effects, names) << row.key;
    if (n_obs < 0) n_obs = row.n_obs;
    EXPECT_EQ(row.n_obs, n_obs) << row.key << ": another sample than the rest of the shortlist";
    const CandidateRow by_hand =
        fit_candidate(augmented, with_effect_terms(row.spec, o.effects), r.start);
    EXPECT_EQ(row.loglik, by_hand.loglik) << row.key;
    EXPECT_EQ(row.n_params, by_hand.n_params) << row.key;
    if (i > 0) {
      EXPECT_LE(r.rows[i - 1].bic, row.bic) << "shortlist not ranked by the criterion";
    }
  }
  // Detection ran on one of them (the best candidate by the criterion without effects).
  EXPECT_TRUE(std::any_of(r.rows.begin(), r.rows.begin() + 6,
                          [&](const CandidateRow& row) { return row.key == o.detected_on; }));
  // Rows past the shortlist are fitted without the set.
  for (size_t i = 6; i < r.rows.size(); ++i)
    EXPECT_TRUE(r.rows[i].effects.empty()) << r.rows[i].key;
  // The chosen model's fit carries each effect as an input, its size near the planted 5.
  ASSERT_TRUE(r.has_chosen());
  const auto* shift = shift_near(o.effects, kShiftRow);
  bool in_chosen = false;
  for (const auto& est : r.chosen.estimates)
    in_chosen = in_chosen || est.name == shift->name + ".omega0";
  EXPECT_TRUE(in_chosen);
  EXPECT_NEAR(shift->size, 5.0, 4.0 * shift->std_error);
  EXPECT_GT(std::abs(shift->statistic), o.critical);
}

TEST(SearchOutliers, SameResultOnOneAndTwoThreads) {
  const SearchCase c = shift_case(31);
  const SeriesData data = shifted(c, 5.0);
  RunConfig one = outlier_config(c, 6);
  one.search.threads = 1;
  const RunConfig two = outlier_config(c, 6);
  const SearchResult a = run_search(data, one, options_of(one));
  const SearchResult b = run_search(data, two, options_of(two));
  ASSERT_EQ(a.rows.size(), b.rows.size());
  for (size_t i = 0; i < a.rows.size(); ++i) {
    EXPECT_EQ(a.rows[i].key, b.rows[i].key);
    EXPECT_EQ(a.rows[i].loglik, b.rows[i].loglik) << a.rows[i].key;
    EXPECT_EQ(a.rows[i].effects, b.rows[i].effects);
  }
  ASSERT_TRUE(a.outliers && b.outliers);
  ASSERT_EQ(a.outliers->effects.size(), b.outliers->effects.size());
  for (size_t i = 0; i < a.outliers->effects.size(); ++i)
    EXPECT_EQ(a.outliers->effects[i].size, b.outliers->effects[i].size);
}

TEST(SearchOutliers, OffWithoutTheSectionAndRowsUntouchedWhenNothingIsFound) {
  const SearchCase c = shift_case(32);
  const SeriesData data = simulate(testing::simulation_of(c));  // no effect planted
  RunConfig plain = outlier_config(c, 6);
  plain.outliers.enabled = false;
  const SearchResult a = run_search(data, plain, options_of(plain));
  EXPECT_FALSE(a.outliers.has_value());
  RunConfig strict = outlier_config(c, 6);
  strict.outliers.critical = 50.0;  // nothing can exceed it
  const SearchResult b = run_search(data, strict, options_of(strict));
  ASSERT_TRUE(b.outliers.has_value());
  EXPECT_TRUE(b.outliers->effects.empty());
  ASSERT_EQ(a.rows.size(), b.rows.size());
  for (size_t i = 0; i < a.rows.size(); ++i) {
    EXPECT_EQ(a.rows[i].key, b.rows[i].key);
    EXPECT_EQ(a.rows[i].loglik, b.rows[i].loglik);
    EXPECT_TRUE(b.rows[i].effects.empty());
  }
}

TEST(SearchOutliers, EffectLeftOutOfTheFitsAtOriginsBeforeItsDate) {
  const SearchCase c = shift_case(31);
  const SeriesData data = shifted(c, 5.0);
  RunConfig config = outlier_config(c, 3);
  config.backtest.enabled = true;
  config.backtest.first_origin = 120;  // 30 origins before the shift, the rest after it
  config.backtest.step = 3;
  config.backtest.horizon = 4;
  SearchResult r = run_search(data, config, options_of(config));
  ASSERT_TRUE(r.outliers && shift_near(r.outliers->effects, kShiftRow));
  const auto bt = backtest_shortlist(data, config, r, 2);
  // No origin is dropped: before the shift the effect is left out of the fit, not a failure.
  EXPECT_TRUE(bt.result.dropped_origins.empty());
  EXPECT_EQ(bt.result.origins.front(), 120);
  for (const auto& m : bt.result.models) EXPECT_EQ(m.failed_origins, 0) << m.name << ": " << m.note;
  // The rule itself: the shortlisted candidate before and after the effect's row.
  const auto& lead = bt.candidates.front();
  const auto* shift = shift_near(r.outliers->effects, kShiftRow);
  const SeriesData augmented = search_data(data, r);
  auto has = [&](const BacktestCandidate& cand) {
    return std::any_of(cand.spec.inputs.begin(), cand.spec.inputs.end(),
                       [&](const InputTerm& t) { return t.name == shift->name; });
  };
  ASSERT_TRUE(has(lead));
  EXPECT_FALSE(has(known_at_origin(lead, slice_rows(augmented, 0, shift->row), 0, shift->row)));
  EXPECT_TRUE(
      has(known_at_origin(lead, slice_rows(augmented, 0, shift->row + 1), 0, shift->row + 1)));
  // The chosen model's input value leaves the effects alone (they are not inputs asked about).
  for (const auto& iv : bt.result.input_value) EXPECT_EQ(iv.input.find('@'), std::string::npos);
  // The model re-chosen by the backtest still carries the set.
  EXPECT_FALSE(r.rows.front().effects.empty());
}

}  // namespace
}  // namespace lagsieve
