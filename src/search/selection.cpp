#include "search/selection.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/names.h"
#include "evaluation/diebold_mariano.h"

namespace lagsieve {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string fmt_p(double p) {
  return p < 1e-4 ? fmt::format("{:.1e}", p) : fmt::format("{:.3f}", p);
}

}  // namespace

SelectionOptions selection_options(const RunConfig& config) {
  SelectionOptions o;
  o.parsimonious = config.backtest.selection != "best_score";
  o.level = config.backtest.selection_level;
  o.statuses.clear();
  for (const auto& s : config.backtest.chosen_statuses)
    for (FitStatus f : {FitStatus::ok, FitStatus::no_convergence, FitStatus::boundary})
      if (s == to_string(f)) o.statuses.push_back(f);
  o.criterion = config.search.criterion;
  const std::string& sc = config.backtest.score;
  o.score = sc == "rmse"             ? AccuracyMeasure::rmse
            : sc == "mae"            ? AccuracyMeasure::mae
            : sc == "interval_score" ? AccuracyMeasure::interval_score
                                     : AccuracyMeasure::mase;
  o.horizon = config.backtest.horizon;
  o.step = config.backtest.step;
  return o;
}

std::vector<double> loss_by_origin(const ForecastRecords& records, const std::vector<int>& origins,
                                   AccuracyMeasure measure) {
  std::vector<double> out;
  out.reserve(origins.size());
  for (int origin : origins) {
    double sum = 0.0;
    int n = 0;
    for (const auto& r : records.records) {
      if (r.origin != origin) continue;
      const double e = r.actual - r.forecast;
      sum += measure == AccuracyMeasure::rmse  ? e * e
             : measure == AccuracyMeasure::mae ? std::abs(e)
                                               : std::abs(e) / r.scale;
      ++n;
    }
    out.push_back(n > 0 ? sum / n : kNaN);
  }
  return out;
}

SelectionResult choose_model(const std::vector<SelectionCandidate>& candidates,
                              const BacktestResult& backtest, const SelectionOptions& options) {
  SelectionResult out;
  const size_t n = candidates.size();
  out.p_worse.assign(n, kNaN);
  out.notes.assign(n, "");
  std::vector<bool> eligible(n, false);
  for (size_t i = 0; i < n; ++i) {
    const auto& c = candidates[i];
    const auto& m = backtest.models[c.model];
    if (!std::isfinite(m.score)) {
      out.notes[i] = "no backtest score";
      continue;
    }
    if (std::find(options.statuses.begin(), options.statuses.end(), c.row->status) ==
        options.statuses.end()) {
      out.notes[i] = fmt::format("cannot lead: status {}", to_string(c.row->status));
      continue;
    }
    eligible[i] = true;
    if (out.best < 0 || m.score < backtest.models[candidates[out.best].model].score)
      out.best = static_cast<int>(i);
  }
  if (out.best < 0) {
    out.reason = "no backtested candidate with a status that may lead";
    return out;
  }
  const auto& best_row = *candidates[out.best].row;
  const double best_score = backtest.models[candidates[out.best].model].score;
  if (!options.parsimonious) {
    out.chosen = out.best;
    out.notes[out.best] = "chosen model: best backtest score";
    out.reason = fmt::format(
        "{} has the lowest backtest score ({:.4f}) among the candidates that may lead "
        "(rule best_score)",
        best_row.key, best_score);
    return out;
  }

  // Steps 3 and 4: which candidates are within noise of the best, and the simplest of them.
  const auto best_loss = loss_by_origin(backtest.models[candidates[out.best].model].production,
                                        backtest.origins, options.score);
  const int overlap = std::max(1, (options.horizon + options.step - 1) / options.step);
  std::vector<bool> within(n, false);
  for (size_t i = 0; i < n; ++i) {
    if (!eligible[i]) continue;
    if (static_cast<int>(i) == out.best) {
      within[i] = true;
      continue;
    }
    const auto loss = loss_by_origin(backtest.models[candidates[i].model].production,
                                     backtest.origins, options.score);
    std::vector<double> a, b;
    for (size_t k = 0; k < loss.size(); ++k)
      if (std::isfinite(loss[k]) && std::isfinite(best_loss[k])) {
        a.push_back(loss[k]);
        b.push_back(best_loss[k]);
      }
    DieboldMarianoOptions dmo;
    dmo.horizon = std::max(1, std::min(overlap, static_cast<int>(a.size()) / 3));
    if (static_cast<int>(a.size()) < dmo.horizon + 4) {
      within[i] = true;
      out.notes[i] = fmt::format("within noise of the best: {} origins, too few to test", a.size());
      continue;
    }
    const auto dm = diebold_mariano(a, b, dmo);
    const double p = !std::isfinite(dm.statistic) ? 1.0
                     : dm.statistic > 0.0         ? dm.p_value / 2.0
                                                  : 1.0 - dm.p_value / 2.0;
    out.p_worse[i] = p;
    within[i] = p >= options.level;
    out.notes[i] =
        within[i]
            ? fmt::format("within noise of the best (p = {} >= {:g})", fmt_p(p), options.level)
            : fmt::format("worse than the best (p = {} < {:g})", fmt_p(p), options.level);
  }
  int chosen = -1;
  int contenders = 0;
  for (size_t i = 0; i < n; ++i) {
    if (!within[i]) continue;
    ++contenders;
    if (chosen < 0) {
      chosen = static_cast<int>(i);
      continue;
    }
    const auto& a = *candidates[i].row;
    const auto& b = *candidates[chosen].row;
    const double sa = backtest.models[candidates[i].model].score;
    const double sb = backtest.models[candidates[chosen].model].score;
    const double ca = a.criterion(options.criterion), cb = b.criterion(options.criterion);
    const bool better = a.n_params != b.n_params ? a.n_params < b.n_params
                        : ca != cb               ? ca < cb
                        : sa != sb               ? sa < sb
                                                 : a.key < b.key;
    if (better) chosen = static_cast<int>(i);
  }
  out.chosen = chosen;
  const auto& lead = *candidates[chosen].row;
  const double lead_score = backtest.models[candidates[chosen].model].score;
  if (chosen == out.best) {
    out.notes[chosen] = "chosen model: best backtest score and the simplest within noise of it";
    out.reason = fmt::format(
        "{} has the lowest backtest score ({:.4f}) and, with k = {} parameters, is the simplest of "
        "the {} "
        "candidate(s) whose score is not significantly worse (one-sided Diebold-Mariano, level "
        "{:g}; "
        "statuses that may lead: the fit is {})",
        lead.key, lead_score, lead.n_params, contenders, options.level, to_string(lead.status));
  } else {
    out.notes[out.best] = "best backtest score, but not the simplest within noise";
    out.notes[chosen] = fmt::format("chosen model: simplest within noise of the best (p = {})",
                                    fmt_p(out.p_worse[chosen]));
    out.reason = fmt::format(
        "{} (k = {} parameters, backtest score {:.4f}) is the simplest of the {} candidates whose "
        "backtest "
        "loss is not significantly worse than that of the best, {} (k = {}, score {:.4f}): "
        "one-sided "
        "Diebold-Mariano p = {} >= {:g}, so the difference of {:.4f} is within noise. Ties in k "
        "are "
        "broken by {}",
        lead.key, lead.n_params, lead_score, contenders, best_row.key, best_row.n_params,
        best_score,
        std::isfinite(out.p_worse[chosen]) ? fmt_p(out.p_worse[chosen]) : std::string("untested"),
        options.level, lead_score - best_score, to_string(options.criterion));
  }
  return out;
}

}  // namespace lagsieve
