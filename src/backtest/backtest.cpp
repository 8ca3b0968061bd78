#include "backtest/backtest.h"

#include <tbb/info.h>
#include <tbb/parallel_for.h>
#include <tbb/task_arena.h>

#include <fmt/format.h>
#include <algorithm>
#include <cmath>
#include <set>

#include "core/error.h"
#include "core/names.h"
#include "data/events.h"
#include "evaluation/distributions.h"
#include "forecast/forecast.h"
#include "io/csv.h"
#include "model/likelihood.h"
#include "model/spec_from_config.h"

namespace lagsieve {

namespace {

std::vector<double> future_values(const SeriesData& data, const std::string& name, int from,
                                  int count) {
  const int index = data.input_index(name);
  if (index < 0) return {};
  const auto& u = data.inputs[index];
  return {u.begin() + from, u.begin() + from + count};
}

// Warm-start values for `spec` from a fit of a spec with the same noise model but perhaps other
// inputs (detected effects enter as the origins pass them): inputs matched by name, new ones 0.
ModelParams warm_params(const ModelSpec& spec, const FittedModel& previous) {
  if (previous.spec.inputs.size() == spec.inputs.size()) return previous.params;
  ModelParams p = zero_params(spec);
  const ModelParams& q = previous.params;
  p.constant = q.constant;
  p.phi = q.phi;
  p.theta = q.theta;
  p.seasonal_phi = q.seasonal_phi;
  p.seasonal_theta = q.seasonal_theta;
  p.sigma2 = q.sigma2;
  for (size_t i = 0; i < spec.inputs.size(); ++i)
    for (size_t k = 0; k < previous.spec.inputs.size() && k < q.inputs.size(); ++k)
      if (previous.spec.inputs[k].name == spec.inputs[i].name) p.inputs[i] = q.inputs[k];
  return p;
}

// Fits the candidate's spec on one window; warm-started from `previous` when given.
std::optional<FittedModel> fit_window(const BacktestCandidate& c, const SeriesData& window,
                                      int start, const std::optional<FittedModel>& previous) {
  const auto problem = make_problem(window, c.spec, start);
  FitOptions options;
  options.standard_errors = false;
  options.diagnostics = false;
  if (previous) options.warm_start = warm_params(c.spec, *previous);
  const FitResult fit = fit_model(problem, options);
  if (!fit.usable()) return std::nullopt;
  FittedModel m;
  m.spec = c.spec;
  m.params = fit.params;
  m.inputs = c.inputs;
  m.start = fit.start;
  for (size_t i = 0; i < c.inputs.size(); ++i) {
    const auto& use = c.inputs[i];
    if (use.is_event || use.future != FutureMode::forecast) continue;
    const int index = window.input_index(use.name);
    const auto& orders = i < c.input_orders.size() ? c.input_orders[i] : InputModelConfig{};
    m.input_models.push_back(
        fit_input_model(use.name, window.inputs[index], c.spec.differencing, orders.p, orders.q));
  }
  return m;
}

// Records of the forecasts for rows origin.. ; `first_row` is the row of f's first step (before
// the origin when the window ends with missing target values: those steps are not scored).
// A row whose target was not observed (missing, or filled by interpolation) is never scored.
void add_records(ForecastRecords& out, int origin, const ForecastResult& f, const SeriesData& data,
                 double scale, int first_row) {
  for (size_t i = 0; i < f.median.size(); ++i) {
    const int row = first_row + static_cast<int>(i);
    if (row < origin || row >= data.rows() || !data.observed(row)) continue;
    const size_t h = static_cast<size_t>(row - origin);
    ForecastRecord r;
    r.origin = origin;
    r.horizon = static_cast<int>(h) + 1;
    r.forecast = f.median[i];
    r.actual = data.target[row];
    for (size_t l = 0; l < f.levels.size(); ++l) {
      r.lower.push_back(f.lower[l][i]);
      r.upper.push_back(f.upper[l][i]);
    }
    r.scale = scale;
    out.records.push_back(std::move(r));
  }
}

// Seasonal naive: y_{T+h} = y_{T+h-m(k+1)}, k = floor((h-1)/m); Gaussian intervals with
// sd sigma sqrt(k+1), sigma from the window's seasonal differences.
void seasonal_naive(ModelBacktest& out, const SeriesData& data, int origin, int from, int horizon,
                    int season, const std::vector<double>& levels, double scale) {
  const auto& y = data.target;
  double ss = 0.0;
  int count = 0;
  for (int t = from + season; t < origin; ++t) {
    if (!data.observed(t) || !data.observed(t - season)) continue;
    ss += (y[t] - y[t - season]) * (y[t] - y[t - season]);
    ++count;
  }
  const double sigma = count > 0 ? std::sqrt(ss / count) : 0.0;
  ForecastResult f;
  f.levels = levels;
  f.lower.assign(levels.size(), {});
  f.upper.assign(levels.size(), {});
  for (int h = 1; h <= horizon; ++h) {
    int k = (h - 1) / season;
    // The same season's last observed value (further back past missing values).
    while (origin + h - 1 - season * (k + 1) > from &&
           !data.observed(origin + h - 1 - season * (k + 1)))
      ++k;
    const double point = y[origin + h - 1 - season * (k + 1)];
    f.median.push_back(point);
    for (size_t l = 0; l < levels.size(); ++l) {
      const double half = normal_quantile(0.5 + levels[l] / 2.0) * sigma * std::sqrt(k + 1.0);
      f.lower[l].push_back(point - half);
      f.upper[l].push_back(point + half);
    }
  }
  add_records(out.production, origin, f, data, scale, origin);
  add_records(out.oracle, origin, f, data, scale, origin);
}

void score_model(ModelBacktest& m, const BacktestOptions& o);

}  // namespace

BacktestCandidate known_at_origin(const BacktestCandidate& c, const SeriesData& window, int from,
                                  int origin) {
  BacktestCandidate out = c;
  out.spec.inputs.clear();
  out.inputs.clear();
  out.input_orders.clear();
  for (size_t i = 0; i < c.spec.inputs.size(); ++i) {
    bool keep = true;
    if (i < c.inputs.size() && c.inputs[i].effect) {
      const int row = c.inputs[i].effect->row;
      // Constant over the window: it began before a sliding window (absorbed by the level, or
      // zero); kept only as the level of a model without constant or differencing.
      bool constant = true;
      const int index = window.input_index(c.spec.inputs[i].name);
      if (index >= 0)
        for (double v : window.inputs[index]) constant = constant && v == window.inputs[index][0];
      const bool is_level = index >= 0 && !window.inputs[index].empty() &&
                            window.inputs[index][0] != 0.0 && !c.spec.constant &&
                            c.spec.differencing.lost() == 0;
      keep = row < origin && !(constant && !is_level && row <= from);
    }
    if (!keep) continue;
    out.spec.inputs.push_back(c.spec.inputs[i]);
    if (i < c.inputs.size()) out.inputs.push_back(c.inputs[i]);
    if (i < c.input_orders.size()) out.input_orders.push_back(c.input_orders[i]);
  }
  return out;
}

namespace {

ModelBacktest backtest_one(const SeriesData& data, const BacktestCandidate& c,
                           const BacktestOptions& o, const std::vector<int>& origins) {
  ModelBacktest out;
  out.name = c.name;
  out.benchmark = c.benchmark;
  out.production.levels = o.levels;
  out.oracle.levels = o.levels;
  std::optional<FittedModel> current = c.fixed;
  std::optional<FittedModel> last_fit;
  // One origin: its forecasts (or its failure) added to `out`.
  const auto run_origin = [&](size_t k) {
    const int origin = origins[k];
    const int from = o.window == WindowKind::sliding ? std::max(0, origin - o.window_length) : 0;
    const int horizon = std::min(o.horizon, data.rows() - origin);
    const SeriesData window = slice_rows(data, from, origin);
    const double scale = mase_scale(window.target, o.season);
    if (c.kind == BacktestCandidate::Kind::seasonal_naive) {
      seasonal_naive(out, data, origin, from, horizon, o.season, o.levels, scale);
      return;
    }
    try {
      const bool refit_now =
          !c.fixed && (o.refit > 0 ? k % static_cast<size_t>(o.refit) == 0 : k == 0);
      if (refit_now) {
        auto fitted =
            fit_window(known_at_origin(c, window, from, origin), window, o.start, last_fit);
        if (fitted) {
          current = std::move(fitted);
          last_fit = current;
        }
      }
      if (!current) {
        ++out.failed_origins;
        out.failed_at.push_back(origin);
        if (out.note.empty()) out.note = "no usable fit from the window before this origin";
        return;
      }
      ForecastOptions fo;
      fo.horizon = horizon;
      fo.levels = o.levels;
      std::vector<InputFuture> production, oracle;
      for (const auto& use : current->inputs) {
        const auto actual = future_values(data, use.name, origin, horizon);
        oracle.push_back({use.name, actual});
        if (use.is_event || use.future == FutureMode::known)
          production.push_back({use.name, actual});
        else if (use.known_steps > 0)
          production.push_back(
              {use.name, std::vector<double>(actual.begin(),
                                             actual.begin() + std::min(use.known_steps, horizon))});
      }
      const auto fp = forecast(*current, window, production, fo);
      add_records(out.production, origin, fp, data, scale, from + fp.origin);
      fo.oracle_inputs = true;
      const auto fx = forecast(*current, window, oracle, fo);
      add_records(out.oracle, origin, fx, data, scale, from + fx.origin);
    } catch (const std::exception& e) {
      ++out.failed_origins;
      out.failed_at.push_back(origin);
      if (out.note.empty()) out.note = e.what();
    }
  };
  for (size_t k = 0; k < origins.size(); ++k) {
    // Outside the origin's try: a cancelled run is not a failed origin.
    if (o.cancel && o.cancel->load()) throw Cancelled();
    run_origin(k);
    if (o.origin_done) o.origin_done();
  }
  score_model(out, o);
  return out;
}

void score_model(ModelBacktest& m, const BacktestOptions& o) {
  if (!m.production.records.empty()) {
    m.production_accuracy = accuracy_table(m.production);
    m.oracle_accuracy = accuracy_table(m.oracle);
    m.score = backtest_score(m.production_accuracy, o.score);
  } else {
    m.production_accuracy = {};
    m.oracle_accuracy = {};
    m.score = std::numeric_limits<double>::quiet_NaN();
  }
}

// "120, 123, 126" or "120..168 (17 origins)" for a run of equal steps.
std::string origin_list(const std::vector<int>& v, int step) {
  if (v.size() > 4) {
    bool regular = true;
    for (size_t i = 1; i < v.size(); ++i) regular = regular && v[i] - v[i - 1] == step;
    if (regular) return fmt::format("{}..{} every {}", v.front(), v.back(), step);
  }
  std::string out;
  for (size_t i = 0; i < v.size(); ++i) {
    if (i == 6 && v.size() > 7) return out + fmt::format(", ... ({} in all)", v.size());
    out += (i ? ", " : "") + std::to_string(v[i]);
  }
  return out;
}

// Keeps in every model only the origins every model forecast from (models that forecast from
// no origin at all are failures and do not restrict the others), re-scores, and says why.
void score_on_common_origins(BacktestResult& result, const BacktestOptions& o,
                             const SeriesData& data) {
  std::vector<std::set<int>> from(result.models.size());
  for (size_t i = 0; i < result.models.size(); ++i) {
    for (const auto& r : result.models[i].production.records) from[i].insert(r.origin);
    std::set<int> oracle;
    for (const auto& r : result.models[i].oracle.records) oracle.insert(r.origin);
    std::erase_if(from[i], [&](int origin) { return !oracle.count(origin); });
  }
  std::vector<int> common, dropped;
  for (int origin : result.origins) {
    bool all = true;
    for (const auto& f : from) all = all && (f.empty() || f.count(origin));
    (all ? common : dropped).push_back(origin);
  }
  for (size_t i = 0; i < result.models.size(); ++i)
    if (from[i].empty())
      result.warnings.push_back(
          {"backtest_model_left_out",
           fmt::format("backtest: {} forecast from none of the {} origins and is left out of the "
                       "comparison: {}",
                       result.models[i].name, result.origins.size(), result.models[i].note),
           {{"origins", static_cast<double>(result.origins.size())}},
           {{"model", result.models[i].name}}});
  if (dropped.empty()) return;
  const std::set<int> keep(common.begin(), common.end());
  for (auto& m : result.models) {
    for (auto* recs : {&m.production, &m.oracle})
      std::erase_if(recs->records, [&](const ForecastRecord& r) { return !keep.count(r.origin); });
    score_model(m, o);
  }
  // The cause: the models that failed at a dropped origin, grouped by their first failure.
  std::vector<std::pair<std::string, std::vector<std::string>>> causes;  // message -> models
  for (size_t i = 0; i < result.models.size(); ++i) {
    const auto& m = result.models[i];
    if (from[i].empty()) continue;
    int count = 0;
    for (int origin : dropped) count += from[i].count(origin) ? 0 : 1;
    if (count == 0) continue;
    const std::string why = m.note.empty() ? "no usable fit" : m.note;
    auto it =
        std::find_if(causes.begin(), causes.end(), [&](const auto& c) { return c.first == why; });
    if (it == causes.end()) it = causes.insert(causes.end(), {why, {}});
    it->second.push_back(fmt::format("{} ({} origins)", m.name, count));
  }
  std::string causes_text;
  for (const auto& [why, models] : causes) {
    std::string names;
    for (size_t i = 0; i < models.size() && i < 3; ++i) names += (i ? "; " : "") + models[i];
    if (models.size() > 3) names += fmt::format("; and {} more", models.size() - 3);
    causes_text += fmt::format("{}{} could not forecast from them: {}",
                               causes_text.empty() ? "" : ". ", names, why);
  }
  std::string warning = fmt::format(
      "backtest: {} of {} origins ({}) dropped for every model and benchmark, so all are scored on "
      "the same {} origins: {}",
      dropped.size(), result.origins.size(), origin_list(dropped, o.step), common.size(),
      causes_text);
  Warning structured{"backtest_origins_dropped",
                     "",
                     {{"dropped", static_cast<double>(dropped.size())},
                      {"origins", static_cast<double>(result.origins.size())},
                      {"common", static_cast<double>(common.size())}},
                     {}};
  // Leading origins dropped (an event after the first origin, typically): where to start instead.
  if (!common.empty() && dropped.front() == result.origins.front()) {
    const int first = common.front();
    structured.numbers.emplace_back("suggested_first_origin", first);
    warning += fmt::format(
        ". The first origin from which every model forecasts is {} (window rows 1..{}{}); set "
        "backtest.first_origin: {} to start there",
        first, first, data.time.empty() ? "" : ", up to " + data.time[first - 1], first);
  }
  structured.message = std::move(warning);
  result.warnings.push_back(std::move(structured));
  result.dropped_origins = dropped;
  std::vector<std::string> times;
  for (size_t k = 0; k < result.origins.size(); ++k)
    if (keep.count(result.origins[k])) times.push_back(result.origin_times[k]);
  result.origins = common;
  result.origin_times = times;
}

std::string level_name(double level) { return fmt::format("{:g}", 100.0 * level); }

}  // namespace

BacktestOptions backtest_options(const RunConfig& config, int rows) {
  const auto& b = config.backtest;
  const std::string where = config.config_file.filename().string() + ": backtest.";
  BacktestOptions o;
  o.first_origin = b.first_origin > 0 ? b.first_origin : (2 * rows) / 3;
  o.step = b.step;
  o.horizon = b.horizon;
  o.window = b.window;
  o.window_length = b.window_length > 0 ? b.window_length : o.first_origin;
  o.refit = b.refit;
  o.levels = b.levels;
  o.season = config.differencing.seasonal > 0 ? config.differencing.period
             : config.noise.period > 1        ? config.noise.period
                                              : 1;
  if (o.horizon < 1) throw InputError(where + "horizon must be at least 1");
  if (o.step < 1) throw InputError(where + "step must be at least 1");
  if (o.first_origin >= rows)
    throw InputError(
        fmt::format("{}first_origin {} is at or beyond the last row ({} rows); choose "
                    "an origin inside the data",
                    where, o.first_origin, rows));
  if (o.first_origin < 3 * o.season + 10)
    throw InputError(fmt::format("{}first_origin {} leaves too little data to fit before it", where,
                                 o.first_origin));
  static const std::pair<const char*, AccuracyMeasure> scores[] = {
      {"mase", AccuracyMeasure::mase},
      {"rmse", AccuracyMeasure::rmse},
      {"mae", AccuracyMeasure::mae},
      {"interval_score", AccuracyMeasure::interval_score}};
  bool found = false;
  for (const auto& [name, measure] : scores)
    if (b.score == name) {
      o.score = measure;
      found = true;
    }
  if (!found)
    throw InputError(
        fmt::format("{}score '{}' is not one of mase, rmse, mae, interval_score", where, b.score));
  return o;
}

std::vector<EventOriginBound> event_origin_bounds(const RunConfig& config, const SeriesData& data,
                                                  int first_origin) {
  std::vector<EventOriginBound> out;
  for (const auto& ic : config.inputs) {
    if (!ic.is_event) continue;
    const int row = event_row(ic, data.time, config.config_file.filename().string());
    const int needed = row + ic.delay.max + ic.numerator.max + ic.denominator.max + 1;
    if (needed <= first_origin) continue;
    out.push_back({ic.name, row + 1, data.time.empty() ? std::string() : data.time[row], needed});
  }
  return out;
}

BacktestResult run_backtest(const SeriesData& data,
                            const std::vector<BacktestCandidate>& candidates,
                            const BacktestOptions& options) {
  BacktestResult result;
  result.levels = options.levels;
  for (int origin = options.first_origin; origin < data.rows(); origin += options.step) {
    result.origins.push_back(origin);
    result.origin_times.push_back(data.time.empty() ? std::to_string(origin)
                                                    : data.time[origin - 1]);
  }
  result.row_times = data.time;
  result.models.resize(candidates.size());
  run_in_arena(options.threads, [&] {
    tbb::parallel_for(size_t{0}, candidates.size(), [&](size_t i) {
      result.models[i] = backtest_one(data, candidates[i], options, result.origins);
    });
  });
  score_on_common_origins(result, options, data);
  double best = std::numeric_limits<double>::infinity();
  for (size_t i = 0; i < result.models.size(); ++i)
    if (!result.models[i].benchmark && std::isfinite(result.models[i].score) &&
        result.models[i].score < best) {
      best = result.models[i].score;
      result.chosen = static_cast<int>(i);
    }
  result.comparisons = compare_to_chosen(result);
  return result;
}

std::vector<ComparisonRow> compare_to_chosen(const BacktestResult& result) {
  std::vector<ComparisonRow> rows;
  if (result.chosen < 0) return rows;
  const auto& lead = result.models[result.chosen];
  for (size_t i = 0; i < result.models.size(); ++i) {
    if (static_cast<int>(i) == result.chosen) continue;
    const auto& other = result.models[i];
    if (other.production.records.empty()) continue;
    int max_h = 0;
    for (const auto& r : lead.production.records) max_h = std::max(max_h, r.horizon);
    for (int h = 1; h <= max_h; ++h) {
      const auto losses = paired_losses(lead.production, other.production, h, LossKind::squared);
      ComparisonRow row;
      row.chosen = lead.name;
      row.challenger = other.name;
      row.horizon = h;
      const int n = static_cast<int>(losses.loss_a.size());
      // The test needs more pairs than the horizon (the long-run variance uses h - 1 lags).
      if (n < h + 3) {
        row.tested = false;
        row.test.n = n;
        row.test.statistic = row.test.p_value = row.test.mean_difference = std::nan("");
        row.note = fmt::format(
            "not tested: {} paired forecasts at horizon {}, the test needs at least {} (h + 3: its "
            "variance uses {} autocovariances); more origins (a smaller backtest.step or an "
            "earlier "
            "first_origin) test more horizons",
            n, h, h + 3, h - 1);
      } else {
        DieboldMarianoOptions dmo;
        dmo.horizon = h;
        row.test = diebold_mariano(losses.loss_a, losses.loss_b, dmo);
        row.note = row.test.note;
      }
      rows.push_back(std::move(row));
    }
  }
  return rows;
}

namespace {

// Per origin: the mean over horizons of |error| / scale (the quantity MASE averages).
std::vector<double> scaled_error_by_origin(const ForecastRecords& records,
                                           const std::vector<int>& origins) {
  std::vector<double> out;
  for (int origin : origins) {
    double sum = 0.0;
    int n = 0;
    for (const auto& r : records.records)
      if (r.origin == origin) {
        sum += std::abs(r.actual - r.forecast) / r.scale;
        ++n;
      }
    out.push_back(n > 0 ? sum / n : std::nan(""));
  }
  return out;
}

}  // namespace

std::vector<InputValueRow> input_value(const SeriesData& data, const BacktestCandidate& chosen,
                                       const ModelBacktest& chosen_result,
                                       const BacktestOptions& options) {
  std::vector<BacktestCandidate> without;
  std::vector<size_t> left_out;  // the index of the input each run leaves out
  for (size_t i = 0; i < chosen.spec.inputs.size(); ++i) {
    // Detected effects are not inputs whose value is asked about (they mark events in the
    // history, which every model of the search shares).
    if (i < chosen.inputs.size() && chosen.inputs[i].effect) continue;
    left_out.push_back(i);
    BacktestCandidate c = chosen;
    c.fixed.reset();
    c.spec.inputs.erase(c.spec.inputs.begin() + i);
    c.inputs.erase(c.inputs.begin() + i);
    if (i < c.input_orders.size()) c.input_orders.erase(c.input_orders.begin() + i);
    c.name = fmt::format("{} without {}", chosen.name, chosen.spec.inputs[i].name);
    without.push_back(std::move(c));
  }
  const auto result = run_backtest(data, without, options);
  std::vector<InputValueRow> rows;
  const auto with = scaled_error_by_origin(chosen_result.production, result.origins);
  for (size_t i = 0; i < without.size(); ++i) {
    InputValueRow row;
    row.input = chosen.spec.inputs[left_out[i]].name;
    row.score_with = chosen_result.score;
    row.score_without = result.models[i].score;
    const auto alt = scaled_error_by_origin(result.models[i].production, result.origins);
    std::vector<double> a, b;
    for (size_t k = 0; k < with.size(); ++k)
      if (std::isfinite(with[k]) && std::isfinite(alt[k])) {
        a.push_back(with[k]);
        b.push_back(alt[k]);
      }
    DieboldMarianoOptions dmo;
    dmo.horizon = std::max(1, std::min(options.horizon, static_cast<int>(a.size()) / 3));
    if (a.size() >= static_cast<size_t>(dmo.horizon) + 3) row.test = diebold_mariano(a, b, dmo);
    rows.push_back(row);
  }
  return rows;
}

BacktestCandidate candidate_from_spec(const std::string& name, const ModelSpec& spec,
                                      const RunConfig& config) {
  BacktestCandidate c;
  c.name = name;
  c.spec = spec;
  for (const auto& term : spec.inputs)
    for (const auto& ic : config.inputs)
      if (ic.name == term.name) {
        InputUse use;
        use.name = ic.name;
        use.is_event = ic.is_event;
        use.shape = ic.shape;
        use.at = ic.at;
        use.future = ic.is_event ? FutureMode::known : ic.future;
        use.known_steps = ic.known_steps;
        c.inputs.push_back(use);
        c.input_orders.push_back(ic.own_model);
      }
  return c;
}

BacktestCandidate candidate_from_model(const std::string& name, const FittedModel& model) {
  BacktestCandidate c;
  c.name = name;
  c.spec = model.spec;
  c.inputs = model.inputs;
  for (const auto& use : model.inputs) {
    InputModelConfig orders;
    if (const auto* im = model.input_model(use.name)) {
      orders.p = im->p;
      orders.q = im->q;
    }
    c.input_orders.push_back(orders);
  }
  c.fixed = model;
  return c;
}

BacktestCandidate seasonal_naive_candidate(int season) {
  BacktestCandidate c;
  c.name = season > 1 ? fmt::format("seasonal naive (period {})", season) : "naive (last value)";
  c.kind = BacktestCandidate::Kind::seasonal_naive;
  c.benchmark = true;
  return c;
}

// The target's time stamp of 0-based row `row`, else its 1-based row number.
std::string target_time(const BacktestResult& r, int row) {
  return row < static_cast<int>(r.row_times.size()) && !r.row_times[row].empty()
             ? r.row_times[row]
             : std::to_string(row + 1);
}

std::string backtest_csv(const BacktestResult& r) {
  std::string out = "model,mode,origin,origin_time,horizon,time,forecast,actual";
  for (double l : r.levels) out += fmt::format(",lower_{0},upper_{0}", level_name(l));
  out += "\n";
  for (const auto& m : r.models)
    for (const auto* mode : {"production", "oracle"}) {
      const auto& recs = std::string(mode) == "production" ? m.production : m.oracle;
      for (const auto& rec : recs.records) {
        size_t k = 0;
        while (k < r.origins.size() && r.origins[k] != rec.origin) ++k;
        const std::string otime = k < r.origin_times.size() ? r.origin_times[k] : "";
        out += fmt::format("{},{},{},{},{},{},{},{}", csv_field(m.name), mode, rec.origin, otime,
                           rec.horizon, target_time(r, rec.origin + rec.horizon - 1),
                           csv_number(rec.forecast), csv_number(rec.actual));
        for (size_t l = 0; l < rec.lower.size(); ++l)
          out += fmt::format(",{},{}", csv_number(rec.lower[l]), csv_number(rec.upper[l]));
        out += "\n";
      }
    }
  return out;
}

std::string accuracy_csv(const BacktestResult& r) {
  std::string out = "model,mode,horizon,count,mae,rmse,mase";
  for (double l : r.levels) out += fmt::format(",coverage_{}", level_name(l));
  for (double l : r.levels) out += fmt::format(",interval_score_{}", level_name(l));
  out += ",score\n";
  for (const auto& m : r.models)
    for (const auto* mode : {"production", "oracle"}) {
      const bool prod = std::string(mode) == "production";
      const auto& table = prod ? m.production_accuracy : m.oracle_accuracy;
      auto emit = [&](const AccuracyRow& row) {
        out += fmt::format("{},{},{},{},{},{},{}", csv_field(m.name), mode, row.horizon, row.count,
                           csv_number(row.mae), csv_number(row.rmse), csv_number(row.mase));
        for (double c : row.coverage) out += "," + csv_number(c);
        for (double s : row.interval_score) out += "," + csv_number(s);
        out += "," + (row.horizon == 0 && prod ? csv_number(m.score) : std::string()) + "\n";
      };
      if (table.by_horizon.empty()) continue;
      emit(table.overall);
      for (const auto& row : table.by_horizon) emit(row);
    }
  return out;
}

std::string comparisons_csv(const BacktestResult& r) {
  std::string out =
      "chosen,challenger,horizon,loss,n,mean_difference,statistic,p_value,status,note\n";
  for (const auto& c : r.comparisons)
    out +=
        fmt::format("{},{},{},{},{},{},{},{},{},{}\n", csv_field(c.chosen), csv_field(c.challenger),
                    c.horizon, c.loss, c.test.n, csv_number(c.test.mean_difference),
                    csv_number(c.test.statistic), csv_number(c.test.p_value),
                    !c.tested                                                  ? "not_tested"
                    : c.test.status == DieboldMarianoStatus::ok                ? "ok"
                    : c.test.status == DieboldMarianoStatus::variance_fallback ? "variance_fallback"
                                                                               : "degenerate",
                    csv_field(c.note));
  return out;
}

std::string input_value_csv(const BacktestResult& r) {
  std::string out = "input,score_with,score_without,difference,statistic,p_value\n";
  for (const auto& v : r.input_value)
    out += fmt::format("{},{},{},{},{},{}\n", csv_field(v.input), csv_number(v.score_with),
                       csv_number(v.score_without), csv_number(v.score_without - v.score_with),
                       csv_number(v.test.statistic), csv_number(v.test.p_value));
  return out;
}

nlohmann::json accuracy_json(const ModelBacktest& m, const BacktestOptions& o) {
  nlohmann::json j;
  j["score"] = m.score;
  j["horizon"] = o.horizon;
  j["levels"] = o.levels;
  j["origins"] = static_cast<int>(m.production.records.size());
  j["by_horizon"] = nlohmann::json::array();
  for (const auto& row : m.production_accuracy.by_horizon)
    j["by_horizon"].push_back({{"horizon", row.horizon},
                               {"count", row.count},
                               {"mae", row.mae},
                               {"rmse", row.rmse},
                               {"mase", row.mase},
                               {"coverage", row.coverage}});
  return j;
}

}  // namespace lagsieve
