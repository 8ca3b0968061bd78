// The staged `guided` strategy (search/guided.h) against the whole grid on seeded simulations
// with a known truth: it chooses the same model as the exhaustive search and as the whole guided
// grid while fitting a fraction of the candidates; its skip report accounts for every candidate
// of the config's grid (checked against a brute-force classification on a small grid); its rows
// do not depend on the thread count; and a run resumed from a cut journal ends identical.
#include <gtest/gtest.h>

#include <bit>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <map>
#include <string>
#include <vector>

#include "search/candidates.h"
#include "search/guided.h"
#include "search/journal.h"
#include "search/search.h"
#include "search_test_util.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using testing::SearchCase;

// Three inputs: one rational, one with two numerator lags (optional), one without effect
// (optional); the noise ARMA(1,1) or AR(1). Grid: 12 x 7 x 3 options x 4 noise orders = 1,008.
SearchCase truth_case(std::uint64_t seed, bool arma) {
  SearchCase c;
  c.name = "staged";
  c.n = 250;
  c.seed = seed;
  c.inputs = {{"x1", {1, 0, 1}, {1.2}, {0.6}, 0.5, {0, 2}, {0, 1}, {0, 1}, false},
              {"x2", {2, 1, 0}, {0.8, 0.5}, {}, 0.3, {0, 2}, {0, 1}, {0, 0}, true},
              {"x3", {}, {0.0}, {}, 0.6, {0, 1}, {0, 0}, {0, 0}, true}};
  c.noise = arma ? NoiseOrder{1, 1, 0, 0, 1} : NoiseOrder{1, 0, 0, 0, 1};
  c.phi = {0.5};
  c.theta = arma ? std::vector<double>{0.4} : std::vector<double>{};
  c.ar = {0, 1};
  c.ma = {0, 1};
  return c;
}

SearchResult search_with(const SeriesData& data, RunConfig config, Strategy strategy, bool staged,
                         int threads, Journal* journal = nullptr) {
  config.search.strategy = strategy;
  config.search.threads = threads;
  SearchOptions options;
  options.threads = threads;
  options.staged_guided = staged;
  options.journal = journal;
  return run_search(data, config, options);
}

std::string truth_key(const SearchCase& c) {
  ModelSpec m;
  for (const auto& in : c.inputs)
    if (in.relevant()) m.inputs.push_back({in.name, in.truth});
  m.noise = c.noise;
  m.constant = true;
  return candidate_key(m);
}

TEST(StagedGuided, ChoosesTheModelOfTheWholeGridWithAFractionOfTheFits) {
  int truth_found = 0;
  const std::vector<std::pair<std::uint64_t, bool>> cases{{11, true}, {12, false}, {13, true}};
  for (const auto& [seed, arma] : cases) {
    const SearchCase c = truth_case(seed, arma);
    const SeriesData data = simulate(testing::simulation_of(c));
    const RunConfig config = testing::config_of(c, 2);
    const SearchResult all = search_with(data, config, Strategy::exhaustive, false, 2);
    const SearchResult grid = search_with(data, config, Strategy::guided, false, 2);
    const SearchResult staged = search_with(data, config, Strategy::guided, true, 2);
    ASSERT_TRUE(all.has_chosen() && grid.has_chosen() && staged.has_chosen()) << "seed " << seed;
    EXPECT_EQ(staged.rows.front().key, all.rows.front().key) << "seed " << seed;
    EXPECT_EQ(staged.rows.front().key, grid.rows.front().key) << "seed " << seed;
    // The same candidate gets the same criterion up to the optimiser's tolerance, though the
    // staged fit started from a neighbour's estimates.
    EXPECT_NEAR(staged.rows.front().bic, all.rows.front().bic, 1e-4) << "seed " << seed;
    EXPECT_EQ(all.fitted, 1008);
    EXPECT_LT(staged.fitted * 10, all.fitted) << "seed " << seed;
    EXPECT_LT(staged.fitted * 4, grid.fitted) << "seed " << seed;
    truth_found += staged.rows.front().key == truth_key(c) ? 1 : 0;
    std::printf("seed %llu: chosen %s; fitted exhaustive %d, guided grid %d, staged %d\n",
                static_cast<unsigned long long>(seed), staged.rows.front().key.c_str(), all.fitted,
                grid.fitted, staged.fitted);
  }
  // The truth is strong enough to be found by BIC in most seeds (a check that the cases are not
  // trivially easy for any rule: the grid has thousands of wrong models).
  EXPECT_GE(truth_found, 2);
}

TEST(StagedGuided, SkipReportAccountsForEveryCandidateOfTheGrid) {
  const SearchCase c = truth_case(21, true);
  const SeriesData data = simulate(testing::simulation_of(c));
  const SearchResult staged =
      search_with(data, testing::config_of(c, 2), Strategy::guided, true, 2);
  ASSERT_EQ(staged.full_grid_size, 1008);
  EXPECT_EQ(accounted(staged.stages), staged.full_grid_size);
  int fitted = 0;
  for (const auto& s : staged.stages) fitted += s.fitted;
  EXPECT_EQ(fitted, staged.fitted);
  EXPECT_EQ(static_cast<int>(staged.rows.size()), staged.fitted);
  ASSERT_EQ(staged.stages.size(), 4u);
  EXPECT_EQ(staged.stages[0].stage, "screen");
  EXPECT_EQ(staged.stages[0].skipped.front().count, staged.full_grid_size - staged.grid_size);
}

// Brute force: every candidate of a small grid classified one by one by the rule count_skipped
// states (first input with an option never evaluated gives its fate, else off the path).
TEST(StagedGuided, SkipCountsMatchABruteForceClassification) {
  CandidateGrid g;
  g.inputs = {{"a", true, true, {0, 1}, {0, 1}, {0, 0}},
              {"b", false, true, {0, 2}, {0, 0}, {0, 1}},
              {"c", true, true, {1, 1}, {0, 1}, {0, 1}}};
  g.ar = {0, 1};
  g.ma = {0, 0};
  g.constant = {false, true};
  std::vector<std::vector<std::optional<InputOrder>>> options;
  std::vector<std::vector<OptionFate>> fates;
  const OptionFate cycle[] = {OptionFate::evaluated, OptionFate::left_out, OptionFate::evaluated,
                              OptionFate::orders_stopped, OptionFate::not_reached};
  int k = 0;
  for (const auto& in : g.inputs) {
    options.push_back(options_of(in));
    fates.emplace_back();
    for (size_t j = 0; j < options.back().size(); ++j) fates.back().push_back(cycle[k++ % 5]);
  }
  // Evaluated: every candidate whose options are all evaluated, but the first three.
  const auto specs = enumerate(g);
  ASSERT_EQ(static_cast<long long>(specs.size()), grid_size(g));
  std::map<OptionFate, long long> brute;
  long long on_path = 0;
  for (const auto& spec : specs) {
    std::optional<OptionFate> why;
    for (size_t i = 0; i < g.inputs.size() && !why; ++i) {
      std::optional<InputOrder> mine;
      for (const auto& t : spec.inputs)
        if (t.name == g.inputs[i].name) mine = t.order;
      for (size_t j = 0; j < options[i].size(); ++j)
        if (options[i][j] == mine && fates[i][j] != OptionFate::evaluated) why = fates[i][j];
    }
    if (why)
      ++brute[*why];
    else
      ++on_path;
  }
  ASSERT_GT(on_path, 3);
  const SkipCounts counts = count_skipped(g, fates, 3);
  EXPECT_EQ(counts.left_out, brute[OptionFate::left_out]);
  EXPECT_EQ(counts.orders_stopped, brute[OptionFate::orders_stopped]);
  EXPECT_EQ(counts.not_reached, brute[OptionFate::not_reached]);
  EXPECT_EQ(counts.off_path, on_path - 3);
  EXPECT_EQ(counts.left_out + counts.orders_stopped + counts.not_reached + counts.off_path + 3,
            grid_size(g));
}

TEST(StagedGuided, RowsIdenticalOnOneAndTwoThreads) {
  const SearchCase c = truth_case(31, true);
  const SeriesData data = simulate(testing::simulation_of(c));
  const RunConfig config = testing::config_of(c, 1);
  const SearchResult a = search_with(data, config, Strategy::guided, true, 1);
  const SearchResult b = search_with(data, config, Strategy::guided, true, 2);
  ASSERT_EQ(a.rows.size(), b.rows.size());
  for (size_t i = 0; i < a.rows.size(); ++i) {
    EXPECT_EQ(a.rows[i].key, b.rows[i].key);
    EXPECT_EQ(std::bit_cast<std::uint64_t>(a.rows[i].loglik),
              std::bit_cast<std::uint64_t>(b.rows[i].loglik))
        << a.rows[i].key;
  }
}

TEST(StagedGuided, ResumedFromACutJournalEndsIdentical) {
  const SearchCase c = truth_case(41, false);
  const SeriesData data = simulate(testing::simulation_of(c));
  const RunConfig config = testing::config_of(c, 2);
  const fs::path dir = fs::temp_directory_path() / "lagsieve_staged_resume";
  fs::remove_all(dir);
  fs::create_directories(dir);
  const fs::path file = dir / "journal.jsonl";
  SearchResult first;
  {
    Journal journal(file, "staged-test", false);
    first = search_with(data, config, Strategy::guided, true, 2, &journal);
  }
  // Keep the header and the first half of the rows, as a run killed part-way leaves them.
  std::vector<std::string> lines;
  {
    std::ifstream in(file);
    for (std::string line; std::getline(in, line);) lines.push_back(line);
  }
  ASSERT_GT(lines.size(), 10u);
  {
    std::ofstream out(file, std::ios::trunc);
    for (size_t i = 0; i < 1 + (lines.size() - 1) / 2; ++i) out << lines[i] << "\n";
  }
  SearchResult resumed;
  {
    Journal journal(file, "staged-test", true);
    resumed = search_with(data, config, Strategy::guided, true, 2, &journal);
  }
  EXPECT_GT(resumed.resumed, 0);
  EXPECT_EQ(resumed.resumed + resumed.fitted, first.fitted);
  ASSERT_EQ(resumed.rows.size(), first.rows.size());
  for (size_t i = 0; i < first.rows.size(); ++i) {
    EXPECT_EQ(resumed.rows[i].key, first.rows[i].key);
    EXPECT_EQ(std::bit_cast<std::uint64_t>(resumed.rows[i].loglik),
              std::bit_cast<std::uint64_t>(first.rows[i].loglik))
        << first.rows[i].key;
  }
  EXPECT_EQ(accounted(resumed.stages), resumed.full_grid_size);
  fs::remove_all(dir);
}

TEST(StagedGuided, StopsAtTheBudgetAndSaysSo) {
  const SearchCase c = truth_case(51, true);
  const SeriesData data = simulate(testing::simulation_of(c));
  RunConfig config = testing::config_of(c, 2);
  config.search.budget = 15;
  const SearchResult r = search_with(data, config, Strategy::guided, true, 2);
  EXPECT_LE(r.fitted, 15);
  EXPECT_TRUE(r.has_chosen());
  EXPECT_EQ(accounted(r.stages), r.full_grid_size);
  bool warned = false;
  for (const auto& w : r.warnings)
    if (w.is("search_budget_reached")) {
      warned = true;
      EXPECT_EQ(w.number("budget"), 15);
      EXPECT_TRUE(w.message.starts_with("search_budget_reached: "));
    }
  EXPECT_TRUE(warned);
}

}  // namespace
}  // namespace lagsieve
