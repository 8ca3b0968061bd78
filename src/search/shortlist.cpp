#include "search/shortlist.h"

#include <algorithm>
#include <cmath>
#include <map>

#include "model/likelihood.h"
#include "search/candidates.h"

namespace lagsieve {

ShortlistBacktest shortlist_plan(const SeriesData& data, const RunConfig& config,
                                 const SearchResult& search, int size, int threads) {
  ShortlistBacktest out;
  out.options = backtest_options(config, data.rows());
  out.options.start = search.start;
  out.options.threads = threads;

  for (const auto& row : search.rows)
    if (row.rankable() && static_cast<int>(out.candidates.size()) < size)
      out.candidates.push_back(candidate_from_spec(row.key, row.spec, config));
  if (out.candidates.empty()) return out;

  // Benchmark 1: the best candidate without inputs, else the leader's noise model alone.
  ModelSpec no_inputs = out.candidates.front().spec;
  no_inputs.inputs.clear();
  for (const auto& row : search.rows)
    if (row.rankable() && row.spec.inputs.empty()) {
      no_inputs = row.spec;
      break;
    }
  auto bench = candidate_from_spec("benchmark: " + candidate_key(no_inputs), no_inputs, config);
  bench.benchmark = true;
  out.candidates.push_back(bench);
  out.candidates.push_back(seasonal_naive_candidate(out.options.season));
  return out;
}

ShortlistBacktest backtest_shortlist(const SeriesData& data, const RunConfig& config,
                                     SearchResult& search, int threads) {
  ShortlistBacktest out = shortlist_plan(data, config, search, config.backtest.shortlist, threads);
  if (out.candidates.empty()) return out;
  out.result = run_backtest(data, out.candidates, out.options);
  search.warnings.insert(search.warnings.end(), out.result.warnings.begin(),
                         out.result.warnings.end());

  // Re-rank: backtested rows by score, then the rest as before.
  std::map<std::string, double> score;
  for (size_t i = 0; i < out.candidates.size(); ++i)
    if (!out.candidates[i].benchmark) score[out.candidates[i].name] = out.result.models[i].score;
  for (auto& row : search.rows) {
    const auto it = score.find(row.key);
    if (it != score.end()) row.backtest_score = it->second;
  }
  std::stable_sort(
      search.rows.begin(), search.rows.end(), [](const CandidateRow& a, const CandidateRow& b) {
        const bool fa = std::isfinite(a.backtest_score), fb = std::isfinite(b.backtest_score);
        if (fa != fb) return fa;
        if (fa && a.backtest_score != b.backtest_score) return a.backtest_score < b.backtest_score;
        return false;
      });
  int bt_rank = 0;
  for (size_t i = 0; i < search.rows.size(); ++i) {
    search.rows[i].rank = static_cast<int>(i) + 1;
    if (std::isfinite(search.rows[i].backtest_score)) search.rows[i].backtest_rank = ++bt_rank;
  }

  if (out.result.leader >= 0) {
    const auto& lead = out.candidates[out.result.leader];
    if (!search.has_leader() || !(lead.spec == search.leader.spec)) {
      search.leader = fit_model(make_problem(data, lead.spec, search.start));
    }
    out.result.input_value =
        input_value(data, lead, out.result.models[out.result.leader], out.options);
  }
  return out;
}

}  // namespace lagsieve
