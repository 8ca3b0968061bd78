#include "screen/correlation.h"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <limits>
#include <string>

#include "core/error.h"

namespace lagsieve {

namespace {

double mean_of(std::span<const double> x) {
  double s = 0.0;
  for (double v : x) s += v;
  return x.empty() ? 0.0 : s / static_cast<double>(x.size());
}

// sum_t a_t b_t with four running sums, so the products do not wait on one another (the
// correlation functions run after every fit with diagnostics, inside searches).
double dot(const double* a, const double* b, size_t len) {
  double s[4] = {0.0, 0.0, 0.0, 0.0};
  size_t t = 0;
  for (; t + 4 <= len; t += 4)
    for (size_t u = 0; u < 4; ++u) s[u] += a[t + u] * b[t + u];
  for (; t < len; ++t) s[0] += a[t] * b[t];
  return (s[0] + s[1]) + (s[2] + s[3]);
}

std::vector<double> centred(std::span<const double> x) {
  const double m = mean_of(x);
  std::vector<double> c(x.begin(), x.end());
  for (auto& v : c) v -= m;
  return c;
}

// (1/n) sum_t xc_t yc_{t+k} for k >= 0, or with the roles shifted for k < 0, of centred series.
double cross_cov(const std::vector<double>& xc, const std::vector<double>& yc, int k) {
  const size_t n = xc.size();
  const auto shift = static_cast<size_t>(std::abs(k));
  const double s = k >= 0 ? dot(xc.data(), yc.data() + shift, n - shift)
                          : dot(xc.data() + shift, yc.data(), n - shift);
  return s / static_cast<double>(n);
}

// Least-squares AR(p) on the rows t = first..n-1 of the demeaned series xc.
struct OlsResult {
  std::vector<double> phi;
  double rss = 0.0;
  int m = 0;
};

OlsResult ols_ar(const std::vector<double>& xc, int p, int first) {
  const int n = static_cast<int>(xc.size());
  const int m = n - first;
  OlsResult out;
  out.m = m;
  Eigen::VectorXd y(m);
  for (int i = 0; i < m; ++i) y(i) = xc[first + i];
  if (p == 0) {
    out.rss = y.squaredNorm();
    return out;
  }
  Eigen::MatrixXd X(m, p);
  for (int i = 0; i < m; ++i)
    for (int j = 0; j < p; ++j) X(i, j) = xc[first + i - 1 - j];
  const Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(X);
  if (qr.rank() < p)
    throw NumericalError("autoregression of order " + std::to_string(p) +
                         " is singular (the series is too short or has too little variation)");
  const Eigen::VectorXd beta = qr.solve(y);
  out.phi.assign(beta.data(), beta.data() + p);
  out.rss = (y - X * beta).squaredNorm();
  return out;
}

void check_order(int n, int order) {
  if (order < 0 || 2 * order >= n)
    throw NumericalError("autoregression order " + std::to_string(order) +
                         " needs more than twice as many observations (have " + std::to_string(n) +
                         ")");
}

// Gram matrix of the columns xc_{t-1}..xc_{t-k}, xc_t (lags first, the series last) over the rows
// t = k..n-1. Lag sums of neighbouring pairs differ by one term at each end,
// G(i+1, j+1) = G(i, j) + xc[k-1-i] xc[k-1-j] - xc[n-1-i] xc[n-1-j] (indices are lags), so only
// the lag-0 row needs a pass over the data.
Eigen::MatrixXd lag_gram(const std::vector<double>& xc, int k) {
  const int n = static_cast<int>(xc.size());
  Eigen::MatrixXd by_lag(k + 1, k + 1);
  for (int j = 0; j <= k; ++j) by_lag(0, j) = dot(xc.data() + k, xc.data() + k - j, n - k);
  for (int i = 0; i < k; ++i)
    for (int j = i; j < k; ++j)
      by_lag(i + 1, j + 1) =
          by_lag(i, j) + xc[k - 1 - i] * xc[k - 1 - j] - xc[n - 1 - i] * xc[n - 1 - j];
  Eigen::MatrixXd g(k + 1, k + 1);
  auto slot = [k](int lag) { return lag == 0 ? k : lag - 1; };
  for (int i = 0; i <= k; ++i)
    for (int j = i; j <= k; ++j) g(slot(i), slot(j)) = g(slot(j), slot(i)) = by_lag(i, j);
  return g;
}

// Residual sums of squares of the least-squares AR(p), p = 0..k, on the common rows t = k..n-1,
// all from one Cholesky factor L of the Gram matrix: with the series last, RSS_p is the sum of
// squares of the last row of L from column p on. Returns false when a column is (nearly) a
// combination of the ones before it; the caller then fits order by order.
bool rss_by_order(const std::vector<double>& xc, int k, std::vector<double>& rss) {
  const Eigen::MatrixXd g = lag_gram(xc, k);
  const Eigen::LLT<Eigen::MatrixXd> llt(g);
  if (llt.info() != Eigen::Success) return false;
  const Eigen::MatrixXd l = llt.matrixL();
  for (Eigen::Index j = 0; j <= k; ++j)
    if (!(l(j, j) * l(j, j) > 1e-10 * g(j, j))) return false;
  rss.assign(k + 1, 0.0);
  double tail = 0.0;
  for (int p = k; p >= 0; --p) rss[p] = tail += l(k, p) * l(k, p);
  return true;
}

}  // namespace

std::vector<double> acf(std::span<const double> x, int max_lag) {
  const int n = static_cast<int>(x.size());
  const int lag = std::clamp(max_lag, 0, std::max(n - 1, 0));
  const auto xc = centred(x);
  const double c0 = cross_cov(xc, xc, 0);
  if (!(c0 > 0.0)) throw NumericalError("autocorrelation of a constant series is undefined");
  std::vector<double> r(lag + 1);
  for (int k = 0; k <= lag; ++k) r[k] = cross_cov(xc, xc, k) / c0;
  return r;
}

std::vector<double> pacf_from_acf(std::span<const double> r) {
  // Durbin-Levinson: phi_{k,k} = (r_k - sum_j phi_{k-1,j} r_{k-j}) / (1 - sum_j phi_{k-1,j} r_j).
  const int lag = static_cast<int>(r.size()) - 1;
  std::vector<double> out(std::max(lag, 0));
  std::vector<double> phi, next;
  for (int k = 1; k <= lag; ++k) {
    double num = r[k], den = 1.0;
    for (int j = 1; j < k; ++j) {
      num -= phi[j - 1] * r[k - j];
      den -= phi[j - 1] * r[j];
    }
    const double pkk = den != 0.0 ? num / den : 0.0;
    next.assign(k, 0.0);
    for (int j = 1; j < k; ++j) next[j - 1] = phi[j - 1] - pkk * phi[k - j - 1];
    next[k - 1] = pkk;
    phi.swap(next);
    out[k - 1] = pkk;
  }
  return out;
}

std::vector<double> pacf(std::span<const double> x, int max_lag) {
  const auto r = acf(x, max_lag);
  return pacf_from_acf(r);
}

std::vector<double> ccf(std::span<const double> x, std::span<const double> y, int max_lag) {
  if (x.size() != y.size())
    throw NumericalError("cross-correlation needs two series of the same length");
  const int n = static_cast<int>(x.size());
  const int lag = std::clamp(max_lag, 0, std::max(n - 1, 0));
  const auto xc = centred(x), yc = centred(y);
  const double cxx = cross_cov(xc, xc, 0), cyy = cross_cov(yc, yc, 0);
  if (!(cxx > 0.0) || !(cyy > 0.0))
    throw NumericalError("cross-correlation with a constant series is undefined");
  const double scale = 1.0 / std::sqrt(cxx * cyy);
  std::vector<double> r(2 * lag + 1);
  for (int k = -lag; k <= lag; ++k) r[k + lag] = cross_cov(xc, yc, k) * scale;
  return r;
}

ArFit fit_ar(std::span<const double> x, int order) {
  const int n = static_cast<int>(x.size());
  check_order(n, order);
  ArFit fit;
  fit.order = order;
  fit.mean = mean_of(x);
  std::vector<double> xc(x.begin(), x.end());
  for (auto& v : xc) v -= fit.mean;
  const auto ols = ols_ar(xc, order, order);
  fit.phi = ols.phi;
  fit.sigma2 = ols.rss / static_cast<double>(ols.m);
  return fit;
}

ArFit fit_ar_by_aic(std::span<const double> x, int max_order) {
  const int n = static_cast<int>(x.size());
  check_order(n, max_order);
  const auto xc = centred(x);
  std::vector<double> aic(max_order + 1, std::numeric_limits<double>::infinity());
  std::vector<double> rss;
  const bool all_at_once = rss_by_order(xc, max_order, rss);
  const int m_rows = n - max_order;
  int best = 0;
  for (int p = 0; p <= max_order; ++p) {
    const double s2 = (all_at_once ? rss[p] : ols_ar(xc, p, max_order).rss) / m_rows;
    if (!(s2 > 0.0)) break;  // an exact fit: higher orders cannot do better
    aic[p] = static_cast<double>(m_rows) * std::log(s2) + 2.0 * (p + 1);
    if (aic[p] < aic[best]) best = p;
  }
  ArFit fit = fit_ar(x, best);
  fit.aic = aic;
  return fit;
}

std::vector<double> ar_filter(std::span<const double> x, const std::vector<double>& phi,
                              double mean) {
  const int n = static_cast<int>(x.size());
  const int p = static_cast<int>(phi.size());
  std::vector<double> e(std::max(n - p, 0));
  for (int t = p; t < n; ++t) {
    double v = x[t] - mean;
    for (int j = 0; j < p; ++j) v -= phi[j] * (x[t - 1 - j] - mean);
    e[t - p] = v;
  }
  return e;
}

}  // namespace lagsieve
