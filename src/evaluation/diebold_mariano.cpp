#include "evaluation/diebold_mariano.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>
#include <vector>

#include "core/error.h"
#include "evaluation/distributions.h"

namespace lagsieve {

DieboldMarianoResult diebold_mariano(std::span<const double> loss_a,
                                     std::span<const double> loss_b,
                                     const DieboldMarianoOptions& options) {
  const int h = options.horizon;
  if (loss_a.size() != loss_b.size())
    throw InputError(fmt::format("Diebold-Mariano: loss series have {} and {} values; pair them "
                                 "on the same origins first", loss_a.size(), loss_b.size()));
  if (h < 1) throw InputError(fmt::format("Diebold-Mariano: horizon is {}; use 1 or more", h));
  const int n = static_cast<int>(loss_a.size());
  if (n <= h)
    throw InputError(fmt::format("Diebold-Mariano: {} paired losses at horizon {}; the test needs "
                                 "more pairs than the horizon (use more backtest origins)", n, h));

  std::vector<double> d(loss_a.size());
  double sum = 0.0;
  for (size_t t = 0; t < d.size(); ++t) {
    if (!std::isfinite(loss_a[t]) || !std::isfinite(loss_b[t]))
      throw InputError(fmt::format("Diebold-Mariano: loss {} is not a finite number", t));
    d[t] = loss_a[t] - loss_b[t];
    sum += d[t];
  }
  const double nd = n;
  const double mean = sum / nd;
  const auto autocov = [&](int k) {
    double s = 0.0;
    for (int t = k; t < n; ++t) s += (d[t] - mean) * (d[t - k] - mean);
    return s / nd;
  };

  DieboldMarianoResult r;
  r.n = n;
  r.horizon = h;
  r.mean_difference = mean;
  const double gamma0 = autocov(0);
  double long_run = gamma0;
  for (int k = 1; k < h; ++k) long_run += 2.0 * autocov(k);

  const double nan = std::numeric_limits<double>::quiet_NaN();
  // Relative threshold: a differential that is constant up to rounding has gamma0 ~ eps^2 mean^2.
  if (!(gamma0 > 1e-28 * (mean * mean))) {
    r.status = DieboldMarianoStatus::degenerate;
    r.note = "the loss differential is constant, so its variance is zero and no test is possible";
    r.variance = 0.0;
    r.dm_statistic = r.statistic = r.p_value = nan;
    r.degrees_of_freedom = options.small_sample_correction ? nd - 1.0 : nan;
    return r;
  }
  if (!(long_run > 0.0)) {
    r.status = DieboldMarianoStatus::variance_fallback;
    r.note = fmt::format("the long-run variance with autocovariances up to lag {} was {:.6g} (not "
                         "positive); the lag-0 variance was used instead", h - 1, long_run / nd);
    long_run = gamma0;
  }
  r.variance = long_run / nd;
  r.dm_statistic = mean / std::sqrt(r.variance);
  if (options.small_sample_correction) {
    const double hd = h;
    r.statistic = r.dm_statistic * std::sqrt((nd + 1.0 - 2.0 * hd + hd * (hd - 1.0) / nd) / nd);
    r.degrees_of_freedom = nd - 1.0;
    r.p_value = student_t_two_sided_p(r.statistic, r.degrees_of_freedom);
  } else {
    r.statistic = r.dm_statistic;
    r.degrees_of_freedom = std::numeric_limits<double>::infinity();
    r.p_value = 2.0 * normal_cdf(-std::fabs(r.statistic));
  }
  return r;
}

}  // namespace lagsieve
