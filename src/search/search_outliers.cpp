#include "search/search_outliers.h"

#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <algorithm>
#include <chrono>
#include <cmath>

#include "backtest/backtest.h"
#include "core/names.h"
#include "outliers/detect.h"
#include "outliers/json.h"

namespace lagsieve {

namespace {

bool may_lead(const CandidateRow& row, const RunConfig& config) {
  const auto& s = config.backtest.chosen_statuses;
  return std::find(s.begin(), s.end(), to_string(row.status)) != s.end();
}

}  // namespace

void detect_on_shortlist(const SeriesData& data, const RunConfig& config, SearchResult& result,
                         int threads) {
  const auto t0 = std::chrono::steady_clock::now();
  SearchOutliers out;
  auto base = std::find_if(result.rows.begin(), result.rows.end(),
                           [&](const CandidateRow& r) { return may_lead(r, config); });
  if (base == result.rows.end())
    base = std::find_if(result.rows.begin(), result.rows.end(),
                        [](const CandidateRow& r) { return r.rankable(); });
  if (base == result.rows.end()) {
    out.note = "no usable candidate to detect effects on";
    result.outliers = out;
    return;
  }
  out.detected_on = base->key;
  try {
    OutlierOptions options = outlier_options(config.outliers);
    options.fit.standard_errors = false;
    options.fit.residual_input_check = false;
    const OutlierFit found = fit_with_outliers(data, base->spec, options, result.start);
    out.critical = found.critical;
    out.rounds = found.rounds;
    out.effects = found.effects;
    out.dropped = found.dropped;
  } catch (const std::exception& e) {
    out.note = std::string("detection failed on ") + base->key + ": " + e.what();
  }

  if (!out.effects.empty()) {
    // The shortlist: the top rankable rows by the criterion, fitted again with the set.
    std::vector<size_t> shortlist;
    for (size_t i = 0; i < result.rows.size(); ++i)
      if (result.rows[i].rankable() &&
          static_cast<int>(shortlist.size()) < config.backtest.shortlist)
        shortlist.push_back(i);
    const SeriesData augmented = with_effect_columns(data, out.effects);
    std::vector<std::string> names;
    for (const auto& e : out.effects) names.push_back(e.name);
    run_in_arena(threads, [&] {  // the search's own arena rule (backtest.h)
      tbb::parallel_for(size_t{0}, shortlist.size(), [&](size_t k) {
        CandidateRow& row = result.rows[shortlist[k]];
        CandidateRow refit =
            fit_candidate(augmented, with_effect_terms(row.spec, out.effects), result.start);
        refit.key = row.key;
        refit.spec = row.spec;
        refit.effects = names;
        row = std::move(refit);
      });
    });
    out.shortlisted = static_cast<int>(shortlist.size());
    // Shortlist first (usable ones ranked by the criterion with the set), then the other rows as
    // they were, then shortlisted rows whose fit with the set failed.
    std::vector<CandidateRow> listed, failed, rest;
    for (size_t i = 0, k = 0; i < result.rows.size(); ++i) {
      const bool in = k < shortlist.size() && shortlist[k] == i;
      if (in) ++k;
      auto& row = result.rows[i];
      (in ? (row.rankable() ? listed : failed) : rest).push_back(std::move(row));
    }
    rank_rows(listed, config.search.criterion);
    result.rows = std::move(listed);
    result.rows.insert(result.rows.end(), rest.begin(), rest.end());
    result.rows.insert(result.rows.end(), failed.begin(), failed.end());
    for (size_t i = 0; i < result.rows.size(); ++i) result.rows[i].rank = static_cast<int>(i) + 1;
  }
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  result.outliers = std::move(out);
}

SeriesData search_data(const SeriesData& data, const SearchResult& result) {
  if (!result.outliers || result.outliers->effects.empty()) return data;
  return with_effect_columns(data, result.outliers->effects);
}

std::vector<OutlierEffect> row_effects(const CandidateRow& row, const SearchResult& result) {
  std::vector<OutlierEffect> out;
  if (!result.outliers) return out;
  for (const auto& name : row.effects)
    for (const auto& e : result.outliers->effects)
      if (e.name == name) out.push_back(e);
  return out;
}

ModelSpec fitted_spec(const CandidateRow& row, const SearchResult& result) {
  return with_effect_terms(row.spec, row_effects(row, result));
}

BacktestCandidate row_candidate(const std::string& name, const CandidateRow& row,
                                const SearchResult& result, const RunConfig& config) {
  BacktestCandidate c = candidate_from_spec(name, fitted_spec(row, result), config);
  for (const auto& e : row_effects(row, result)) {
    InputUse use;
    use.name = e.name;
    use.is_event = true;
    use.effect = e;
    use.shape = e.type == OutlierType::level_shift ? EventShape::step : EventShape::pulse;
    use.at = e.time.empty() ? std::to_string(e.row) : e.time;
    use.future = FutureMode::known;
    c.inputs.push_back(use);
    c.input_orders.emplace_back();
  }
  return c;
}

void update_effect_sizes(SearchResult& result) {
  if (!result.outliers || !result.has_chosen()) return;
  read_sizes(result.chosen, result.outliers->effects);
}

nlohmann::json search_outliers_json(const SearchOutliers& o, const SeriesData& data) {
  nlohmann::json j = {{"detected_on", o.detected_on},
                      {"critical", o.critical},
                      {"critical_rule", kCriticalRule},
                      {"rounds", o.rounds},
                      {"shared_set_rule", kSharedSetRule},
                      {"backtest_rule", kBacktestOriginRule},
                      {"ambiguity_rule", kAmbiguityRule},
                      {"shortlisted", o.shortlisted},
                      {"seconds", o.seconds},
                      {"effects", nlohmann::json::array()},
                      {"dropped", nlohmann::json::array()}};
  for (const auto& e : o.effects) j["effects"].push_back(effect_to_json(e));
  for (const auto& e : o.dropped) j["dropped"].push_back(effect_to_json(e));
  if (!o.note.empty()) j["note"] = o.note;
  nlohmann::json values = nlohmann::json::array();
  for (double v : data.target) values.push_back(std::isfinite(v) ? nlohmann::json(v) : nullptr);
  j["history"] = {{"time", data.time}, {"values", values}};
  return j;
}

}  // namespace lagsieve
