#include "search/shortlist.h"

#include <algorithm>
#include <cmath>
#include <map>

#include "core/names.h"
#include "model/likelihood.h"
#include "search/candidates.h"
#include "search/search_outliers.h"
#include "search/selection.h"

#include <fmt/format.h>

namespace lagsieve {

ShortlistBacktest shortlist_plan(const SeriesData& data, const RunConfig& config,
                                 const SearchResult& search, int size, int threads) {
  ShortlistBacktest out;
  out.options = backtest_options(config, data.rows());
  out.options.start = search.start;
  out.options.threads = threads;

  for (const auto& row : search.rows)
    if (row.rankable() && static_cast<int>(out.candidates.size()) < size)
      out.candidates.push_back(row_candidate(row.key, row, search, config));
  if (out.candidates.empty()) return out;

  // Benchmark 1: the best candidate without inputs, else the chosen model's noise model alone.
  // It keeps the shortlist's detected effects (they mark the history; they are not inputs).
  CandidateRow no_inputs;
  no_inputs.spec = out.candidates.front().spec;
  no_inputs.spec.inputs.clear();
  for (const auto& row : search.rows)
    if (row.rankable() && row.spec.inputs.empty()) {
      no_inputs.spec = row.spec;
      break;
    }
  for (const auto& row : search.rows)
    if (row.rankable()) {
      no_inputs.effects = row.effects;
      break;
    }
  auto bench =
      row_candidate("benchmark: " + candidate_key(no_inputs.spec), no_inputs, search, config);
  bench.benchmark = true;
  out.candidates.push_back(bench);
  out.candidates.push_back(seasonal_naive_candidate(out.options.season));
  return out;
}

ShortlistBacktest backtest_shortlist(const SeriesData& plain, const RunConfig& config,
                                     SearchResult& search, int threads,
                                     const std::atomic<bool>* cancel) {
  const SeriesData data = search_data(plain, search);  // with the detected effects' columns
  ShortlistBacktest out = shortlist_plan(data, config, search, config.backtest.shortlist, threads);
  if (out.candidates.empty()) return out;
  out.options.cancel = cancel;
  out.result = run_backtest(data, out.candidates, out.options);
  search.warnings.insert(search.warnings.end(), out.result.warnings.begin(),
                         out.result.warnings.end());

  // The chosen model by the selection rule (selection.h), then the rows: the chosen model first,
  // the other backtested rows by score, then the rest in criterion order as before.
  std::map<std::string, size_t> model_of;
  for (size_t i = 0; i < out.candidates.size(); ++i)
    if (!out.candidates[i].benchmark) model_of[out.candidates[i].name] = i;
  std::vector<SelectionCandidate> pool;
  for (auto& row : search.rows) {
    const auto it = model_of.find(row.key);
    if (it == model_of.end()) continue;
    row.backtest_score = out.result.models[it->second].score;
    pool.push_back({&row, static_cast<int>(it->second)});
  }
  const SelectionOptions so = selection_options(config);
  const SelectionResult chosen = choose_model(pool, out.result, so);
  std::map<std::string, std::string> note_of;
  for (size_t i = 0; i < pool.size(); ++i) note_of[pool[i].row->key] = chosen.notes[i];
  const std::string chosen_key = chosen.chosen >= 0 ? pool[chosen.chosen].row->key : std::string();
  for (auto& row : search.rows)
    if (const auto it = note_of.find(row.key); it != note_of.end()) row.selection = it->second;
  out.result.chosen = chosen.chosen >= 0 ? pool[chosen.chosen].model : -1;
  out.result.comparisons = compare_to_chosen(out.result);
  search.chosen_reason = chosen.reason;
  std::stable_sort(
      search.rows.begin(), search.rows.end(), [&](const CandidateRow& a, const CandidateRow& b) {
        const bool la = a.key == chosen_key, lb = b.key == chosen_key;
        if (la != lb) return la;
        const bool fa = std::isfinite(a.backtest_score), fb = std::isfinite(b.backtest_score);
        if (fa != fb) return fa;
        if (fa && a.backtest_score != b.backtest_score) return a.backtest_score < b.backtest_score;
        return false;
      });
  std::vector<double> scores;
  for (const auto& row : search.rows)
    if (std::isfinite(row.backtest_score)) scores.push_back(row.backtest_score);
  std::sort(scores.begin(), scores.end());
  for (size_t i = 0; i < search.rows.size(); ++i) {
    auto& row = search.rows[i];
    row.rank = static_cast<int>(i) + 1;
    if (std::isfinite(row.backtest_score))
      row.backtest_rank =
          static_cast<int>(std::lower_bound(scores.begin(), scores.end(), row.backtest_score) -
                           scores.begin()) +
          1;
  }
  search.sorted_by = fmt::format(
      "rank 1 is the chosen model ({}); then the other backtested candidates by backtest {} (lower "
      "is "
      "better); then the "
      "rest by {}",
      so.parsimonious
          ? fmt::format("the simplest candidate within noise of the best backtest score, "
                        "one-sided Diebold-Mariano at {:g}",
                        so.level)
          : "the best backtest score",
      config.backtest.score, to_string(config.search.criterion));

  if (out.result.chosen >= 0) {
    const auto& lead = out.candidates[out.result.chosen];
    if (!search.has_chosen() || !(lead.spec == search.chosen.spec)) {
      search.chosen = fit_model(make_problem(data, lead.spec, search.start));
      update_effect_sizes(search);
    }
    out.result.input_value =
        input_value(data, lead, out.result.models[out.result.chosen], out.options);
  }
  out.options.cancel = nullptr;  // the flag is the caller's, not part of the plan kept
  warn_on_chosen_residuals(search);
  return out;
}

}  // namespace lagsieve
