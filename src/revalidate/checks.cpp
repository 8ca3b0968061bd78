#include "revalidate/checks.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "evaluation/distributions.h"

namespace lagsieve {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

}  // namespace

double f_cdf(double x, double d1, double d2) {
  if (!(d1 > 0.0) || !(d2 > 0.0) || std::isnan(x)) return kNaN;
  if (x <= 0.0) return 0.0;
  if (std::isinf(x)) return 1.0;
  return regularized_incomplete_beta(d1 / 2.0, d2 / 2.0, d1 * x / (d1 * x + d2));
}

double binomial_cdf(int k, int n, double p) {
  if (n < 0 || !(p >= 0.0 && p <= 1.0)) return kNaN;
  if (k < 0) return 0.0;
  if (k >= n) return 1.0;
  // P(X <= k) = I_{1-p}(n - k, k + 1).
  return regularized_incomplete_beta(static_cast<double>(n - k), static_cast<double>(k) + 1.0, 1.0 - p);
}

DegradationTest degradation_test(std::span<const double> scaled_errors, int horizon,
                                 double baseline, int baseline_count) {
  DegradationTest out;
  out.horizon = horizon;
  out.baseline = baseline;
  out.baseline_count = std::max(baseline_count, 0);
  std::vector<double> e;
  for (double v : scaled_errors)
    if (std::isfinite(v)) e.push_back(v);
  out.n = static_cast<int>(e.size());
  out.statistic = kNaN;
  out.p_value = 1.0;
  if (out.n > 0) {
    double sum = 0.0;
    for (double v : e) sum += v;
    out.mean = sum / out.n;
  } else {
    out.mean = kNaN;
  }
  out.ratio = std::isfinite(baseline) && baseline > 0.0 ? out.mean / baseline : kNaN;
  if (!(std::isfinite(baseline) && baseline > 0.0)) {
    out.note = "no training-time MASE at this horizon";
    return out;
  }
  if (out.n < 5) {
    out.note = fmt::format("{} new-period errors at this horizon; at least 5 are needed", out.n);
    return out;
  }
  const int n = out.n;
  auto gamma = [&](int k) {
    double s = 0.0;
    for (int j = k; j < n; ++j) s += (e[j] - out.mean) * (e[j - k] - out.mean);
    return s / n;
  };
  const double g0 = gamma(0);
  double lrv = g0;
  for (int k = 1; k < horizon && k < n; ++k) lrv += 2.0 * gamma(k);
  if (!(lrv > 0.0)) {
    lrv = g0;
    out.note = "long-run variance not positive; lag 0 alone used";
  }
  out.long_run_variance = lrv;
  if (!(lrv > 0.0)) {
    out.note = "the new-period scaled errors are constant; no test possible";
    return out;
  }
  const double inv = 1.0 / n + (out.baseline_count > 0 ? 1.0 / out.baseline_count : 0.0);
  out.statistic = (out.mean - baseline) / std::sqrt(lrv * inv);
  out.p_value = 1.0 - student_t_cdf(out.statistic, n - 1.0);
  if (out.statistic > 0.0) out.p_value = student_t_two_sided_p(out.statistic, n - 1.0) / 2.0;
  return out;
}

LjungBoxCheck ljung_box_check(std::span<const double> residuals, int lag, int fitted_arma_terms) {
  LjungBoxCheck out;
  out.n = static_cast<int>(residuals.size());
  out.lag = lag;
  out.df = lag - fitted_arma_terms;
  out.statistic = kNaN;
  out.p_value = 1.0;
  const int n = out.n;
  if (out.df < 1 || lag >= n) return out;
  double mean = 0.0;
  for (double r : residuals) mean += r;
  mean /= n;
  double c0 = 0.0;
  for (double r : residuals) c0 += (r - mean) * (r - mean);
  if (!(c0 > 0.0)) return out;
  double q = 0.0;
  for (int k = 1; k <= lag; ++k) {
    double ck = 0.0;
    for (int t = k; t < n; ++t) ck += (residuals[t] - mean) * (residuals[t - k] - mean);
    const double rho = ck / c0;
    q += rho * rho / (n - k);
  }
  out.statistic = q * n * (n + 2.0);
  out.p_value = chi_square_upper_tail(out.statistic, out.df);
  return out;
}

MeanShiftCheck mean_shift_check(std::span<const double> residuals, int fit_count) {
  MeanShiftCheck out;
  out.n = static_cast<int>(residuals.size());
  out.fit_count = std::max(fit_count, 0);
  out.statistic = kNaN;
  out.p_value = 1.0;
  if (out.n < 2) return out;
  for (double r : residuals) out.mean += r;
  out.mean /= out.n;
  double ss = 0.0;
  for (double r : residuals) ss += (r - out.mean) * (r - out.mean);
  out.sd = std::sqrt(ss / (out.n - 1));
  if (!(out.sd > 0.0)) return out;
  const double inv = 1.0 / out.n + (out.fit_count > 0 ? 1.0 / out.fit_count : 0.0);
  out.statistic = out.mean / (out.sd * std::sqrt(inv));
  out.p_value = student_t_two_sided_p(out.statistic, out.n - 1.0);
  return out;
}

VarianceChangeCheck variance_change_check(std::span<const double> residuals, double sigma2,
                                          double df_reference) {
  VarianceChangeCheck out;
  out.n = static_cast<int>(residuals.size());
  out.reference_variance = sigma2;
  out.df_new = out.n;
  out.df_reference = df_reference;
  out.ratio = kNaN;
  out.p_value = 1.0;
  if (out.n < 2 || !(sigma2 > 0.0) || !(df_reference > 0.0)) return out;
  double ss = 0.0;
  for (double r : residuals) ss += r * r;
  out.new_variance = ss / out.n;
  out.ratio = out.new_variance / sigma2;
  const double lower = f_cdf(out.ratio, out.df_new, df_reference);
  out.p_value = std::min(1.0, 2.0 * std::min(lower, 1.0 - lower));
  return out;
}

CoverageCheck coverage_check(int inside, int count, double level) {
  CoverageCheck out;
  out.level = level;
  out.count = count;
  out.inside = inside;
  out.observed = count > 0 ? static_cast<double>(inside) / count : kNaN;
  out.p_value = 1.0;
  if (count < 1) return out;
  const double at_most = binomial_cdf(inside, count, level);
  const double at_least = 1.0 - binomial_cdf(inside - 1, count, level);
  out.p_value = std::min(1.0, 2.0 * std::min(at_most, at_least));
  return out;
}

}  // namespace lagsieve
