#include "revalidate/revalidate.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>

#include "core/error.h"
#include "core/names.h"
#include "io/config.h"
#include "model/fit.h"
#include "model/likelihood.h"
#include "model/spec_from_config.h"
#include "search/candidates.h"
#include "revalidate/new_effects.h"
#include "search/shortlist.h"

namespace lagsieve {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Index of each candidate in the new-period comparison backtest.
constexpr size_t kDeployed = 0, kRefitted = 1, kChallenger = 2;

std::string fmt_p(double p) { return p < 1e-4 ? fmt::format("{:.1e}", p) : fmt::format("{:.4f}", p); }

// Non-event input columns the training fingerprint covered: those of the config the model came
// from (its text is in the model file), else the current config's.
std::vector<std::string> fingerprint_columns(const FittedModel& model, const RunConfig& config) {
  std::vector<std::string> names;
  if (!model.training.config_text.empty()) {
    try {
      const RunConfig trained = parse_config(model.training.config_text,
                                             model.training.config_file.empty()
                                                 ? config.config_file
                                                 : std::filesystem::path(model.training.config_file));
      for (const auto& ic : trained.inputs)
        if (!ic.is_event) names.push_back(ic.name);
      return names;
    } catch (const std::exception&) {
      names.clear();  // an older or edited text: fall back to the current config
    }
  }
  for (const auto& ic : config.inputs)
    if (!ic.is_event) names.push_back(ic.name);
  return names;
}

HistoryCheck check_history(const FittedModel& model, const SeriesData& data, const RunConfig& config,
                           const RevalidateOptions& options) {
  const TrainingInfo& tr = model.training;
  HistoryCheck h;
  h.source_file = data.source_file.empty() ? config.data.file.string() : data.source_file;
  h.training_rows = tr.rows;
  h.rows = data.rows();
  h.new_rows = data.rows() - tr.rows;
  h.training_first_time = tr.first_time;
  h.training_last_time = tr.last_time;
  h.expected_fingerprint = tr.fingerprint;
  const std::string range =
      tr.last_time.empty() ? "" : fmt::format(", {} to {}", tr.first_time, tr.last_time);
  if (tr.rows < 1)
    throw InputError("model file: training.rows is missing or 0; re-validation needs the training "
                     "range a model file from fit --save or search records");
  if (h.new_rows < kMinNewRows)
    throw InputError(fmt::format(
        "{}: {} rows of '{}', but the model was trained on the first {} rows{}; re-validation needs "
        "at least {} new rows after them. Append the observations that arrived since training to "
        "the data file and run again",
        h.source_file, h.rows, data.target_name, tr.rows, range, kMinNewRows));
  for (const auto& term : model.spec.inputs)
    if (data.input_index(term.name) < 0)
      throw InputError(fmt::format("{}: the model uses input '{}', which the config does not load; "
                                   "add it to the config's inputs",
                                   config.config_file.string(), term.name));
  const auto columns = fingerprint_columns(model, config);
  for (const auto& name : columns)
    if (data.input_index(name) < 0 && !options.allow_revised_history)
      throw InputError(fmt::format(
          "{}: input '{}' was part of the data the model was trained on (its fingerprint covers "
          "it) but the config does not load it; add it back, or pass --allow-revised-history",
          config.config_file.string(), name));
  h.found_fingerprint = data_fingerprint(data, tr.rows, columns);
  if (!data.time.empty()) {
    h.new_first_time = data.time[tr.rows];
    h.new_last_time = data.time.back();
  }
  std::string problem;
  if (!tr.fingerprint.empty() && h.found_fingerprint != tr.fingerprint)
    problem = fmt::format("the values differ (fingerprint {} in the model file, {} now)", tr.fingerprint,
                          h.found_fingerprint);
  else if (!tr.last_time.empty() && !data.time.empty() && data.time[tr.rows - 1] != tr.last_time)
    problem = fmt::format("row {} is stamped '{}', the model's last training row '{}'", tr.rows,
                          data.time[tr.rows - 1], tr.last_time);
  else if (!tr.first_time.empty() && !data.time.empty() && data.time.front() != tr.first_time)
    problem = fmt::format("the first row is stamped '{}', the model's first training row '{}'",
                          data.time.front(), tr.first_time);
  if (!problem.empty()) {
    if (!options.allow_revised_history)
      throw InputError(fmt::format(
          "{}: the first {} rows (the model's training range{}) are not the data the model was "
          "trained on: {}. The history was revised or the file does not start where the training "
          "data did; check the file, or pass --allow-revised-history to re-validate anyway",
          h.source_file, tr.rows, range, problem));
    h.revised = true;
  }
  return h;
}

// The training-time accuracy: the model file's, or the deployed structure backtested on the
// training rows as the search would have done (refit as the config says).
nlohmann::json baseline_accuracy(const FittedModel& model, const SeriesData& data,
                                 const RunConfig& config, int threads, std::string& source) {
  if (model.backtest.is_object() && model.backtest.contains("by_horizon")) {
    source = "model file";
    return model.backtest;
  }
  RunConfig c = config;
  if (c.backtest.first_origin >= model.training.rows) c.backtest.first_origin = 0;
  try {
    const SeriesData train = slice_rows(data, 0, model.training.rows);
    BacktestOptions o = backtest_options(c, train.rows());
    o.threads = threads;
    BacktestCandidate cand = candidate_from_model("deployed structure", model);
    cand.fixed.reset();
    const auto bt = run_backtest(train, {cand}, o);
    if (bt.models.empty() || bt.models[0].production.records.empty()) {
      source = "none";
      return nullptr;
    }
    source = "recomputed on the training rows";
    return accuracy_json(bt.models[0], o);
  } catch (const InputError&) {
    source = "none";  // training rows too short for the config's backtest settings
    return nullptr;
  }
}

std::vector<double> scaled_errors(const ForecastRecords& records, int horizon) {
  std::vector<const ForecastRecord*> rows;
  for (const auto& r : records.records)
    if (r.horizon == horizon) rows.push_back(&r);
  std::sort(rows.begin(), rows.end(), [](const auto* a, const auto* b) { return a->origin < b->origin; });
  std::vector<double> out;
  for (const auto* r : rows) out.push_back(r->scale > 0.0 ? std::abs(r->actual - r->forecast) / r->scale : kNaN);
  return out;
}

double one_sided(const DieboldMarianoResult& dm) {
  if (!std::isfinite(dm.statistic)) return 1.0;
  return dm.statistic > 0.0 ? dm.p_value / 2.0 : 1.0 - dm.p_value / 2.0;
}

std::vector<ParameterDrift> parameter_drift(const FittedModel& model, const FitResult& refit,
                                            double threshold) {
  std::vector<double> values = pack_nonlinear(model.spec, model.params);
  const auto linear = pack_linear(model.spec, model.params);
  values.insert(values.end(), linear.begin(), linear.end());
  std::vector<std::string> names = model.param_names;
  if (names.size() != values.size()) {
    names = nonlinear_names(model.spec);
    const auto ln = linear_names(model.spec);
    names.insert(names.end(), ln.begin(), ln.end());
  }
  std::vector<ParameterDrift> out;
  for (size_t i = 0; i < names.size(); ++i) {
    ParameterDrift d;
    d.name = names[i];
    d.original = values[i];
    d.original_se = static_cast<Eigen::Index>(i) < model.covariance.rows() &&
                            model.covariance.rows() == model.covariance.cols() &&
                            model.covariance(i, i) > 0.0
                        ? std::sqrt(model.covariance(i, i))
                        : kNaN;
    d.refit = kNaN;
    d.refit_se = kNaN;
    for (const auto& e : refit.estimates)
      if (e.name == d.name) {
        d.refit = e.value;
        d.refit_se = e.std_error;
      }
    d.change = d.refit - d.original;
    d.change_in_se = std::isfinite(d.original_se) && d.original_se > 0.0 ? d.change / d.original_se : kNaN;
    d.flagged = std::isfinite(d.change_in_se) && std::abs(d.change_in_se) > threshold;
    out.push_back(d);
  }
  return out;
}

int arma_terms(const ModelSpec& spec) {
  return spec.noise.p + spec.noise.q + spec.noise.seasonal_p + spec.noise.seasonal_q;
}

ResidualCheck residual_checks(const FittedModel& model, const SeriesData& data, int new_rows,
                              const RevalidateOptions& options, const ModelBacktest& deployed) {
  ResidualCheck out;
  const auto problem = make_problem(data, model.spec, model.start);
  LikelihoodWorkspace ws;
  const auto all = model_residuals(problem, model.params, ws);
  // Residuals exist at observed rows only: count the observed ones among the new rows.
  int observed_new = 0;
  const int total = static_cast<int>(problem.w.size());
  for (int t = std::max(problem.start, total - new_rows); t < total; ++t)
    observed_new += problem.is_missing(t) ? 0 : 1;
  const int n = std::min<int>(observed_new, static_cast<int>(all.size()));
  const std::vector<double> r(all.end() - n, all.end());
  out.n = n;
  const int arma = arma_terms(model.spec);
  const int lag = options.ljung_box_lag > 0 ? options.ljung_box_lag : std::max(std::min(10, n / 5), arma + 1);
  out.ljung_box = ljung_box_check(r, lag, arma);
  out.mean_shift = mean_shift_check(r, model.spec.constant ? model.n_obs : 0);
  out.variance = variance_change_check(r, model.params.sigma2, model.n_obs - (model.n_params - 1));
  const auto& levels = deployed.production.levels;
  for (size_t l = 0; l < levels.size(); ++l) {
    int inside = 0, count = 0;
    for (const auto& rec : deployed.production.records) {
      if (rec.horizon != 1) continue;
      ++count;
      if (rec.actual >= rec.lower[l] && rec.actual <= rec.upper[l]) ++inside;
    }
    out.coverage.push_back(coverage_check(inside, count, levels[l]));
  }
  return out;
}

const nlohmann::json* baseline_row(const nlohmann::json& baseline, int horizon) {
  if (!baseline.is_object() || !baseline.contains("by_horizon")) return nullptr;
  for (const auto& row : baseline["by_horizon"])
    if (row.value("horizon", 0) == horizon) return &row;
  return nullptr;
}

double json_number(const nlohmann::json& j, const char* key) {
  return j.contains(key) && j[key].is_number() ? j[key].get<double>() : kNaN;
}

PerformanceCheck performance_check(const ModelBacktest& deployed, const nlohmann::json& baseline,
                                   const std::string& source, const BacktestOptions& o) {
  PerformanceCheck p;
  p.baseline_source = source;
  p.levels = o.levels;
  p.first_origin = o.first_origin;
  p.score = deployed.score;
  p.baseline_score = baseline.is_object() ? json_number(baseline, "score") : kNaN;
  std::vector<double> baseline_levels;
  if (baseline.is_object() && baseline.contains("levels") && baseline["levels"].is_array())
    baseline_levels = baseline["levels"].get<std::vector<double>>();
  int origins = 0;
  for (const auto& rec : deployed.production.records) origins += rec.horizon == 1 ? 1 : 0;
  p.origins = origins;
  for (const auto& row : deployed.production_accuracy.by_horizon) {
    HorizonAccuracy h;
    h.horizon = row.horizon;
    h.count = row.count;
    h.mae = row.mae;
    h.mase = row.mase;
    h.coverage = row.coverage;
    h.baseline_mae = h.baseline_mase = kNaN;
    const auto* b = baseline_row(baseline, row.horizon);
    if (b) {
      h.baseline_mae = json_number(*b, "mae");
      h.baseline_mase = json_number(*b, "mase");
      h.baseline_count = b->value("count", 0);
      if (b->contains("coverage") && (*b)["coverage"].is_array()) {
        const auto cov = (*b)["coverage"].get<std::vector<double>>();
        for (double level : o.levels) {
          double v = kNaN;
          for (size_t k = 0; k < baseline_levels.size() && k < cov.size(); ++k)
            if (std::abs(baseline_levels[k] - level) < 1e-9) v = cov[k];
          h.baseline_coverage.push_back(v);
        }
      }
    }
    h.test = degradation_test(scaled_errors(deployed.production, row.horizon), row.horizon,
                              h.baseline_mase, h.baseline_count);
    p.by_horizon.push_back(std::move(h));
  }
  return p;
}

// Rank of `spec` among the search rows; fits it on the search's sample when outside the grid.
void place_deployed(ChallengerCheck& c, const FittedModel& model, const SeriesData& data,
                    const RunConfig& config, const SearchResult& search) {
  c.deployed_key = candidate_key(model.spec);
  if (!(model.spec.differencing == config.differencing) || !(model.spec.transform == config.target.transform)) {
    c.deployed_rank = 0;
    c.note = "the deployed model's transform or differencing differs from the config's, so its "
             "likelihood does not compare with the challengers'; no rank";
    return;
  }
  for (const auto& row : search.rows)
    if (row.key == c.deployed_key) {
      c.deployed_rank = row.rank;
      return;
    }
  c.deployed_in_grid = false;
  const CandidateRow row = fit_candidate(data, model.spec, search.start);
  if (!row.rankable()) {
    c.deployed_rank = 0;
    c.note = "the deployed structure lies outside the config's grid and did not fit on the search's sample";
    return;
  }
  int better = 0;
  for (const auto& other : search.rows)
    if (other.rankable() && other.criterion(config.search.criterion) < row.criterion(config.search.criterion))
      ++better;
  c.deployed_rank = better + 1;
  c.note = "the deployed structure lies outside the config's grid; ranked by the criterion alone";
}

std::string level_name(double level) { return fmt::format("{:g}", 100.0 * level); }

}  // namespace

std::string_view to_string(Verdict v) {
  switch (v) {
    case Verdict::keep: return "keep";
    case Verdict::refit: return "refit";
    case Verdict::replace: return "replace";
  }
  return "?";
}

void RevalidateOptions::validate() const {
  if (!(alpha > 0.0 && alpha < 1.0))
    throw InputError(fmt::format("revalidate: alpha {} must lie strictly between 0 and 1", alpha));
  if (!(drift_threshold > 0.0) || !std::isfinite(drift_threshold))
    throw InputError(fmt::format("revalidate: drift threshold {} must be a positive number of "
                                 "standard errors",
                                 drift_threshold));
  if (ljung_box_lag < 0)
    throw InputError(fmt::format("revalidate: Ljung-Box lag {} must be >= 0 (0 = automatic)", ljung_box_lag));
  if (comparison_refit < 0)
    throw InputError(fmt::format("revalidate: comparison refit interval {} must be >= 0", comparison_refit));
}

RevalidationResult revalidate(const FittedModel& model, const SeriesData& given,
                              const RunConfig& config, const RevalidateOptions& options) {
  options.validate();
  const SeriesData data = with_model_effects(model, given);  // the model's detected effects
  const auto t0 = std::chrono::steady_clock::now();
  RevalidationResult out;
  out.alpha = options.alpha;
  out.series = data.target_name;
  out.deployed_label = model_label(model.spec);
  out.history = check_history(model, data, config, options);
  const int threads = options.threads > 0 ? options.threads : config.search.threads;

  // Horizon and levels: the config's backtest section, else the model's own backtest, else 1.
  BacktestOptions o = backtest_options(config, data.rows());
  if (!config.backtest.enabled && model.backtest.is_object()) {
    o.horizon = model.backtest.value("horizon", o.horizon);
    if (model.backtest.contains("levels")) o.levels = model.backtest["levels"].get<std::vector<double>>();
  }
  o.first_origin = model.training.rows;
  o.refit = options.comparison_refit > 0 ? options.comparison_refit
            : config.backtest.refit > 0  ? config.backtest.refit
                                         : 1;
  o.start = -1;
  o.threads = threads;

  // 4a. The challenger search on all rows (and the config's shortlist backtest).
  SearchOptions so;
  so.threads = threads;
  so.progress = options.progress;
  out.search = run_search(data, config, so);
  auto& ch = out.challengers;
  ch.ranked_by = std::string(to_string(config.search.criterion));
  if (config.backtest.enabled) {
    backtest_shortlist(data, config, out.search, threads);
    ch.ranked_by = fmt::format("backtest {} (shortlist), then {}", config.backtest.score,
                               to_string(config.search.criterion));
  }
  ch.candidates = static_cast<int>(out.search.rows.size());
  place_deployed(ch, model, data, config, out.search);
  for (const auto& row : out.search.rows) {
    if (!row.rankable()) continue;
    if (ch.leader_key.empty()) ch.leader_key = row.key;
    if (row.spec == model.spec) continue;  // the deployed structure itself
    ch.has_challenger = true;
    ch.challenger_key = row.key;
    ch.challenger_spec = row.spec;
    break;
  }

  // 1 and 4b. The new period's rolling origins: deployed as is, deployed re-fitted, challenger.
  std::vector<BacktestCandidate> candidates;
  candidates.push_back(candidate_from_model("deployed (as is)", model));
  BacktestCandidate refitted = candidate_from_model("deployed structure, re-fitted", model);
  refitted.fixed.reset();
  candidates.push_back(refitted);
  if (ch.has_challenger) candidates.push_back(candidate_from_spec("challenger: " + ch.challenger_key, ch.challenger_spec, config));
  candidates.push_back(seasonal_naive_candidate(o.season));
  out.comparison = run_backtest(data, candidates, o);
  const auto& deployed = out.comparison.models[kDeployed];
  if (deployed.production.records.empty())
    throw NumericalError(fmt::format("the deployed model gave no forecast on the new rows: {}", deployed.note));

  std::string source;
  const nlohmann::json baseline = baseline_accuracy(model, data, config, threads, source);
  out.performance = performance_check(deployed, baseline, source, o);

  // 2. Drift: the deployed structure re-fitted on all rows, warm-started at the deployed values.
  {
    FitOptions fo;
    fo.warm_start = model.params;
    const FitResult refit = fit_model(make_problem(data, model.spec, model.start), fo);
    out.drift.threshold = options.drift_threshold;
    out.drift.fit_status = std::string(to_string(refit.status));
    out.drift.fit_message = refit.message;
    if (refit.usable()) {
      out.drift.parameters = parameter_drift(model, refit, options.drift_threshold);
      out.refit_model = make_fitted_model(refit, config, data);
      out.refit_model->backtest = accuracy_json(out.comparison.models[kRefitted], o);
    }
  }

  // 3. Residuals of the new period.
  out.residuals = residual_checks(model, data, out.history.new_rows, options, deployed);
  // 3b. New effects in the new period (new_effects.h): a threshold rule, not one of the m tests.
  out.new_effects = new_effects_check(model, data, config.outliers);

  // 4c. Challenger against the deployed model, per horizon.
  ch.score_deployed = deployed.score;
  ch.score_refit = out.comparison.models[kRefitted].score;
  ch.score_challenger = kNaN;
  std::vector<ComparisonRow> rows;
  if (ch.has_challenger) {
    const auto& chal = out.comparison.models[kChallenger];
    const auto& refit_bt = out.comparison.models[kRefitted];
    ch.score_challenger = chal.score;
    for (int h = 1; h <= o.horizon; ++h) {
      ChallengerComparison cc;
      cc.horizon = h;
      DieboldMarianoOptions dmo;
      dmo.horizon = h;
      const auto a = paired_losses(deployed.production, chal.production, h, LossKind::squared);
      if (static_cast<int>(a.loss_a.size()) <= h + 2) continue;
      cc.vs_deployed = diebold_mariano(a.loss_a, a.loss_b, dmo);
      cc.p_vs_deployed = one_sided(cc.vs_deployed);
      const auto b = paired_losses(refit_bt.production, chal.production, h, LossKind::squared);
      if (static_cast<int>(b.loss_a.size()) > h + 2) {
        cc.vs_refit = diebold_mariano(b.loss_a, b.loss_b, dmo);
        cc.p_vs_refit = one_sided(cc.vs_refit);
      } else {
        cc.vs_refit.statistic = kNaN;
      }
      rows.push_back(
          {deployed.name, chal.name, h, "squared", true, cc.vs_deployed, cc.vs_deployed.note});
      rows.push_back({refit_bt.name, chal.name, h, "squared", std::isfinite(cc.vs_refit.statistic),
                      cc.vs_refit, cc.vs_refit.note});
      ch.by_horizon.push_back(cc);
    }
    // The challenger on all rows, with its new-period accuracy as the next baseline.
    const FitResult fit = fit_model(make_problem(data, ch.challenger_spec, out.search.start));
    if (fit.usable()) {
      out.challenger_model = make_fitted_model(fit, config, data);
      out.challenger_model->backtest = accuracy_json(chal, o);
    }
  } else {
    ch.note += (ch.note.empty() ? "" : "; ") + std::string("no challenger other than the deployed structure fitted");
  }
  out.comparison.comparisons = rows;

  // 5. The verdict.
  int m = 0;
  for (const auto& h : out.performance.by_horizon) m += std::isfinite(h.test.statistic) ? 1 : 0;
  m += std::isfinite(out.residuals.ljung_box.statistic) ? 1 : 0;
  m += std::isfinite(out.residuals.mean_shift.statistic) ? 1 : 0;
  m += std::isfinite(out.residuals.variance.ratio) ? 1 : 0;
  for (const auto& c : ch.by_horizon) m += std::isfinite(c.vs_deployed.statistic) ? 1 : 0;
  out.tests = m;
  out.alpha_per_test = options.alpha / std::max(m, 1);
  const double level = out.alpha_per_test;

  std::vector<std::string> refit_reasons;
  for (auto& h : out.performance.by_horizon) {
    h.degraded = std::isfinite(h.test.statistic) && h.test.p_value < level;
    if (h.degraded)
      refit_reasons.push_back(fmt::format(
          "accuracy degraded at horizon {}: MASE {:.3f} on the new rows against {:.3f} at training "
          "time (ratio {:.2f}, one-sided p = {} < {:.4f})",
          h.horizon, h.mase, h.baseline_mase, h.test.ratio, fmt_p(h.test.p_value), level));
  }
  for (const auto& d : out.drift.parameters)
    if (d.flagged)
      refit_reasons.push_back(fmt::format(
          "parameter {} drifted: {:.4g} -> {:.4g} when re-fitted on all rows, {:+.1f} original "
          "standard errors (threshold {:g})",
          d.name, d.original, d.refit, d.change_in_se, options.drift_threshold));
  const auto& res = out.residuals;
  if (std::isfinite(res.ljung_box.statistic) && res.ljung_box.p_value < level)
    refit_reasons.push_back(fmt::format(
        "new-period residuals are autocorrelated: Ljung-Box Q = {:.2f} at lag {} (df {}), p = {} < {:.4f}",
        res.ljung_box.statistic, res.ljung_box.lag, res.ljung_box.df, fmt_p(res.ljung_box.p_value), level));
  if (std::isfinite(res.mean_shift.statistic) && res.mean_shift.p_value < level)
    refit_reasons.push_back(fmt::format(
        "new-period residuals are off centre: mean {:.4g} (t = {:.2f}, p = {} < {:.4f})",
        res.mean_shift.mean, res.mean_shift.statistic, fmt_p(res.mean_shift.p_value), level));
  if (std::isfinite(res.variance.ratio) && res.variance.p_value < level)
    refit_reasons.push_back(fmt::format(
        "new-period residual variance is {:.2f} times the fitted sigma^2 (p = {} < {:.4f})",
        res.variance.ratio, fmt_p(res.variance.p_value), level));
  for (const auto& e : out.new_effects.found)
    refit_reasons.push_back(fmt::format(
        "new effect in the new period: {} (|statistic| above the critical value {:.2f}; a re-fit "
        "takes it in as an event input)",
        describe_new_effect(e), out.new_effects.critical));
  int best_dep = -1, best_ref = -1;
  for (size_t i = 0; i < ch.by_horizon.size(); ++i) {
    const auto& c = ch.by_horizon[i];
    if (std::isfinite(c.vs_deployed.statistic) && c.p_vs_deployed < level &&
        (best_dep < 0 || c.p_vs_deployed < ch.by_horizon[best_dep].p_vs_deployed))
      best_dep = static_cast<int>(i);
    if (std::isfinite(c.vs_refit.statistic) && c.p_vs_refit < level &&
        (best_ref < 0 || c.p_vs_refit < ch.by_horizon[best_ref].p_vs_refit))
      best_ref = static_cast<int>(i);
  }
  ch.better_than_deployed = best_dep >= 0;
  ch.better_than_refit = best_ref >= 0;
  if (ch.better_than_deployed) {
    const auto& c = ch.by_horizon[best_dep];
    const std::string text = fmt::format(
        "challenger {} forecasts the new rows better than the deployed model at horizon {} "
        "(Diebold-Mariano, squared loss, one-sided p = {} < {:.4f})",
        ch.challenger_key, c.horizon, fmt_p(c.p_vs_deployed), level);
    if (ch.better_than_refit) {
      out.verdict = Verdict::replace;
      out.reasons.push_back(text);
      const auto& r = ch.by_horizon[best_ref];
      out.reasons.push_back(fmt::format(
          "and better than the deployed structure re-fitted at horizon {} (one-sided p = {} < {:.4f}), "
          "so a re-fit alone would not catch up",
          r.horizon, fmt_p(r.p_vs_refit), level));
      for (auto& s : refit_reasons) out.reasons.push_back("also: " + s);
    } else {
      refit_reasons.push_back(text + ", but not significantly better than the deployed structure re-fitted");
    }
  }
  if (out.verdict != Verdict::replace) {
    if (!refit_reasons.empty()) {
      out.verdict = Verdict::refit;
      out.reasons = refit_reasons;
    } else {
      out.verdict = Verdict::keep;
      out.reasons.push_back(fmt::format(
          "no test of the {} that can move the verdict rejects at {:.4f} (alpha {:g} / {}), and no "
          "parameter moved more than {:g} standard errors",
          m, level, options.alpha, std::max(m, 1), options.drift_threshold));
      if (ch.deployed_rank > 0)
        out.reasons.push_back(fmt::format("the deployed structure ranks {} of {} in the fresh search ({})",
                                          ch.deployed_rank, ch.candidates, ch.ranked_by));
    }
  }
  if (out.history.revised)
    out.reasons.push_back("note: the training rows differ from the data the model was trained on "
                          "(allowed by --allow-revised-history); the comparison with training-time "
                          "accuracy is less clean");
  out.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return out;
}

// ---- output ---------------------------------------------------------------------------------

namespace {

nlohmann::ordered_json num(double v) {
  return std::isfinite(v) ? nlohmann::ordered_json(v) : nlohmann::ordered_json(nullptr);
}

}  // namespace

nlohmann::ordered_json to_json(const RevalidationResult& r) {
  using json = nlohmann::ordered_json;
  json j;
  j["verdict"] = std::string(to_string(r.verdict));
  j["reasons"] = r.reasons;
  j["series"] = r.series;
  j["deployed_model"] = r.deployed_label;
  j["exit_code_meaning"] = "0 keep, 10 refit advised, 11 replace advised";
  j["decision"] = {{"alpha", r.alpha},
                   {"tests", r.tests},
                   {"level_per_test", r.alpha_per_test},
                   {"drift_threshold_se", r.drift.threshold},
                   {"rule",
                    "replace: the best challenger beats the deployed model AND its re-fit "
                    "(Diebold-Mariano, one-sided, each at level_per_test); refit: otherwise any "
                    "degradation, residual or challenger test rejecting at level_per_test, or a "
                    "parameter moving beyond drift_threshold_se original standard errors; keep: none "
                    "of these. level_per_test = alpha / tests (Bonferroni)."}};
  const auto& h = r.history;
  j["history"] = {{"data_file", h.source_file},
                  {"training_rows", h.training_rows},
                  {"rows", h.rows},
                  {"new_rows", h.new_rows},
                  {"training_first_time", h.training_first_time},
                  {"training_last_time", h.training_last_time},
                  {"new_first_time", h.new_first_time},
                  {"new_last_time", h.new_last_time},
                  {"fingerprint_expected", h.expected_fingerprint},
                  {"fingerprint_found", h.found_fingerprint},
                  {"history_revised", h.revised}};
  const auto& p = r.performance;
  json perf = {{"baseline", p.baseline_source},
               {"first_origin_row", p.first_origin},
               {"origins", p.origins},
               {"score_new_rows", num(p.score)},
               {"score_training_time", num(p.baseline_score)},
               {"test", "one-sided, new-period mean scaled error vs training-time MASE, "
                        "long-run variance with h-1 lags, Student t (n-1 df)"}};
  perf["by_horizon"] = json::array();
  for (const auto& row : p.by_horizon) {
    json e = {{"horizon", row.horizon}, {"count", row.count}, {"mae", num(row.mae)},
              {"mae_training", num(row.baseline_mae)}, {"mase", num(row.mase)},
              {"mase_training", num(row.baseline_mase)}, {"mase_ratio", num(row.test.ratio)}};
    for (size_t l = 0; l < p.levels.size(); ++l) {
      e["coverage_" + level_name(p.levels[l])] = l < row.coverage.size() ? num(row.coverage[l]) : json(nullptr);
      e["coverage_" + level_name(p.levels[l]) + "_training"] =
          l < row.baseline_coverage.size() ? num(row.baseline_coverage[l]) : json(nullptr);
    }
    e["statistic"] = num(row.test.statistic);
    e["p_value"] = num(row.test.p_value);
    e["degraded"] = row.degraded;
    if (!row.test.note.empty()) e["note"] = row.test.note;
    perf["by_horizon"].push_back(e);
  }
  j["performance"] = perf;
  json drift = {{"threshold_se", r.drift.threshold}, {"refit_status", r.drift.fit_status},
                {"refit_message", r.drift.fit_message}};
  drift["parameters"] = json::array();
  for (const auto& d : r.drift.parameters)
    drift["parameters"].push_back({{"parameter", d.name}, {"deployed", num(d.original)},
                                   {"deployed_se", num(d.original_se)}, {"refit", num(d.refit)},
                                   {"refit_se", num(d.refit_se)}, {"change", num(d.change)},
                                   {"change_in_se", num(d.change_in_se)}, {"flagged", d.flagged}});
  j["drift"] = drift;
  const auto& res = r.residuals;
  json rj = {{"new_residuals", res.n},
             {"ljung_box_lag", res.ljung_box.lag},
             {"ljung_box_df", res.ljung_box.df},
             {"ljung_box_statistic", num(res.ljung_box.statistic)},
             {"ljung_box_p", num(res.ljung_box.p_value)},
             {"mean", num(res.mean_shift.mean)},
             {"mean_t", num(res.mean_shift.statistic)},
             {"mean_p", num(res.mean_shift.p_value)},
             {"variance", num(res.variance.new_variance)},
             {"variance_fitted", num(res.variance.reference_variance)},
             {"variance_ratio", num(res.variance.ratio)},
             {"variance_df", json::array({res.variance.df_new, res.variance.df_reference})},
             {"variance_p", num(res.variance.p_value)}};
  rj["coverage_horizon_1"] = json::array();
  for (const auto& c : res.coverage)
    rj["coverage_horizon_1"].push_back({{"level", c.level}, {"count", c.count}, {"inside", c.inside},
                                        {"observed", num(c.observed)}, {"p_value", num(c.p_value)}});
  j["residuals"] = rj;
  j["new_effects"] = new_effects_json(r.new_effects);
  const auto& ch = r.challengers;
  json cj = {{"candidates", ch.candidates},
             {"ranked_by", ch.ranked_by},
             {"deployed", ch.deployed_key},
             {"deployed_rank", ch.deployed_rank > 0 ? json(ch.deployed_rank) : json(nullptr)},
             {"deployed_in_grid", ch.deployed_in_grid},
             {"search_leader", ch.leader_key},
             {"best_challenger", ch.has_challenger ? json(ch.challenger_key) : json(nullptr)},
             {"score_deployed", num(ch.score_deployed)},
             {"score_deployed_refit", num(ch.score_refit)},
             {"score_challenger", num(ch.score_challenger)},
             {"better_than_deployed", ch.better_than_deployed},
             {"better_than_refit", ch.better_than_refit}};
  if (!ch.note.empty()) cj["note"] = ch.note;
  cj["comparisons"] = json::array();
  for (const auto& c : ch.by_horizon)
    cj["comparisons"].push_back({{"horizon", c.horizon}, {"n", c.vs_deployed.n},
                                 {"dm_vs_deployed", num(c.vs_deployed.statistic)},
                                 {"p_vs_deployed", num(c.p_vs_deployed)},
                                 {"dm_vs_refit", num(c.vs_refit.statistic)},
                                 {"p_vs_refit", num(c.p_vs_refit)}});
  j["challengers"] = cj;
  j["files"] = {{"refit_model", r.refit_model ? json(kRefitModelFile) : json(nullptr)},
                {"challenger_model", r.challenger_model ? json(kChallengerModelFile) : json(nullptr)}};
  j["seconds"] = r.seconds;
  return j;
}

std::string summary_text(const RevalidationResult& r) {
  std::string s;
  auto line = [&s](const std::string& t) { s += t + "\n"; };
  const auto& h = r.history;
  line(fmt::format("{} · deployed {}", r.series, r.deployed_label));
  line(fmt::format("  trained on rows 1..{}{}; {} new rows{}{}", h.training_rows,
                   h.training_last_time.empty() ? "" : fmt::format(" ({} to {})", h.training_first_time, h.training_last_time),
                   h.new_rows,
                   h.new_first_time.empty() ? "" : fmt::format(" ({} to {})", h.new_first_time, h.new_last_time),
                   h.revised ? "; TRAINING ROWS REVISED" : ""));
  line("");
  line(fmt::format("Verdict: {}", to_string(r.verdict)));
  for (const auto& reason : r.reasons) line("  - " + reason);
  line(fmt::format("  ({} tests can move the verdict, each at {:.4f} = {:g} / {})", r.tests, r.alpha_per_test,
                   r.alpha, std::max(r.tests, 1)));
  line("");
  const auto& p = r.performance;
  line(fmt::format("Deployed model unchanged on the new rows ({} origins; training-time accuracy: {})",
                   p.origins, p.baseline_source));
  std::string head = fmt::format("  {:>2} {:>5} {:>9} {:>9} {:>9} {:>6}", "h", "n", "MAE", "MASE", "then", "ratio");
  for (double l : p.levels) head += fmt::format(" {:>7}", "cov" + level_name(l));
  head += fmt::format(" {:>9}", "p worse");
  line(head);
  for (const auto& row : p.by_horizon) {
    std::string t = fmt::format("  {:>2} {:>5} {:>9.4g} {:>9.4f} {:>9.4f} {:>6.2f}", row.horizon, row.count,
                                row.mae, row.mase, row.baseline_mase, row.test.ratio);
    for (double c : row.coverage) t += fmt::format(" {:>7.3f}", c);
    t += fmt::format(" {:>9}", std::isfinite(row.test.statistic) ? fmt_p(row.test.p_value) : "-");
    if (row.degraded) t += "  *";
    line(t);
  }
  line("");
  line(fmt::format("Parameters re-fitted on all rows (status {}; flag beyond {:g} original SEs)",
                   r.drift.fit_status, r.drift.threshold));
  line(fmt::format("  {:<22} {:>11} {:>9} {:>11} {:>8}", "parameter", "deployed", "se", "re-fitted", "change/se"));
  for (const auto& d : r.drift.parameters)
    line(fmt::format("  {:<22} {:>11.5g} {:>9.3g} {:>11.5g} {:>8.2f}{}", d.name, d.original, d.original_se, d.refit,
                     d.change_in_se, d.flagged ? "  *" : ""));
  line("");
  const auto& res = r.residuals;
  line(fmt::format("Residuals of the new rows (n = {})", res.n));
  line(fmt::format("  Ljung-Box Q({}) = {:.2f}, df {}, p = {}", res.ljung_box.lag, res.ljung_box.statistic,
                   res.ljung_box.df, fmt_p(res.ljung_box.p_value)));
  line(fmt::format("  mean {:.4g}, t = {:.2f}, p = {}", res.mean_shift.mean, res.mean_shift.statistic,
                   fmt_p(res.mean_shift.p_value)));
  line(fmt::format("  variance {:.4g} vs fitted {:.4g} (ratio {:.2f}), p = {}", res.variance.new_variance,
                   res.variance.reference_variance, res.variance.ratio, fmt_p(res.variance.p_value)));
  for (const auto& c : res.coverage)
    line(fmt::format("  1-step {}% intervals held {} of {} ({:.1f}%), p = {}", level_name(c.level), c.inside,
                     c.count, 100.0 * c.observed, fmt_p(c.p_value)));
  if (r.new_effects.run) {
    line("");
    line(fmt::format("New effects in the new rows (critical |statistic| {:.2f}, {} rows tested)",
                     r.new_effects.critical, r.new_effects.tested_rows));
    if (r.new_effects.found.empty())
      line(r.new_effects.note.empty() ? "  none" : "  " + r.new_effects.note);
    for (const auto& e : r.new_effects.found) line("  " + describe_new_effect(e));
  }
  line("");
  const auto& ch = r.challengers;
  line(fmt::format("Challengers: {} candidates, ranked by {}", ch.candidates, ch.ranked_by));
  line(fmt::format("  deployed structure ranks {}{}", ch.deployed_rank > 0 ? std::to_string(ch.deployed_rank) : "-",
                   ch.deployed_in_grid ? "" : " (outside the grid)"));
  if (ch.has_challenger) {
    line(fmt::format("  best challenger {}", ch.challenger_key));
    line(fmt::format("  new-row score: deployed {:.4f}, deployed re-fitted {:.4f}, challenger {:.4f}",
                     ch.score_deployed, ch.score_refit, ch.score_challenger));
    for (const auto& c : ch.by_horizon)
      line(fmt::format("  h {:>2}: better than deployed p = {}, better than re-fitted p = {}", c.horizon,
                       fmt_p(c.p_vs_deployed), fmt_p(c.p_vs_refit)));
  }
  if (!ch.note.empty()) line("  note: " + ch.note);
  return s;
}

}  // namespace lagsieve
