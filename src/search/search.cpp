#include "search/search.h"

#include <tbb/global_control.h>
#include <tbb/info.h>
#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <fmt/format.h>
#include <fmt/ranges.h>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <mutex>
#include <set>

#include "backtest/backtest.h"
#include "core/error.h"
#include "core/names.h"
#include "model/likelihood.h"
#include "model/spec_from_config.h"
#include "search/candidates.h"
#include "search/evaluator.h"
#include "search/guided.h"
#include "search/journal_rows.h"
#include "search/search_outliers.h"

namespace lagsieve {

using nlohmann::json;

namespace {

json num(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }
double num_from(const json& j, const char* key) {
  return j.contains(key) && j[key].is_number() ? j[key].get<double>() : std::nan("");
}

int group_of(FitStatus s) {
  switch (s) {
    case FitStatus::ok:
    case FitStatus::boundary:
    case FitStatus::no_convergence:
      return 0;
    case FitStatus::rejected:
      return 1;
    case FitStatus::numerical_failure:
      return 2;
  }
  return 2;
}

}  // namespace

json to_json(const CandidateRow& r) {
  json j = {{"series", r.series},     {"key", r.key},
            {"rank", r.rank},         {"status", to_string(r.status)},
            {"message", r.message},   {"loglik", num(r.loglik)},
            {"aic", num(r.aic)},      {"aicc", num(r.aicc)},
            {"bic", num(r.bic)},      {"n_obs", r.n_obs},
            {"n_params", r.n_params}, {"ljung_box_p", num(r.ljung_box_p)},
            {"seconds", r.seconds},   {"evaluations", r.evaluations}};
  json inputs = json::object();
  for (const auto& t : r.spec.inputs)
    inputs[t.name] = {{"delay", t.order.delay},
                      {"numerator", t.order.numerator},
                      {"denominator", t.order.denominator}};
  j["inputs"] = inputs;
  j["noise"] = {{"p", r.spec.noise.p},
                {"q", r.spec.noise.q},
                {"seasonal_p", r.spec.noise.seasonal_p},
                {"seasonal_q", r.spec.noise.seasonal_q},
                {"period", r.spec.noise.period}};
  j["constant"] = r.spec.constant;
  if (std::isfinite(r.backtest_score)) {
    j["backtest_score"] = r.backtest_score;
    j["backtest_rank"] = r.backtest_rank;
  }
  if (!r.selection.empty()) j["selection"] = r.selection;
  if (!r.effects.empty()) j["effects"] = r.effects;
  return j;
}

json journal_row(const CandidateRow& r) {
  // The spec is the key's (the journal is read back against the specs of the config), the rank is
  // not known yet: only what the fit found.
  json j = {{"series", r.series}, {"key", r.key},           {"status", to_string(r.status)},
            {"loglik", num(r.loglik)}, {"aic", num(r.aic)}, {"aicc", num(r.aicc)},
            {"bic", num(r.bic)},     {"n_obs", r.n_obs},   {"n_params", r.n_params},
            {"ljung_box_p", num(r.ljung_box_p)}, {"seconds", r.seconds},
            {"evaluations", r.evaluations}};
  if (!r.message.empty()) j["message"] = r.message;
  return j;
}

CandidateRow candidate_row_from_json(const json& j, const ModelSpec& spec) {
  CandidateRow r;
  r.series = j.at("series").get<std::string>();
  r.key = j.at("key").get<std::string>();
  r.spec = spec;
  static const FitStatus all[] = {FitStatus::ok, FitStatus::no_convergence, FitStatus::boundary,
                                  FitStatus::numerical_failure, FitStatus::rejected};
  for (FitStatus s : all)
    if (j.at("status").get<std::string>() == to_string(s)) r.status = s;
  r.message = j.value("message", "");
  r.loglik = num_from(j, "loglik");
  r.aic = num_from(j, "aic");
  r.aicc = num_from(j, "aicc");
  r.bic = num_from(j, "bic");
  r.n_obs = j.value("n_obs", 0);
  r.n_params = j.value("n_params", 0);
  r.ljung_box_p = num_from(j, "ljung_box_p");
  r.seconds = num_from(j, "seconds");
  r.evaluations = j.value("evaluations", 0);
  if (j.contains("nonlinear") && j["nonlinear"].is_array())
    for (const auto& v : j["nonlinear"])
      if (v.is_number()) r.nonlinear.push_back(v.get<double>());
  // Estimates of another spec's size (a damaged row) are not a usable start.
  if (r.nonlinear.size() != nonlinear_names(spec).size()) r.nonlinear.clear();
  return r;
}

void rank_rows(std::vector<CandidateRow>& rows, Criterion criterion) {
  std::sort(rows.begin(), rows.end(), [criterion](const CandidateRow& a, const CandidateRow& b) {
    const int ga = group_of(a.status), gb = group_of(b.status);
    if (ga != gb) return ga < gb;
    const double ca = a.criterion(criterion), cb = b.criterion(criterion);
    const bool fa = std::isfinite(ca), fb = std::isfinite(cb);
    if (fa != fb) return fa;
    if (fa && ca != cb) return ca < cb;
    if (a.series != b.series) return a.series < b.series;
    return a.key < b.key;
  });
  for (size_t i = 0; i < rows.size(); ++i) rows[i].rank = static_cast<int>(i) + 1;
}

namespace {

CandidateRow row_of(const SeriesData& data, const ModelSpec& spec) {
  CandidateRow row;
  row.series = data.target_name;
  row.key = candidate_key(spec);
  row.spec = spec;
  return row;
}

void fit_into(CandidateRow& row, const LikelihoodProblem& problem,
              const std::optional<ModelParams>& warm) {
  FitOptions options;
  options.standard_errors = false;
  options.residual_input_check = false;
  options.warm_start = warm;
  const FitResult fit = fit_model(problem, options);
  row.status = fit.status;
  row.message = fit.message;
  row.loglik = fit.loglik;
  row.aic = fit.aic;
  row.aicc = fit.aicc;
  row.bic = fit.bic;
  row.n_obs = fit.n_obs;
  row.n_params = fit.n_params;
  row.seconds = fit.seconds;
  row.evaluations = fit.evaluations;
  if (!fit.diagnostics.ljung_box.empty())
    row.ljung_box_p = fit.diagnostics.ljung_box.back().p_value;
  for (const auto& w : fit.diagnostics.warnings)
    if (w.is("near_cancellation") && fit.usable()) {
      row.status = FitStatus::rejected;
      row.message = w.message;
    }
  if (!fit.usable()) row.loglik = row.aic = row.aicc = row.bic = std::nan("");
  if (fit.usable()) row.nonlinear = pack_nonlinear(problem.spec, fit.params);
}

}  // namespace

CandidateRow fit_candidate(const SeriesData& data, const ModelSpec& spec, int start,
                           const std::optional<ModelParams>& warm) {
  CandidateRow row = row_of(data, spec);
  try {
    fit_into(row, make_problem(data, spec, start), warm);
  } catch (const std::exception& e) {
    // Bad data for this candidate only (e.g. an input constant over the sample): a failure row.
    row.status = FitStatus::numerical_failure;
    row.message = e.what();
  }
  return row;
}

CandidateRow fit_candidate(const SeriesData& data, const LikelihoodProblem& problem,
                           const std::optional<ModelParams>& warm) {
  CandidateRow row = row_of(data, problem.spec);
  try {
    fit_into(row, problem, warm);
  } catch (const std::exception& e) {
    row.status = FitStatus::numerical_failure;
    row.message = e.what();
  }
  return row;
}

void check_cancel(const std::atomic<bool>* cancel) {
  if (cancel && cancel->load()) throw Cancelled();
}

SearchResult run_search(const SeriesData& data, const RunConfig& config,
                        const SearchOptions& options) {
  check_cancel(options.cancel);
  const auto t0 = std::chrono::steady_clock::now();
  SearchResult result;
  result.series = data.target_name;
  result.start = common_start(config);
  Evaluator evaluator(data, result.start, options, options.threads);
  const CandidateGrid grid = full_grid(config);

  if (config.search.strategy != Strategy::exhaustive) result.screen = screen_series(data, config);

  result.full_grid_size = grid_size(grid);
  if (config.search.strategy == Strategy::stepwise) {
    // Greedy moves from the screen's suggestion; every neighbour of the current model is fitted
    // (in parallel), the best strictly better one becomes current, until none improves or the
    // budget is spent. Deterministic: the choice depends on the full set of neighbours.
    std::set<std::string> seen;
    ModelSpec current = suggested_spec(config, *result.screen);
    auto first = evaluator.evaluate({current}, config.search.budget);
    seen.insert(first[0].key);
    result.rows.push_back(first[0]);
    CandidateRow best = first[0];
    while (static_cast<int>(seen.size()) < config.search.budget) {
      std::vector<ModelSpec> next;
      for (auto& m : neighbours(current, grid)) {
        const auto key = candidate_key(m);
        if (seen.insert(key).second) next.push_back(std::move(m));
        if (static_cast<int>(seen.size()) >= config.search.budget) break;
      }
      if (next.empty()) break;
      auto rows = evaluator.evaluate(next, config.search.budget);
      result.rows.insert(result.rows.end(), rows.begin(), rows.end());
      std::vector<CandidateRow> pool = rows;
      pool.push_back(best);
      rank_rows(pool, config.search.criterion);
      if (pool.front().key == best.key || !pool.front().rankable()) break;
      best = pool.front();
      current = best.spec;
    }
    result.grid_size = static_cast<long long>(seen.size());
    StageReport steps =
        stage_named("stepwise", "single moves from the screen's suggestion while one improves");
    steps.fitted = evaluator.fitted();
    steps.from_journal = evaluator.resumed();
    steps.skipped = {{"not reached by the moves", result.full_grid_size - result.grid_size}};
    result.stages.push_back(steps);
  } else if (config.search.strategy == Strategy::guided && options.staged_guided) {
    const CandidateGrid g = guided_grid(config, *result.screen);
    result.grid_size = grid_size(g);
    StageReport screen = stage_named("screen", "the grid narrowed around the screen's suggestions");
    screen.skipped = {
        {"outside the screen's neighbourhood (delay within one of the suggestion, "
         "orders and noise up to one above it, an optional input without "
         "significant cross-correlation only left out)",
         result.full_grid_size - result.grid_size}};
    StagedSearch staged = staged_search(g, suggested_spec(config, *result.screen),
                                        config.search.criterion, config.search.budget, evaluator);
    result.rows = std::move(staged.rows);
    result.stages.push_back(screen);
    for (auto& s : staged.stages) result.stages.push_back(std::move(s));
    for (auto& w : staged.warnings) result.warnings.push_back(std::move(w));
  } else {
    const CandidateGrid g =
        config.search.strategy == Strategy::guided ? guided_grid(config, *result.screen) : grid;
    result.grid_size = grid_size(g);
    if (result.grid_size > config.search.budget)
      throw InputError(fmt::format(
          "{}: search.budget: the {} grid has {} candidates, more than the budget of {}; raise "
          "search.budget, narrow the ranges, or use `strategy: stepwise`",
          config.config_file.filename().string(), to_string(config.search.strategy),
          result.grid_size, config.search.budget));
    const auto t_grid = std::chrono::steady_clock::now();
    result.rows = evaluator.evaluate(enumerate(g), static_cast<int>(result.grid_size));
    if (config.search.strategy == Strategy::guided) {
      StageReport screen =
          stage_named("screen", "the grid narrowed around the screen's suggestions");
      screen.skipped = {
          {"outside the screen's neighbourhood", result.full_grid_size - result.grid_size}};
      result.stages.push_back(screen);
    }
    StageReport all = stage_named("grid", "every candidate of the grid");
    all.fitted = evaluator.fitted();
    all.from_journal = evaluator.resumed();
    all.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_grid).count();
    result.stages.push_back(all);
  }
  result.fitted = evaluator.fitted();
  result.resumed = evaluator.resumed();
  rank_rows(result.rows, config.search.criterion);
  check_cancel(options.cancel);
  if (config.outliers.enabled) detect_on_shortlist(data, config, result, options.threads);

  // The chosen model: the first row (by the criterion) whose status may lead (backtest.chosen_statuses;
  // boundary and rejected fits do not by default), moved to the front. A shortlist backtest
  // re-chooses it (selection.h).
  const auto may_lead = [&](const CandidateRow& row) {
    return std::find(config.backtest.chosen_statuses.begin(), config.backtest.chosen_statuses.end(),
                     to_string(row.status)) != config.backtest.chosen_statuses.end();
  };
  const auto lead = std::find_if(result.rows.begin(), result.rows.end(), may_lead);
  result.sorted_by = fmt::format("by {} (lower is better)", to_string(config.search.criterion));
  if (lead != result.rows.end()) {
    if (lead != result.rows.begin()) {
      std::rotate(result.rows.begin(), lead, lead + 1);
      for (size_t i = 0; i < result.rows.size(); ++i) result.rows[i].rank = static_cast<int>(i) + 1;
      result.sorted_by = fmt::format("rank 1 is the chosen model; then by {} (lower is better)",
                                     to_string(config.search.criterion));
    }
    result.chosen_reason = fmt::format(
        "{} has the lowest {} among the fits whose status may lead ({})", result.rows.front().key,
        to_string(config.search.criterion), fmt::join(config.backtest.chosen_statuses, ", "));
    const auto problem = make_problem(search_data(data, result),
                                      fitted_spec(result.rows.front(), result), result.start);
    result.chosen = fit_model(problem);
    update_effect_sizes(result);
    warn_on_chosen_residuals(result);
  } else {
    result.chosen_reason = "no candidate with a status that may lead";
  }
  result.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return result;
}

void warn_on_chosen_residuals(SearchResult& result) {
  if (!result.has_chosen()) return;
  const std::string prefix = "chosen_residuals_autocorrelated";
  // A model re-chosen by the backtest replaces the warning about the previous one.
  std::erase_if(result.warnings, [&](const Warning& w) { return w.is(prefix); });
  for (const auto& w : result.chosen.diagnostics.warnings)
    if (w.is(prefix)) return;
  for (const auto& lb : result.chosen.diagnostics.ljung_box)
    if (std::isfinite(lb.p_value) && lb.p_value < 0.01) {
      const Warning w{
          prefix,
          fmt::format("{}: the chosen model's residuals fail the Ljung-Box test at 1 % (Q = {:.2f} "
                      "up to lag {}, df {}, p = {:.2g}): autocorrelation is left, so its "
                      "intervals are too narrow; try more noise terms",
                      prefix, lb.statistic, lb.lag, lb.df, lb.p_value),
          {{"statistic", lb.statistic}, {"lag", lb.lag}, {"df", lb.df}, {"p_value", lb.p_value}},
          {}};
      result.warnings.push_back(w);
      result.chosen.diagnostics.warnings.push_back(w);
      return;
    }
}

}  // namespace lagsieve

#include "forecast/fitted_model.h"

namespace lagsieve {

std::string run_fingerprint(const RunConfig& config, const std::vector<SeriesData>& series) {
  // Only what a candidate's fit depends on: the data (values and time stamps), how they are
  // read, the target's transform, the differencing, the filter start (fit.filter_start), the inputs
  // and events, and the common sample start the grid implies. Comments, layout, the strategy,
  // budget, threads, backtest, forecast and output sections do not change a candidate's result, so
  // they do not block a resume.
  std::string all = fmt::format("v3|time={}|missing={}|", config.data.time,
                                static_cast<int>(config.data.missing));
  for (const auto& c : config.target.columns) all += "target=" + c + ";";
  all += fmt::format("filter_start={}|", to_string(config.fit.filter_start));
  if (config.fit.estimation != Estimation::ml)  // absent for ml: earlier runs still resume
    all += fmt::format("estimation={}|", to_string(config.fit.estimation));
  all += fmt::format("|transform={},{:.17g}|diff={},{},{}|start={}|period={}|",
                     static_cast<int>(config.target.transform.kind), config.target.transform.lambda,
                     config.differencing.regular, config.differencing.seasonal,
                     config.differencing.period, common_start(config), config.noise.period);
  std::vector<std::string> names;
  for (const auto& ic : config.inputs) {
    all +=
        fmt::format("input={},{},{},{}|", ic.name, ic.is_event, static_cast<int>(ic.shape), ic.at);
    if (!ic.is_event) names.push_back(ic.name);
  }
  for (const auto& s : series) {
    all += s.target_name + "=" + data_fingerprint(s, s.rows(), names) + "|";
    for (const auto& t : s.time) all += t + ";";
  }
  return text_fingerprint(all);
}

}  // namespace lagsieve
