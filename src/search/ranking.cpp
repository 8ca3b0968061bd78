#include "search/ranking.h"

#include <fmt/format.h>
#include <cmath>

#include "core/names.h"
#include "io/csv.h"

namespace lagsieve {

namespace {

std::string input_cell(const CandidateRow& row, const std::string& name) {
  for (const auto& t : row.spec.inputs)
    if (t.name == name)
      return fmt::format("b{} s{} r{}", t.order.delay, t.order.numerator, t.order.denominator);
  return "out";
}

}  // namespace

std::string ranking_csv(const std::vector<CandidateRow>& rows, const RunConfig& config) {
  std::string out = "series,rank,model";
  for (const auto& in : config.inputs) out += "," + csv_field(in.name);
  out +=
      ",p,q,seasonal_p,seasonal_q,constant,loglik,n_obs,n_params,aic,aicc,bic,ljung_box_p,"
      "status,fit_seconds,backtest_score,backtest_rank,selection,message,effects\n";
  for (const auto& r : rows) {
    out += fmt::format("{},{},{}", csv_field(r.series), r.rank, csv_field(r.key));
    for (const auto& in : config.inputs) out += "," + input_cell(r, in.name);
    std::string effects;  // detected effects fitted with the row, space-separated
    for (const auto& e : r.effects) effects += (effects.empty() ? "" : " ") + e;
    out += fmt::format(",{},{},{},{},{},{},{},{},{},{},{},{},{},{:.4f},{},{},{},{},{}\n",
                       r.spec.noise.p, r.spec.noise.q, r.spec.noise.seasonal_p,
                       r.spec.noise.seasonal_q, r.spec.constant ? "yes" : "no",
                       csv_number(r.loglik), r.n_obs, r.n_params, csv_number(r.aic),
                       csv_number(r.aicc), csv_number(r.bic), csv_number(r.ljung_box_p),
                       to_string(r.status), r.seconds, csv_number(r.backtest_score),
                       r.backtest_rank > 0 ? std::to_string(r.backtest_rank) : "",
                       csv_field(r.selection), csv_field(r.message), csv_field(effects));
  }
  return out;
}

nlohmann::json ranking_json(const std::vector<CandidateRow>& rows, const RunConfig& config,
                                const std::vector<SearchResult>& results) {
  nlohmann::json j;
  j["criterion"] = to_string(config.search.criterion);
  j["n_params_note"] = "n_params counts every estimated parameter, sigma^2 included";
  j["rows"] = nlohmann::json::array();
  for (const auto& r : rows) {
    auto row = to_json(r);
    for (const auto& in : config.inputs) row["orders"][in.name] = input_cell(r, in.name);
    j["rows"].push_back(row);
  }
  if (!results.empty()) {
    j["series_notes"] = nlohmann::json::array();
    for (const auto& r : results)
      j["series_notes"].push_back({{"series", r.series},
                                   {"sorted_by", r.sorted_by},
                                   {"chosen_reason", r.chosen_reason},
                                   {"warnings", warning_texts(r.warnings)},
                                   {"warning_codes", warnings_json(r.warnings)},
                                   {"search",
                                    {{"grid_size", r.full_grid_size},
                                     {"considered", r.grid_size},
                                     {"fitted", r.fitted},
                                     {"from_journal", r.resumed},
                                     {"stages", stages_json(r.stages)}}}});
  }
  return j;
}

}  // namespace lagsieve
