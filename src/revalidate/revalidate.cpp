#include "revalidate/revalidate.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>

#include "core/error.h"
#include "core/names.h"
#include "evaluation/distributions.h"
#include "io/config.h"
#include "model/fit.h"
#include "model/likelihood.h"
#include "model/spec_from_config.h"
#include "revalidate/overlap.h"
#include "search/candidates.h"
#include "revalidate/new_effects.h"
#include "search/shortlist.h"

namespace lagsieve {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Index of each candidate in the new-period comparison backtest.
constexpr size_t kDeployed = 0, kRefitted = 1, kChallenger = 2;

std::string fmt_p(double p) {
  return p < 1e-4 ? fmt::format("{:.1e}", p) : fmt::format("{:.4f}", p);
}

// Non-event input columns the training fingerprint covered: those of the config the model came
// from (its text is in the model file), else the current config's.
std::vector<std::string> fingerprint_columns(const FittedModel& model, const RunConfig& config) {
  std::vector<std::string> names;
  if (!model.training.config_text.empty()) {
    try {
      const RunConfig trained = parse_config(
          model.training.config_text, model.training.config_file.empty()
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

// The older rule, for model files without their training rows: the file starts at the training
// start and its first training.rows rows have the training fingerprint and end stamp.
void check_by_fingerprint(const FittedModel& model, const SeriesData& data, const RunConfig& config,
                          const RevalidateOptions& options, HistoryCheck& h) {
  const TrainingInfo& tr = model.training;
  const std::string range =
      tr.last_time.empty() ? "" : fmt::format(", {} to {}", tr.first_time, tr.last_time);
  const auto columns = fingerprint_columns(model, config);
  for (const auto& name : columns)
    if (data.input_index(name) < 0 && !options.allow_revised_history)
      throw InputError(fmt::format(
          "{}: input '{}' was part of the data the model was trained on (its fingerprint covers "
          "it) but the config does not load it; add it back, or pass --allow-revised-history",
          config.config_file.string(), name));
  const bool starts_elsewhere =
      !tr.first_time.empty() && !data.time.empty() && data.time.front() != tr.first_time;
  if (data.rows() <= tr.rows && !starts_elsewhere) return;  // no new rows: said by the caller
  if (data.rows() >= tr.rows) h.found_fingerprint = data_fingerprint(data, tr.rows, columns);
  std::string problem;
  if (starts_elsewhere)
    problem = fmt::format("the first row is stamped '{}', the model's first training row '{}'",
                          data.time.front(), tr.first_time);
  else if (!tr.fingerprint.empty() && h.found_fingerprint != tr.fingerprint)
    problem = fmt::format("the values differ (fingerprint {} in the model file, {} now)",
                          tr.fingerprint, h.found_fingerprint);
  else if (!tr.last_time.empty() && !data.time.empty() && data.time[tr.rows - 1] != tr.last_time)
    problem = fmt::format("row {} is stamped '{}', the model's last training row '{}'", tr.rows,
                          data.time[tr.rows - 1], tr.last_time);
  if (!problem.empty()) {
    if (!options.allow_revised_history)
      throw InputError(fmt::format(
          "{}: the first {} rows (the model's training range{}) are not the data the model was "
          "trained on: {}. The history was revised or the file does not start where the training "
          "data did (this model file predates stored training rows, so a rolling extract cannot "
          "be lined up: re-fit or re-save it to get them); check the file, or pass "
          "--allow-revised-history to re-validate anyway",
          h.source_file, tr.rows, range, problem));
    h.revised = true;
  }
}

// Checks the file against the training rows and returns the series to re-validate on: the file
// itself, or (model files that hold their training rows) the training rows the file no longer
// holds, then the file.
SeriesData check_history(const FittedModel& model, const SeriesData& data, const RunConfig& config,
                         const RevalidateOptions& options, HistoryCheck& h) {
  const TrainingInfo& tr = model.training;
  h.source_file = data.source_file.empty() ? config.data.file.string() : data.source_file;
  h.training_rows = tr.rows;
  h.file_rows = data.rows();
  h.training_first_time = tr.first_time;
  h.training_last_time = tr.last_time;
  h.expected_fingerprint = tr.fingerprint;
  if (tr.rows < 1)
    throw InputError(
        "model file: training.rows is missing or 0; re-validation needs the training "
        "range a model file from fit --save or search records");
  const auto is_effect = [&model](const std::string& name) {
    for (const auto& use : model.inputs)
      if (use.name == name && use.effect) return true;  // rebuilt from its stamp afterwards
    return false;
  };
  for (const auto& term : model.spec.inputs)
    if (data.input_index(term.name) < 0 && !is_effect(term.name))
      throw InputError(
          fmt::format("{}: the model uses input '{}', which the config does not load; "
                      "add it to the config's inputs",
                      config.config_file.string(), term.name));
  SeriesData all;
  if (!tr.data.empty() && tr.data.rows() == tr.rows) {
    Overlap ov = line_up(tr.data, data, config, h.source_file);
    h.checked_by_value = true;
    h.first_training_row = ov.first_training_row;
    h.prepended = ov.prepended;
    h.dropped_leading = ov.dropped_leading;
    h.overlap_rows = ov.overlap_rows;
    h.late_values = ov.late_values;
    h.refilled = ov.refilled;
    h.revision_count = ov.revision_count;
    for (const auto& r : ov.revisions) h.revisions.push_back(describe(r, h.source_file));
    if (ov.revision_count > 0) {
      if (!options.allow_revised_history)
        throw InputError(fmt::format(
            "{}: a training value was revised: {}{}. The model was fitted on the old value; check "
            "the file, or pass --allow-revised-history to re-validate on the revised data",
            h.source_file, h.revisions.front(),
            ov.revision_count > 1 ? fmt::format(" ({} revised values in all)", ov.revision_count)
                                  : ""));
      h.revised = true;
    }
    all = std::move(ov.merged);
  } else {
    check_by_fingerprint(model, data, config, options, h);
    all = data;
  }
  h.rows = all.rows();
  h.new_rows = std::max(0, all.rows() - tr.rows);
  if (h.found_fingerprint.empty() && all.rows() >= tr.rows)
    h.found_fingerprint = data_fingerprint(all, tr.rows, fingerprint_columns(model, config));
  // The ragged edge: scoring starts after the last target value observed at training.
  int last_observed = std::min(tr.rows, all.rows()) - 1;
  if (h.checked_by_value) {
    const auto& y = tr.data.values[0];
    last_observed = tr.rows - 1;
    while (last_observed >= 0 &&
           (std::isnan(y[last_observed]) || tr.data.was_filled(0, last_observed)))
      --last_observed;
  }
  h.ragged_edge = tr.rows - 1 - last_observed;
  h.first_scored_row = last_observed + 2;
  for (int t = last_observed + 1; t < all.rows(); ++t) h.new_observed += all.observed(t) ? 1 : 0;
  if (h.new_observed < options.min_new_rows) {
    const std::string range =
        tr.last_time.empty() ? "" : fmt::format(", {} to {}", tr.first_time, tr.last_time);
    throw InputError(fmt::format(
        "{}: {} rows of '{}'{}, but the model was trained on {} rows{}; re-validation needs at "
        "least {} new observed target value{} after them and found {}. Append the observations "
        "that arrived since training to the data file and run again{}",
        h.source_file, data.rows(), data.target_name,
        data.time.empty() || data.time.front().empty()
            ? ""
            : fmt::format(" ({} to {})", data.time.front(), data.time.back()),
        tr.rows, range, options.min_new_rows, options.min_new_rows == 1 ? "" : "s", h.new_observed,
        options.min_new_rows > 1 ? " (or lower revalidate.min_new_rows / --min-new-rows)" : ""));
  }
  if (h.new_rows > 0 && !all.time.empty()) {
    h.new_first_time = all.time[tr.rows];
    h.new_last_time = all.time.back();
  }
  return all;
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
  std::sort(rows.begin(), rows.end(),
            [](const auto* a, const auto* b) { return a->origin < b->origin; });
  std::vector<double> out;
  for (const auto* r : rows)
    out.push_back(r->scale > 0.0 ? std::abs(r->actual - r->forecast) / r->scale : kNaN);
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
    d.change_in_se =
        std::isfinite(d.original_se) && d.original_se > 0.0 ? d.change / d.original_se : kNaN;
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
  const int lag =
      options.ljung_box_lag > 0 ? options.ljung_box_lag : std::max(std::min(10, n / 5), arma + 1);
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
  if (!(model.spec.differencing == config.differencing) ||
      !(model.spec.transform == config.target.transform)) {
    c.deployed_rank = 0;
    c.note =
        "the deployed model's transform or differencing differs from the config's, so its "
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
    c.note =
        "the deployed structure lies outside the config's grid and did not fit on the search's "
        "sample";
    return;
  }
  int better = 0;
  for (const auto& other : search.rows)
    if (other.rankable() &&
        other.criterion(config.search.criterion) < row.criterion(config.search.criterion))
      ++better;
  c.deployed_rank = better + 1;
  c.note = "the deployed structure lies outside the config's grid; ranked by the criterion alone";
}

std::string level_name(double level) { return fmt::format("{:g}", 100.0 * level); }

NewPeriodView new_period_view(const SeriesData& data, const ModelBacktest& deployed,
                              int first_origin) {
  NewPeriodView v;
  v.levels = deployed.production.levels;
  std::vector<const ForecastRecord*> rows;
  for (const auto& r : deployed.production.records)
    if (r.horizon == 1) rows.push_back(&r);
  std::sort(rows.begin(), rows.end(),
            [](const auto* a, const auto* b) { return a->origin < b->origin; });
  v.lower.assign(v.levels.size(), {});
  v.upper.assign(v.levels.size(), {});
  for (const auto* r : rows) {
    const int row = r->origin + r->horizon - 1;  // 0-based row of the forecast value
    v.rows.push_back(row + 1);
    v.time.push_back(row < static_cast<int>(data.time.size()) ? data.time[row] : "");
    v.actual.push_back(r->actual);
    v.forecast.push_back(r->forecast);
    for (size_t l = 0; l < v.levels.size(); ++l) {
      v.lower[l].push_back(l < r->lower.size() ? r->lower[l] : kNaN);
      v.upper[l].push_back(l < r->upper.size() ? r->upper[l] : kNaN);
    }
  }
  // Context: as many history rows as three times the new stretch, 12 to 48.
  const int context = std::clamp(3 * static_cast<int>(rows.size()), 12, 48);
  for (int t = std::max(0, first_origin - context); t < first_origin; ++t) {
    v.context_rows.push_back(t + 1);
    v.context_time.push_back(t < static_cast<int>(data.time.size()) ? data.time[t] : "");
    v.context_actual.push_back(data.observed(t) ? data.target[t] : kNaN);
  }
  return v;
}

// The one-sided 95% quantile of Student's t with `df` degrees of freedom (bisection on the cdf).
double t_quantile_95(double df) {
  double lo = 0.0, hi = 1000.0;
  for (int i = 0; i < 200; ++i) {
    const double mid = 0.5 * (lo + hi);
    (student_t_cdf(mid, df) < 0.95 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

std::string span_text(const std::vector<int>& h) {
  if (h.empty()) return "";
  if (h.size() == 1) return fmt::format("horizon {}", h.front());
  bool consecutive = true;
  for (size_t i = 1; i < h.size(); ++i) consecutive = consecutive && h[i] == h[i - 1] + 1;
  if (consecutive) return fmt::format("horizons {} to {}", h.front(), h.back());
  std::string s = "horizons ";
  for (size_t i = 0; i < h.size(); ++i) s += (i ? ", " : "") + std::to_string(h[i]);
  return s;
}

EvidenceNote evidence_note(const RevalidationResult& r) {
  EvidenceNote e;
  e.new_values = r.residuals.n;
  e.thin = e.new_values < kThinEvidenceRows;
  std::vector<int> acc;
  for (const auto& h : r.performance.by_horizon)
    if (!std::isfinite(h.test.statistic)) acc.push_back(h.horizon);
  if (!acc.empty())
    e.not_tested.push_back(fmt::format(
        "accuracy against training time at {} (the test needs at least 5 forecasts per horizon and "
        "a training-time MASE)",
        span_text(acc)));
  if (!std::isfinite(r.residuals.ljung_box.statistic))
    e.not_tested.push_back(
        fmt::format("Ljung-Box (lag {} needs more than {} residuals and more lags "
                    "than ARMA terms)",
                    r.residuals.ljung_box.lag, r.residuals.ljung_box.lag));
  if (!std::isfinite(r.residuals.mean_shift.statistic))
    e.not_tested.push_back("the residual mean (needs at least 2 residuals with some spread)");
  if (!std::isfinite(r.residuals.variance.ratio))
    e.not_tested.push_back("the residual variance (needs at least 2 residuals)");
  std::vector<int> dm;
  for (const auto& u : r.challengers.untested) dm.push_back(u.horizon);
  if (!dm.empty())
    e.not_tested.push_back(fmt::format(
        "the challenger comparison at {} (Diebold-Mariano needs h + 3 paired forecasts)",
        span_text(dm)));
  // Normal errors: |e| has coefficient of variation sqrt(pi / 2 - 1) = 0.755.
  e.detectable_ratio =
      e.new_values >= 2 ? 1.0 + t_quantile_95(e.new_values - 1.0) * 0.7555 / std::sqrt(e.new_values)
                        : kNaN;
  return e;
}

std::string thin_evidence_text(const EvidenceNote& e, Verdict verdict) {
  std::string s = fmt::format("note: the evidence is thin: {} new one-step error{}", e.new_values,
                              e.new_values == 1 ? "" : "s");
  if (!e.not_tested.empty()) {
    s += "; not tested for lack of rows: ";
    for (size_t i = 0; i < e.not_tested.size(); ++i) s += (i ? "; " : "") + e.not_tested[i];
  }
  if (std::isfinite(e.detectable_ratio))
    s += fmt::format(
        ". With {} errors only forecast errors about {:.1f} times those at training "
        "would stand out (one-sided 5%, normal errors)",
        e.new_values, e.detectable_ratio);
  s += verdict == Verdict::keep ? "; so keep means no alarm yet rather than confirmation"
                                : "; the verdict rests on the tests that ran";
  return s;
}

}  // namespace

std::string_view to_string(Verdict v) {
  switch (v) {
    case Verdict::keep:
      return "keep";
    case Verdict::refit:
      return "refit";
    case Verdict::replace:
      return "replace";
  }
  return "?";
}

void RevalidateOptions::validate() const {
  if (!(alpha > 0.0 && alpha < 1.0))
    throw InputError(fmt::format("revalidate: alpha {} must lie strictly between 0 and 1", alpha));
  if (!(drift_threshold > 0.0) || !std::isfinite(drift_threshold))
    throw InputError(
        fmt::format("revalidate: drift threshold {} must be a positive number of "
                    "standard errors",
                    drift_threshold));
  if (ljung_box_lag < 0)
    throw InputError(
        fmt::format("revalidate: Ljung-Box lag {} must be >= 0 (0 = automatic)", ljung_box_lag));
  if (comparison_refit < 0)
    throw InputError(
        fmt::format("revalidate: comparison refit interval {} must be >= 0", comparison_refit));
  if (min_new_rows < 1)
    throw InputError(
        fmt::format("revalidate: the minimum of new rows {} must be at least 1 "
                    "(revalidate.min_new_rows, --min-new-rows)",
                    min_new_rows));
}

RevalidationResult revalidate(const FittedModel& model, const SeriesData& file_data,
                              const RunConfig& config, const RevalidateOptions& options) {
  options.validate();
  const auto t0 = std::chrono::steady_clock::now();
  RevalidationResult out;
  out.alpha = options.alpha;
  out.series = file_data.target_name;
  out.deployed_label = model_label(model.spec);
  // From here on the full history: the file, or the training rows it lacks put back in front.
  // The model's detected effects become columns again (new_effects.h).
  const SeriesData data =
      with_model_effects(model, check_history(model, file_data, config, options, out.history));
  const int threads = options.threads > 0 ? options.threads : config.search.threads;

  // Horizon and levels: the config's backtest section, else the model's own backtest, else 1.
  BacktestOptions o = backtest_options(config, data.rows());
  if (!config.backtest.enabled && model.backtest.is_object()) {
    o.horizon = model.backtest.value("horizon", o.horizon);
    if (model.backtest.contains("levels"))
      o.levels = model.backtest["levels"].get<std::vector<double>>();
  }
  o.first_origin = out.history.first_scored_row - 1;  // before the training rows end: ragged edge
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
    if (ch.chosen_key.empty()) ch.chosen_key = row.key;
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
  if (ch.has_challenger)
    candidates.push_back(
        candidate_from_spec("challenger: " + ch.challenger_key, ch.challenger_spec, config));
  candidates.push_back(seasonal_naive_candidate(o.season));
  out.comparison = run_backtest(data, candidates, o);
  const auto& deployed = out.comparison.models[kDeployed];
  if (deployed.production.records.empty())
    throw NumericalError(
        fmt::format("the deployed model gave no forecast on the new rows: {}", deployed.note));

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
  out.residuals = residual_checks(model, data, data.rows() - o.first_origin, options, deployed);
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
      if (static_cast<int>(a.loss_a.size()) <= h + 2) {
        ch.untested.push_back({h, static_cast<int>(a.loss_a.size())});
        continue;
      }
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
    ch.note += (ch.note.empty() ? "" : "; ") +
               std::string("no challenger other than the deployed structure fitted");
  }
  out.comparison.comparisons = rows;

  out.new_period = new_period_view(data, deployed, o.first_origin);
  out.evidence = evidence_note(out);

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
    refit_reasons.push_back(
        fmt::format("new-period residuals are autocorrelated: Ljung-Box Q = {:.2f} at lag {} (df "
                    "{}), p = {} < {:.4f}",
                    res.ljung_box.statistic, res.ljung_box.lag, res.ljung_box.df,
                    fmt_p(res.ljung_box.p_value), level));
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
      out.reasons.push_back(
          fmt::format("and better than the deployed structure re-fitted at horizon {} (one-sided p "
                      "= {} < {:.4f}), "
                      "so a re-fit alone would not catch up",
                      r.horizon, fmt_p(r.p_vs_refit), level));
      for (auto& s : refit_reasons) out.reasons.push_back("also: " + s);
    } else {
      refit_reasons.push_back(
          text + ", but not significantly better than the deployed structure re-fitted");
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
        out.reasons.push_back(
            fmt::format("the deployed structure ranks {} of {} in the fresh search ({})",
                        ch.deployed_rank, ch.candidates, ch.ranked_by));
    }
  }
  if (out.evidence.thin) out.reasons.push_back(thin_evidence_text(out.evidence, out.verdict));
  if (out.history.late_values > 0)
    out.reasons.push_back(fmt::format(
        "note: {} target value{} missing at training ({}) {} in now and {} scored as new",
        out.history.late_values, out.history.late_values == 1 ? "" : "s",
        out.history.ragged_edge > 0 ? "the ragged edge" : "gaps left out of the likelihood",
        out.history.late_values == 1 ? "is" : "are", out.history.late_values == 1 ? "is" : "are"));
  if (out.history.revised)
    out.reasons.push_back(
        "note: the training rows differ from the data the model was trained on "
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
  j["decision"] = {
      {"alpha", r.alpha},
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
  j["history"] = {
      {"data_file", h.source_file},
      {"training_rows", h.training_rows},
      {"rows", h.rows},
      {"new_rows", h.new_rows},
      {"training_first_time", h.training_first_time},
      {"training_last_time", h.training_last_time},
      {"new_first_time", h.new_first_time},
      {"new_last_time", h.new_last_time},
      {"fingerprint_expected", h.expected_fingerprint},
      {"fingerprint_found", h.found_fingerprint},
      {"history_revised", h.revised},
      {"file_rows", h.file_rows},
      {"checked", h.checked_by_value ? "value by value against the training rows in the model file"
                                     : "fingerprint of the first training rows (older model file)"},
      {"first_training_row_in_file", h.first_training_row},
      {"training_rows_prepended", h.prepended},
      {"file_rows_before_training_start", h.dropped_leading},
      {"overlap_rows", h.overlap_rows},
      {"late_values", h.late_values},
      {"filled_values_now_observed", h.refilled},
      {"ragged_edge_rows", h.ragged_edge},
      {"first_scored_row", h.first_scored_row},
      {"new_observed_values", h.new_observed},
      {"revised_values", h.revision_count},
      {"revisions", h.revisions}};
  const auto& p = r.performance;
  json perf = {{"baseline", p.baseline_source},
               {"first_scored_row", p.first_origin + 1},
               {"origins", p.origins},
               {"score_new_rows", num(p.score)},
               {"score_training_time", num(p.baseline_score)},
               {"test",
                "one-sided, new-period mean scaled error vs training-time MASE, "
                "long-run variance with h-1 lags, Student t (n-1 df)"}};
  perf["by_horizon"] = json::array();
  for (const auto& row : p.by_horizon) {
    json e = {{"horizon", row.horizon},
              {"count", row.count},
              {"mae", num(row.mae)},
              {"mae_training", num(row.baseline_mae)},
              {"mase", num(row.mase)},
              {"mase_training", num(row.baseline_mase)},
              {"mase_ratio", num(row.test.ratio)}};
    for (size_t l = 0; l < p.levels.size(); ++l) {
      e["coverage_" + level_name(p.levels[l])] =
          l < row.coverage.size() ? num(row.coverage[l]) : json(nullptr);
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
  json drift = {{"threshold_se", r.drift.threshold},
                {"refit_status", r.drift.fit_status},
                {"refit_message", r.drift.fit_message}};
  drift["parameters"] = json::array();
  for (const auto& d : r.drift.parameters)
    drift["parameters"].push_back({{"parameter", d.name},
                                   {"deployed", num(d.original)},
                                   {"deployed_se", num(d.original_se)},
                                   {"refit", num(d.refit)},
                                   {"refit_se", num(d.refit_se)},
                                   {"change", num(d.change)},
                                   {"change_in_se", num(d.change_in_se)},
                                   {"flagged", d.flagged}});
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
    rj["coverage_horizon_1"].push_back({{"level", c.level},
                                        {"count", c.count},
                                        {"inside", c.inside},
                                        {"observed", num(c.observed)},
                                        {"p_value", num(c.p_value)}});
  j["residuals"] = rj;
  j["new_effects"] = new_effects_json(r.new_effects);
  const auto& ch = r.challengers;
  json cj = {{"candidates", ch.candidates},
             {"ranked_by", ch.ranked_by},
             {"deployed", ch.deployed_key},
             {"deployed_rank", ch.deployed_rank > 0 ? json(ch.deployed_rank) : json(nullptr)},
             {"deployed_in_grid", ch.deployed_in_grid},
             {"search_chosen", ch.chosen_key},
             {"best_challenger", ch.has_challenger ? json(ch.challenger_key) : json(nullptr)},
             {"score_deployed", num(ch.score_deployed)},
             {"score_deployed_refit", num(ch.score_refit)},
             {"score_challenger", num(ch.score_challenger)},
             {"better_than_deployed", ch.better_than_deployed},
             {"better_than_refit", ch.better_than_refit}};
  if (!ch.note.empty()) cj["note"] = ch.note;
  cj["untested_horizons"] = json::array();
  for (const auto& u : ch.untested)
    cj["untested_horizons"].push_back(
        {{"horizon", u.horizon},
         {"pairs", u.pairs},
         {"reason", fmt::format("{} paired forecasts; the test needs at least {} (h + 3)", u.pairs,
                                u.horizon + 3)}});
  cj["comparisons"] = json::array();
  for (const auto& c : ch.by_horizon)
    cj["comparisons"].push_back({{"horizon", c.horizon},
                                 {"n", c.vs_deployed.n},
                                 {"dm_vs_deployed", num(c.vs_deployed.statistic)},
                                 {"p_vs_deployed", num(c.p_vs_deployed)},
                                 {"dm_vs_refit", num(c.vs_refit.statistic)},
                                 {"p_vs_refit", num(c.p_vs_refit)}});
  j["challengers"] = cj;
  const auto& e = r.evidence;
  j["evidence"] = {{"thin", e.thin},
                   {"new_one_step_errors", e.new_values},
                   {"not_tested", e.not_tested},
                   {"detectable_error_ratio", num(e.detectable_ratio)}};
  const auto& v = r.new_period;
  json np = {{"levels", v.levels}, {"rows", v.rows}, {"time", v.time}};
  auto nums = [](const std::vector<double>& xs) {
    json a = json::array();
    for (double x : xs) a.push_back(num(x));
    return a;
  };
  np["actual"] = nums(v.actual);
  np["forecast"] = nums(v.forecast);
  np["lower"] = json::array();
  np["upper"] = json::array();
  for (size_t l = 0; l < v.levels.size(); ++l) {
    np["lower"].push_back(nums(v.lower[l]));
    np["upper"].push_back(nums(v.upper[l]));
  }
  np["context_rows"] = v.context_rows;
  np["context_time"] = v.context_time;
  np["context_actual"] = nums(v.context_actual);
  j["new_period"] = np;
  j["files"] = {
      {"refit_model", r.refit_model ? json(kRefitModelFile) : json(nullptr)},
      {"challenger_model", r.challenger_model ? json(kChallengerModelFile) : json(nullptr)}};
  j["seconds"] = r.seconds;
  return j;
}

namespace {

// A number for the terminal, or `missing` (never a raw "nan").
std::string shown(double v, const char* spec, const char* missing = "-") {
  return std::isfinite(v) ? fmt::format(fmt::runtime(spec), v) : std::string(missing);
}

}  // namespace

std::string summary_text(const RevalidationResult& r) {
  std::string s;
  auto line = [&s](const std::string& t) { s += t + "\n"; };
  const auto& h = r.history;
  line(fmt::format("{} · deployed {}", r.series, r.deployed_label));
  line(fmt::format(
      "  trained on {} rows{}; {} new rows{}{}", h.training_rows,
      h.training_last_time.empty()
          ? ""
          : fmt::format(" ({} to {})", h.training_first_time, h.training_last_time),
      h.new_rows,
      h.new_first_time.empty() ? "" : fmt::format(" ({} to {})", h.new_first_time, h.new_last_time),
      h.revised ? "; TRAINING ROWS REVISED" : ""));
  if (h.checked_by_value && h.prepended > 0)
    line(
        fmt::format("  the file starts at training row {}: rows 1 to {} taken from the model file, "
                    "{} overlapping rows checked value by value",
                    h.first_training_row, h.prepended, h.overlap_rows));
  if (h.ragged_edge > 0)
    line(fmt::format(
        "  the last {} training target value{} missing (ragged edge); {} in now; "
        "scoring starts at row {}",
        h.ragged_edge, h.ragged_edge == 1 ? " was" : "s were", h.late_values, h.first_scored_row));
  for (const auto& rev : h.revisions) line("  revised: " + rev);
  line("");
  line(fmt::format("Verdict: {}", to_string(r.verdict)));
  for (const auto& reason : r.reasons) line("  - " + reason);
  line(fmt::format("  ({} tests can move the verdict, each at {:.4f} = {:g} / {})", r.tests,
                   r.alpha_per_test, r.alpha, std::max(r.tests, 1)));
  line("");
  const auto& p = r.performance;
  line(
      fmt::format("Deployed model unchanged on the new rows ({} origins from row {}; training-time "
                  "accuracy: {})",
                  p.origins, p.first_origin + 1, p.baseline_source));
  std::string head = fmt::format("  {:>2} {:>5} {:>9} {:>9} {:>9} {:>6}", "h", "n", "MAE", "MASE",
                                 "then", "ratio");
  for (double l : p.levels) head += fmt::format(" {:>7}", "cov" + level_name(l));
  head += fmt::format(" {:>10}", "p worse");
  line(head);
  std::vector<std::string> why;
  for (const auto& row : p.by_horizon) {
    std::string t =
        fmt::format("  {:>2} {:>5} {:>9} {:>9} {:>9} {:>6}", row.horizon, row.count,
                    shown(row.mae, "{:.4g}"), shown(row.mase, "{:.4f}"),
                    shown(row.baseline_mase, "{:.4f}"), shown(row.test.ratio, "{:.2f}"));
    for (double c : row.coverage) t += fmt::format(" {:>7}", shown(c, "{:.3f}"));
    t += fmt::format(" {:>10}",
                     std::isfinite(row.test.statistic) ? fmt_p(row.test.p_value) : "not tested");
    if (row.degraded) t += "  *";
    line(t);
    if (!std::isfinite(row.test.statistic) && !row.test.note.empty())
      why.push_back(fmt::format("h {}: {}", row.horizon, row.test.note));
  }
  if (!why.empty()) {
    // One line for the reason shared by every horizon, else one per horizon.
    bool same = true;
    for (const auto& w : why)
      same = same && w.substr(w.find(':')) == why.front().substr(why.front().find(':'));
    if (same && why.size() > 1)
      line(fmt::format("  not tested at {} horizons:{}", why.size(),
                       why.front().substr(why.front().find(':') + 1)));
    else
      for (const auto& w : why) line("  not tested, " + w);
  }
  line("");
  line(fmt::format("Parameters re-fitted on all rows (status {}; flag beyond {:g} original SEs)",
                   r.drift.fit_status, r.drift.threshold));
  line(fmt::format("  {:<22} {:>11} {:>9} {:>11} {:>9}", "parameter", "deployed", "se", "re-fitted",
                   "change/se"));
  for (const auto& d : r.drift.parameters)
    line(fmt::format("  {:<22} {:>11} {:>9} {:>11} {:>9}{}", d.name, shown(d.original, "{:.5g}"),
                     shown(d.original_se, "{:.3g}"), shown(d.refit, "{:.5g}"),
                     shown(d.change_in_se, "{:.2f}"), d.flagged ? "  *" : ""));
  line("");
  const auto& res = r.residuals;
  line(fmt::format("Residuals of the new rows (n = {})", res.n));
  if (std::isfinite(res.ljung_box.statistic))
    line(fmt::format("  Ljung-Box Q({}) = {:.2f}, df {}, p = {}", res.ljung_box.lag,
                     res.ljung_box.statistic, res.ljung_box.df, fmt_p(res.ljung_box.p_value)));
  else
    line(fmt::format(
        "  Ljung-Box not tested: lag {} with {} residual{} and {} degree{} of freedom (needs more "
        "residuals than the lag and at least 1 degree of freedom)",
        res.ljung_box.lag, res.n, res.n == 1 ? "" : "s", res.ljung_box.df,
        res.ljung_box.df == 1 ? "" : "s"));
  if (std::isfinite(res.mean_shift.statistic))
    line(fmt::format("  mean {:.4g}, t = {:.2f}, p = {}", res.mean_shift.mean,
                     res.mean_shift.statistic, fmt_p(res.mean_shift.p_value)));
  else
    line(fmt::format("  mean {} not tested (needs at least 2 residuals with some spread)",
                     shown(res.mean_shift.mean, "{:.4g}")));
  if (std::isfinite(res.variance.ratio))
    line(fmt::format("  variance {:.4g} vs fitted {:.4g} (ratio {:.2f}), p = {}",
                     res.variance.new_variance, res.variance.reference_variance, res.variance.ratio,
                     fmt_p(res.variance.p_value)));
  else
    line("  variance not tested (needs at least 2 residuals)");
  for (const auto& c : res.coverage)
    line(fmt::format("  1-step {}% intervals held {} of {}{}, p = {}", level_name(c.level),
                     c.inside, c.count,
                     std::isfinite(c.observed) ? fmt::format(" ({:.1f}%)", 100.0 * c.observed) : "",
                     fmt_p(c.p_value)));
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
  line(fmt::format("  deployed structure ranks {}{}",
                   ch.deployed_rank > 0 ? std::to_string(ch.deployed_rank) : "-",
                   ch.deployed_in_grid ? "" : " (outside the grid)"));
  if (ch.has_challenger) {
    line(fmt::format("  best challenger {}", ch.challenger_key));
    line(fmt::format("  new-row score: deployed {}, deployed re-fitted {}, challenger {}",
                     shown(ch.score_deployed, "{:.4f}"), shown(ch.score_refit, "{:.4f}"),
                     shown(ch.score_challenger, "{:.4f}")));
    for (const auto& c : ch.by_horizon)
      line(fmt::format(
          "  h {:>2}: better than deployed p = {}, better than re-fitted p = {}", c.horizon,
          fmt_p(c.p_vs_deployed),
          std::isfinite(c.vs_refit.statistic) ? fmt_p(c.p_vs_refit) : std::string("not tested")));
    if (!ch.untested.empty()) {
      std::vector<int> hs;
      for (const auto& u : ch.untested) hs.push_back(u.horizon);
      line(fmt::format(
          "  Diebold-Mariano tests cover {} of {} horizons: not tested at {}, where the new "
          "period gives {} paired forecast{} and the test needs h + 3 (its long-run variance "
          "uses h - 1 autocovariances)",
          ch.by_horizon.size(), ch.by_horizon.size() + ch.untested.size(), span_text(hs),
          ch.untested.front().pairs == ch.untested.back().pairs
              ? std::to_string(ch.untested.front().pairs)
              : fmt::format("{} to {}", ch.untested.back().pairs, ch.untested.front().pairs),
          ch.untested.front().pairs == 1 ? "" : "s"));
    }
  }
  if (!ch.note.empty()) line("  note: " + ch.note);
  return s;
}

}  // namespace lagsieve
