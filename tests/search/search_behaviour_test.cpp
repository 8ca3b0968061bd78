// Properties of a search run that hold by construction: the ranking does not depend on the
// thread count (bit for bit), every candidate is scored on the same observations (closed form:
// rows - differencing loss - largest lag of the grid), and a candidate that cannot be fitted is
// a failure row ranked last, not an exception.
#include <gtest/gtest.h>

#include <atomic>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "core/error.h"
#include "io/config.h"
#include "search/candidates.h"
#include "search/search.h"
#include "search_test_util.h"

namespace lagsieve {
namespace {

using testing::SearchCase;

// Two relevant inputs (one rational), one useless optional input, ARMA(1,1) noise.
SearchCase small_case(int n, std::uint64_t seed) {
  SearchCase c;
  c.name = "behaviour";
  c.n = n;
  c.seed = seed;
  c.inputs = {{"x1", {2, 0, 1}, {1.5}, {0.6}, 0.5, {0, 3}, {0, 1}, {0, 1}, false},
              {"x2", {0, 1, 0}, {1.0, 0.8}, {}, 0.3, {0, 1}, {0, 1}, {0, 0}, false},
              {"x3", {}, {0.0}, {}, 0.5, {0, 1}, {0, 0}, {0, 0}, true}};
  c.noise = {1, 1, 0, 0, 1};
  c.phi = {0.5};
  c.theta = {0.3};
  c.ar = {0, 1};
  c.ma = {0, 1};
  return c;
}

SearchOptions options_of(const RunConfig& config) {
  SearchOptions options;
  options.threads = config.search.threads;
  return options;
}

std::uint64_t bits(double v) { return std::bit_cast<std::uint64_t>(v); }

TEST(SearchDeterminism, RankingIdenticalWithOneAndTwoThreads) {
  const SearchCase c = small_case(300, 201);
  const SeriesData data = simulate(testing::simulation_of(c));
  const RunConfig one = testing::config_of(c, 1);
  const RunConfig two = testing::config_of(c, 2);
  const SearchResult a = run_search(data, one, options_of(one));
  const SearchResult b = run_search(data, two, options_of(two));
  ASSERT_EQ(a.rows.size(), b.rows.size());
  ASSERT_EQ(static_cast<long long>(a.rows.size()), grid_size(full_grid(one)));
  int fitted = 0;
  for (size_t i = 0; i < a.rows.size(); ++i) {
    const auto& ra = a.rows[i];
    const auto& rb = b.rows[i];
    ASSERT_EQ(ra.key, rb.key) << "rank " << i + 1;
    EXPECT_EQ(ra.rank, rb.rank);
    EXPECT_EQ(ra.status, rb.status) << ra.key;
    // Bitwise: the same arithmetic must run whatever thread picks the candidate up.
    EXPECT_EQ(bits(ra.loglik), bits(rb.loglik))
        << ra.key << ": " << ra.loglik << " vs " << rb.loglik;
    EXPECT_EQ(bits(ra.bic), bits(rb.bic)) << ra.key;
    EXPECT_EQ(ra.n_obs, rb.n_obs) << ra.key;
    EXPECT_EQ(ra.evaluations, rb.evaluations) << ra.key;
    fitted += ra.rankable() ? 1 : 0;
  }
  EXPECT_GT(fitted, static_cast<int>(a.rows.size()) * 9 / 10);
  ASSERT_TRUE(a.has_chosen() && b.has_chosen());
  EXPECT_EQ(bits(a.chosen.loglik), bits(b.chosen.loglik));
}

TEST(SearchCommonSample, EveryCandidateReportsTheSameObservationCount) {
  for (const int regular : {0, 1}) {
    SearchCase c = small_case(240, 202);
    c.inputs[0].delay = {0, 5};  // largest lag of the grid: delay 5 + numerator 1 = 6
    SimulationSpec sim = testing::simulation_of(c);
    sim.integrate.regular = regular;
    const SeriesData data = simulate(sim);
    RunConfig config = testing::config_of(c, 2);
    config.differencing.regular = regular;
    const SearchResult result = run_search(data, config, options_of(config));
    ASSERT_EQ(result.start, 6);
    const int expected = c.n - regular - 6;
    // Rows rejected by diagnostics (near cancellation) were fitted too and count here.
    int fitted = 0;
    for (const auto& row : result.rows) {
      EXPECT_NE(row.status, FitStatus::numerical_failure) << row.key << ": " << row.message;
      if (row.status == FitStatus::numerical_failure) continue;
      ++fitted;
      EXPECT_EQ(row.n_obs, expected) << "d = " << regular << ", " << row.key;
    }
    EXPECT_EQ(fitted, static_cast<int>(result.rows.size())) << "d = " << regular;
  }
}

TEST(SearchFailures, CandidateThatCannotBeFittedIsARowRankedLast) {
  // `promo` is a pulse at row 0: inside the common sample (from index 4 on) it and its lag are
  // zero, so every candidate that includes it has an all-zero regressor.
  SearchCase c = small_case(200, 203);
  c.inputs.resize(1);
  c.inputs[0].delay = {3, 4};
  c.inputs[0].numerator = {0, 0};
  c.inputs[0].denominator = {0, 1};
  SeriesData data = simulate(testing::simulation_of(c));
  std::vector<double> pulse(data.rows(), 0.0);
  pulse[0] = 1.0;
  data.input_names.push_back("promo");
  data.inputs.push_back(pulse);
  RunConfig config = testing::config_of(c, 2);
  InputConfig promo;
  promo.name = "promo";
  promo.is_event = true;
  promo.delay = {0, 1};
  promo.optional = true;
  config.inputs.push_back(promo);

  SearchResult result;
  ASSERT_NO_THROW(result = run_search(data, config, options_of(config)));
  ASSERT_EQ(static_cast<long long>(result.rows.size()), grid_size(full_grid(config)));
  int failures = 0;
  bool seen_failure = false;
  for (const auto& row : result.rows) {
    bool has_promo = false;
    for (const auto& t : row.spec.inputs) has_promo |= t.name == "promo";
    if (has_promo) {
      ++failures;
      EXPECT_EQ(row.status, FitStatus::numerical_failure) << row.key;
      EXPECT_FALSE(row.message.empty()) << row.key;
      EXPECT_TRUE(std::isnan(row.loglik)) << row.key;
      seen_failure = true;
    } else {
      EXPECT_TRUE(row.rankable()) << row.key << ": " << row.message;
      EXPECT_FALSE(seen_failure) << row.key << " ranked below a failure";
    }
  }
  // promo in at delay 0 or 1, times x1 (2 delays x 2 denominators) x noise (2 x 2).
  EXPECT_EQ(failures, 2 * 4 * 4);
  EXPECT_TRUE(result.has_chosen());
  std::printf("  failure row message: %s\n", result.rows.back().message.c_str());
}

}  // namespace
}  // namespace lagsieve

namespace lagsieve {
namespace {

// Five inputs at the widest orders the config allows span more than 2^63 candidates: the count
// must saturate (and so exceed any budget), not wrap around to a small or negative number.
TEST(CandidateGrid, SizeSaturatesInsteadOfOverflowing) {
  RunConfig config;
  for (int i = 0; i < 5; ++i) {
    InputConfig in;
    in.name = "x" + std::to_string(i);
    in.delay = {0, 500};
    in.numerator = {0, 24};
    in.denominator = {0, 4};
    config.inputs.push_back(in);
  }
  EXPECT_EQ(grid_size(full_grid(config)), std::numeric_limits<long long>::max());
  EXPECT_EQ(candidate_grid_size(config), std::numeric_limits<long long>::max());
  config.inputs.resize(1);
  EXPECT_EQ(grid_size(full_grid(config)), candidate_grid_size(config));
}

// Cancellation (SearchOptions::cancel, set by Ctrl-C in Python): a flag set before the search
// stops it before any fit; set after three candidates, the search stops at the next candidate
// instead of fitting the grid, and throws Cancelled rather than returning a partial result.
TEST(SearchCancel, AFlagSetBeforeOrDuringTheSearchStopsItBetweenCandidates) {
  const SearchCase c = small_case(200, 203);
  const SeriesData data = simulate(testing::simulation_of(c));
  const RunConfig config = testing::config_of(c, 1);
  const long long grid = grid_size(full_grid(config));
  ASSERT_GT(grid, 20);
  std::atomic<bool> cancel{true};
  SearchOptions options = options_of(config);
  options.cancel = &cancel;
  int fitted = 0;
  options.progress = [&](int, int) { ++fitted; };
  EXPECT_THROW(run_search(data, config, options), Cancelled);
  EXPECT_EQ(fitted, 0);

  cancel = false;
  options.progress = [&](int done, int) {
    fitted = done;
    if (done == 3) cancel = true;
  };
  EXPECT_THROW(run_search(data, config, options), Cancelled);
  EXPECT_EQ(fitted, 3);  // one thread: the candidate after the third is never started

  cancel = false;
  const SearchResult whole = run_search(data, config, options_of(config));
  EXPECT_EQ(static_cast<long long>(whole.rows.size()), grid);
}

}  // namespace
}  // namespace lagsieve
