#include "screen/correlation.h"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
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

// (1/n) sum_t (x_t - mx)(y_{t+k} - my) for k >= 0, or with the roles shifted for k < 0.
double cross_cov(std::span<const double> x, double mx, std::span<const double> y, double my,
                 int k) {
  const int n = static_cast<int>(x.size());
  double s = 0.0;
  for (int t = std::max(0, -k); t < n - std::max(0, k); ++t) s += (x[t] - mx) * (y[t + k] - my);
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
                         " needs more than twice as many observations (have " +
                         std::to_string(n) + ")");
}

}  // namespace

std::vector<double> acf(std::span<const double> x, int max_lag) {
  const int n = static_cast<int>(x.size());
  const int lag = std::clamp(max_lag, 0, std::max(n - 1, 0));
  const double m = mean_of(x);
  const double c0 = cross_cov(x, m, x, m, 0);
  if (!(c0 > 0.0)) throw NumericalError("autocorrelation of a constant series is undefined");
  std::vector<double> r(lag + 1);
  for (int k = 0; k <= lag; ++k) r[k] = cross_cov(x, m, x, m, k) / c0;
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
  const double mx = mean_of(x), my = mean_of(y);
  const double cxx = cross_cov(x, mx, x, mx, 0), cyy = cross_cov(y, my, y, my, 0);
  if (!(cxx > 0.0) || !(cyy > 0.0))
    throw NumericalError("cross-correlation with a constant series is undefined");
  const double scale = 1.0 / std::sqrt(cxx * cyy);
  std::vector<double> r(2 * lag + 1);
  for (int k = -lag; k <= lag; ++k) r[k + lag] = cross_cov(x, mx, y, my, k) * scale;
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
  const double m = mean_of(x);
  std::vector<double> xc(x.begin(), x.end());
  for (auto& v : xc) v -= m;
  std::vector<double> aic(max_order + 1, std::numeric_limits<double>::infinity());
  int best = 0;
  for (int p = 0; p <= max_order; ++p) {
    const auto ols = ols_ar(xc, p, max_order);
    const double s2 = ols.rss / static_cast<double>(ols.m);
    if (!(s2 > 0.0)) break;  // an exact fit: higher orders cannot do better
    aic[p] = static_cast<double>(ols.m) * std::log(s2) + 2.0 * (p + 1);
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
