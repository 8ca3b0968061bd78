#include "revalidate/new_effects.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/names.h"
#include "data/events.h"
#include "model/likelihood.h"
#include "outliers/detect.h"
#include "outliers/json.h"

namespace lagsieve {

SeriesData with_model_effects(const FittedModel& model, const SeriesData& data) {
  SeriesData out = data;
  for (const auto& use : model.inputs) {
    if (!use.effect || out.input_index(use.name) >= 0) continue;
    InputConfig ic;
    ic.name = use.name;
    ic.is_event = true;
    ic.shape = use.shape;
    ic.at = use.at;
    OutlierEffect e = *use.effect;
    e.row = event_row(ic, data.time, model.training.config_file, data.time_format);
    out.add_input(use.name, effect_values(e, data.rows()), true);
  }
  return out;
}

NewEffectsCheck new_effects_check(const FittedModel& model, const SeriesData& data,
                                  const OutliersConfig& config) {
  NewEffectsCheck out;
  bool has_effects = false;
  for (const auto& use : model.inputs) has_effects = has_effects || use.effect.has_value();
  if (!config.enabled && !has_effects) return out;
  out.run = true;
  out.new_rows = data.rows() - model.training.rows;
  const OutliersConfig o = config.enabled ? config : OutliersConfig{};
  const int types = static_cast<int>(o.detect.size());
  out.critical = o.critical > 0.0 ? o.critical : default_critical_value(model.n_obs, types);
  if (types == 0) {
    out.note = "no effect type listed in outliers.detect";
    return out;
  }
  const auto problem = make_problem(data, model.spec, model.start);
  LikelihoodWorkspace ws;
  auto residuals = model_residuals(problem, model.params, ws);
  const int n = static_cast<int>(residuals.size());
  const int first_row = problem.start + model.spec.differencing.lost();
  if (n != static_cast<int>(problem.w.size()) - problem.start) {
    // Residuals exist at observed rows only; with gaps their rows are not those of the data.
    out.note = "not run: the target has missing values, so residuals and rows do not line up";
    return out;
  }
  const auto pi = noise_pi_weights(model.spec, model.params, n);
  std::vector<std::vector<double>> signatures;
  for (auto type : o.detect) signatures.push_back(residual_signature(type, o.decay, pi, n));
  std::vector<bool> excluded(n, false);
  for (int i = 0; i < n; ++i) {
    excluded[i] = first_row + i < model.training.rows;
    out.tested_rows += excluded[i] ? 0 : 1;
  }
  std::vector<OutlierType> pool{OutlierType::additive, OutlierType::level_shift,
                                OutlierType::temporary};
  if (std::find(o.detect.begin(), o.detect.end(), OutlierType::innovational) != o.detect.end())
    pool.push_back(OutlierType::innovational);
  // The deployed constant is fixed, so no signature is taken orthogonal to it.
  while (static_cast<int>(out.found.size()) < o.max) {
    const auto c = largest_statistic(residuals, o.detect, signatures, excluded);
    if (c.index < 0 || !(std::abs(c.statistic) > out.critical)) break;
    OutlierEffect e = effect_of(c, data, first_row, o.decay);
    e.differencing = model.spec.differencing;
    e.ambiguous_with = ambiguous_types(e.type, pool, o.decay, pi, n - c.index, 0.9);
    out.found.push_back(e);
    excluded[c.index] = true;
    const size_t k = std::find(o.detect.begin(), o.detect.end(), c.type) - o.detect.begin();
    for (int j = 0; c.index + j < n; ++j) residuals[c.index + j] -= c.size * signatures[k][j];
  }
  std::sort(out.found.begin(), out.found.end(),
            [](const auto& a, const auto& b) { return a.row < b.row; });
  return out;
}

std::string describe_new_effect(const OutlierEffect& e) {
  std::string type(to_string(e.type));
  std::replace(type.begin(), type.end(), '_', ' ');
  std::string text = fmt::format("{} at {} (row {}): size {:.4g}, statistic {:.2f}", type,
                                 e.time.empty() ? std::to_string(e.row + 1) : e.time, e.row + 1,
                                 e.size, e.statistic);
  if (!e.ambiguous_with.empty()) {
    std::string others;
    for (auto t : e.ambiguous_with)
      others += fmt::format("{}{}", others.empty() ? "" : ", ", to_string(t));
    text += fmt::format(" (ambiguous: could be {})", others);
  }
  return text;
}

nlohmann::ordered_json new_effects_json(const NewEffectsCheck& c) {
  nlohmann::ordered_json j;
  j["run"] = c.run;
  if (!c.run) {
    j["note"] = "no outliers section in the config and no detected effect in the model";
    return j;
  }
  j["critical"] = c.critical;
  j["critical_rule"] =
      "the deployed model's own: outliers.critical, or the default rule at the training n";
  j["new_rows"] = c.new_rows;
  j["tested_rows"] = c.tested_rows;
  j["ambiguity_rule"] = kAmbiguityRule;
  j["effects"] = nlohmann::ordered_json::array();
  for (const auto& e : c.found) {
    nlohmann::ordered_json x;
    x["name"] = e.name;
    x["type"] = std::string(to_string(e.type));
    x["row"] = e.row + 1;
    x["time"] = e.time;
    x["size"] = e.size;
    x["std_error"] = e.std_error;
    x["statistic"] = e.statistic;
    x["ambiguous_with"] = nlohmann::ordered_json::array();
    for (auto t : e.ambiguous_with) x["ambiguous_with"].push_back(std::string(to_string(t)));
    j["effects"].push_back(x);
  }
  if (!c.note.empty()) j["note"] = c.note;
  return j;
}

}  // namespace lagsieve
