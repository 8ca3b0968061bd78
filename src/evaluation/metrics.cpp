#include "evaluation/metrics.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "core/error.h"

namespace lagsieve {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

void validate(const ForecastRecords& set) {
  for (size_t l = 0; l < set.levels.size(); ++l) {
    const double level = set.levels[l];
    if (!(level > 0.0 && level < 1.0))
      throw InputError(fmt::format("accuracy: interval level {} is {}; levels must lie strictly "
                                   "between 0 and 1 (e.g. 0.8, 0.95)", l + 1, level));
  }
  for (size_t i = 0; i < set.records.size(); ++i) {
    const ForecastRecord& r = set.records[i];
    const auto where = [&] {
      return fmt::format("accuracy: record {} (origin {}, horizon {})", i, r.origin, r.horizon);
    };
    if (r.horizon < 1) throw InputError(where() + ": horizon must be 1 or more");
    if (!std::isfinite(r.forecast) || !std::isfinite(r.actual))
      throw InputError(where() + ": forecast and actual must be finite numbers");
    if (r.lower.size() != set.levels.size() || r.upper.size() != set.levels.size())
      throw InputError(where() + fmt::format(": has {} lower and {} upper bounds for {} levels",
                                             r.lower.size(), r.upper.size(), set.levels.size()));
  }
}

// Running sums of one group; turned into an AccuracyRow at the end.
struct Sums {
  int count = 0;
  double abs_error = 0.0;
  double sq_error = 0.0;
  double scaled = 0.0;
  bool scale_missing = false;
  std::vector<int> inside;
  std::vector<double> score;

  explicit Sums(size_t levels) : inside(levels, 0), score(levels, 0.0) {}

  void add(const ForecastRecord& r, const std::vector<double>& levels) {
    const double e = r.actual - r.forecast;
    ++count;
    abs_error += std::fabs(e);
    sq_error += e * e;
    if (r.scale > 0.0 && std::isfinite(r.scale))
      scaled += std::fabs(e) / r.scale;
    else
      scale_missing = true;
    for (size_t l = 0; l < levels.size(); ++l) {
      if (r.actual >= r.lower[l] && r.actual <= r.upper[l]) ++inside[l];
      score[l] += interval_score(r.lower[l], r.upper[l], r.actual, levels[l]);
    }
  }

  AccuracyRow row(int horizon) const {
    AccuracyRow out;
    out.horizon = horizon;
    out.count = count;
    const double n = count;
    out.mae = abs_error / n;
    out.rmse = std::sqrt(sq_error / n);
    out.mase = scale_missing ? kNaN : scaled / n;
    for (size_t l = 0; l < inside.size(); ++l) {
      out.coverage.push_back(inside[l] / n);
      out.interval_score.push_back(score[l] / n);
    }
    return out;
  }
};

double loss(double error, LossKind kind) {
  return kind == LossKind::squared ? error * error : std::fabs(error);
}

}  // namespace

double mase_scale(std::span<const double> training, int period) {
  if (period < 1) throw InputError(fmt::format("MASE scale: seasonal period is {}; use 1 or more", period));
  const size_t m = static_cast<size_t>(period);
  if (training.size() <= m)
    throw InputError(fmt::format("MASE scale: the training window has {} values; the naive "
                                 "forecast with period {} needs at least {}",
                                 training.size(), period, period + 1));
  // Pairs with a missing value (NaN) are left out.
  double sum = 0.0;
  size_t count = 0;
  for (size_t t = m; t < training.size(); ++t) {
    const double d = std::fabs(training[t] - training[t - m]);
    if (std::isnan(d)) continue;
    sum += d;
    ++count;
  }
  return count > 0 ? sum / static_cast<double>(count) : std::numeric_limits<double>::quiet_NaN();
}

double interval_score(double lower, double upper, double actual, double level) {
  const double alpha = 1.0 - level;
  double s = upper - lower;
  if (actual < lower) s += (2.0 / alpha) * (lower - actual);
  if (actual > upper) s += (2.0 / alpha) * (actual - upper);
  return s;
}

AccuracyTable accuracy_table(const ForecastRecords& set) {
  validate(set);
  AccuracyTable table;
  table.levels = set.levels;
  std::map<int, Sums> groups;
  Sums all(set.levels.size());
  for (const ForecastRecord& r : set.records) {
    groups.try_emplace(r.horizon, set.levels.size()).first->second.add(r, set.levels);
    all.add(r, set.levels);
  }
  for (const auto& [h, sums] : groups) table.by_horizon.push_back(sums.row(h));
  if (all.count > 0) {
    table.overall = all.row(0);
  } else {
    table.overall.coverage.assign(set.levels.size(), kNaN);
    table.overall.interval_score.assign(set.levels.size(), kNaN);
    table.overall.mae = table.overall.rmse = table.overall.mase = kNaN;
  }
  return table;
}

double backtest_score(const AccuracyTable& table, AccuracyMeasure measure, int level_index) {
  if (table.by_horizon.empty()) return kNaN;
  if (measure == AccuracyMeasure::interval_score &&
      (level_index < -1 || level_index >= static_cast<int>(table.levels.size()) ||
       table.levels.empty()))
    throw InputError(fmt::format("backtest score: interval level index {} does not exist ({} "
                                 "levels configured)", level_index, table.levels.size()));
  double sum = 0.0;
  for (const AccuracyRow& row : table.by_horizon) {
    switch (measure) {
      case AccuracyMeasure::mae: sum += row.mae; break;
      case AccuracyMeasure::rmse: sum += row.rmse; break;
      case AccuracyMeasure::mase: sum += row.mase; break;
      case AccuracyMeasure::interval_score:
        if (level_index >= 0) {
          sum += row.interval_score[static_cast<size_t>(level_index)];
        } else {
          double s = 0.0;
          for (double v : row.interval_score) s += v;
          sum += s / static_cast<double>(row.interval_score.size());
        }
        break;
    }
  }
  return sum / static_cast<double>(table.by_horizon.size());
}

PairedLosses paired_losses(const ForecastRecords& a, const ForecastRecords& b, int horizon,
                           LossKind kind) {
  const auto errors_at = [horizon](const ForecastRecords& set, const char* name) {
    std::map<int, double> errors;
    for (const ForecastRecord& r : set.records) {
      if (r.horizon != horizon) continue;
      if (!errors.emplace(r.origin, r.actual - r.forecast).second)
        throw InputError(fmt::format("paired losses: record set {} has two forecasts for origin "
                                     "{}, horizon {}", name, r.origin, horizon));
    }
    return errors;
  };
  const std::map<int, double> errors_a = errors_at(a, "a");
  const std::map<int, double> errors_b = errors_at(b, "b");
  PairedLosses out;
  out.horizon = horizon;
  for (const auto& [origin, ea] : errors_a) {
    const auto it = errors_b.find(origin);
    if (it == errors_b.end()) continue;
    out.origins.push_back(origin);
    out.loss_a.push_back(loss(ea, kind));
    out.loss_b.push_back(loss(it->second, kind));
  }
  return out;
}

}  // namespace lagsieve
