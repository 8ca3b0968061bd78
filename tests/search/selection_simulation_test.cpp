// The selection rule of selection.h against pure backtest-score ranking on seeded simulations: the
// true model and two over-parameterised neighbours (an extra numerator lag, an extra AR term).
#include <gtest/gtest.h>

#include <cstdio>

#include "backtest/backtest.h"
#include "model/simulate.h"
#include "search/candidates.h"
#include "search/selection.h"

namespace lagsieve {
namespace {

// y = 2 + 1.5 x_{t-1} + n_t, n AR(1) 0.5, x AR(1) 0.6; n = 160 rows.
SeriesData truth(std::uint64_t seed) {
  SimulationSpec s;
  s.n = 160;
  s.seed = seed;
  s.constant = 2.0;
  SimulatedInput x;
  x.name = "x";
  x.order = {1, 0, 0};
  x.params = {{1.5}, {}};
  x.ar = 0.6;
  s.inputs = {x};
  s.noise = {1, 0, 0, 0, 1};
  s.phi = {0.5};
  s.sigma = 1.0;
  return simulate(s);
}

ModelSpec spec(int numerator, int ar) {
  ModelSpec m;
  m.inputs = {{"x", {1, numerator, 0}}};
  m.noise = {ar, 0, 0, 0, 1};
  m.constant = true;
  return m;
}

TEST(SelectionSimulation, TheSimplestWithinNoiseFindsTheTrueModelMoreOftenThanTheBestScore) {
  RunConfig config;
  InputConfig x;
  x.name = "x";
  config.inputs = {x};
  const std::vector<ModelSpec> specs{spec(0, 1), spec(1, 1), spec(0, 2)};  // truth first
  BacktestOptions o;
  o.first_origin = 120;
  o.step = 2;
  o.horizon = 2;
  o.threads = 1;
  o.start = 2;  // one common sample for the three (largest lag: b + s = 2)
  SelectionOptions so;
  so.horizon = o.horizon;
  so.step = o.step;
  SelectionOptions best_only = so;
  best_only.parsimonious = false;

  constexpr int kSeeds = 100;
  int rule_true = 0, score_true = 0;
  for (int seed = 1; seed <= kSeeds; ++seed) {
    const SeriesData data = truth(static_cast<std::uint64_t>(seed));
    std::vector<CandidateRow> rows;
    std::vector<BacktestCandidate> candidates;
    for (const auto& s : specs) {
      rows.push_back(fit_candidate(data, s, o.start));
      candidates.push_back(candidate_from_spec(rows.back().key, s, config));
    }
    const BacktestResult bt = run_backtest(data, candidates, o);
    std::vector<SelectionCandidate> pool;
    for (size_t i = 0; i < rows.size(); ++i) pool.push_back({&rows[i], static_cast<int>(i)});
    const SelectionResult rule = choose_model(pool, bt, so);
    const SelectionResult score = choose_model(pool, bt, best_only);
    ASSERT_GE(rule.chosen, 0) << "seed " << seed;
    rule_true += rule.chosen == 0 ? 1 : 0;
    score_true += score.chosen == 0 ? 1 : 0;
    EXPECT_FALSE(rule.reason.empty());
  }
  std::printf("true model chosen: selection rule %d / %d, best backtest score %d / %d\n", rule_true,
              kSeeds, score_true, kSeeds);
  EXPECT_GE(rule_true, 90);
  EXPECT_LT(score_true, rule_true);
}

TEST(SelectionSimulation, BoundaryAndRejectedFitsDoNotLeadByDefault) {
  const SeriesData data = truth(5);
  RunConfig config;
  InputConfig x;
  x.name = "x";
  config.inputs = {x};
  BacktestOptions o;
  o.first_origin = 120;
  o.step = 4;
  o.horizon = 2;
  o.threads = 1;
  std::vector<CandidateRow> rows{fit_candidate(data, spec(0, 1), 2),
                                 fit_candidate(data, spec(1, 1), 2)};
  const BacktestResult bt = run_backtest(
      data,
      {candidate_from_spec("a", spec(0, 1), config), candidate_from_spec("b", spec(1, 1), config)},
      o);
  std::vector<SelectionCandidate> pool{{&rows[0], 0}, {&rows[1], 1}};
  rows[0].status = FitStatus::boundary;
  SelectionOptions so;
  auto r = choose_model(pool, bt, so);
  EXPECT_EQ(r.chosen, 1);
  EXPECT_EQ(r.notes[0], "cannot lead: status boundary");
  rows[1].status = FitStatus::rejected;
  r = choose_model(pool, bt, so);
  EXPECT_EQ(r.chosen, -1);
  so.statuses.push_back(FitStatus::boundary);
  EXPECT_EQ(choose_model(pool, bt, so).chosen, 0);
}

}  // namespace
}  // namespace lagsieve
