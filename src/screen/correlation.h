#pragma once
// Sample autocorrelation, partial autocorrelation and cross-correlation, and the least-squares
// autoregression used for prewhitening. Normalisation follows the usual estimator (the one of
// R's acf/ccf): series demeaned by their sample means, lag-k sums divided by n (not n - k), so
// every correlation sequence is positive semi-definite.
#include <span>
#include <vector>

namespace lagsieve {

// r_0..r_L of x, r_k = c_k / c_0 with c_k = (1/n) sum_{t<n-k} (x_t - xbar)(x_{t+k} - xbar).
// L is capped at n - 1. A constant series has no defined correlation: throws NumericalError.
std::vector<double> acf(std::span<const double> x, int max_lag);

// Partial autocorrelations phi_11..phi_LL (lags 1..L; no lag 0) by the Durbin-Levinson recursion
// on the sample autocorrelations.
std::vector<double> pacf(std::span<const double> x, int max_lag);
// The same recursion from autocorrelations r_0..r_L already computed (r_0 = 1).
std::vector<double> pacf_from_acf(std::span<const double> r);

// Cross-correlation at lags -L..L; element [k + L] is
//   r_xy(k) = c_xy(k) / sqrt(c_xx(0) c_yy(0)),  c_xy(k) = (1/n) sum_t (x_t - xbar)(y_{t+k} - ybar)
// over the t with both indices inside the sample. Positive k: x comes first (x at t, y at t+k),
// so with x = prewhitened input and y = prewhitened target, r_xy(k) for k >= 0 is proportional
// to the impulse-response weight v_k. This equals R's ccf(y, x) at lag k. x and y must have the
// same length; L is capped at n - 1.
std::vector<double> ccf(std::span<const double> x, std::span<const double> y, int max_lag);

// Least-squares autoregression of a demeaned series: x_t - m = sum_j phi_j (x_{t-j} - m) + e_t,
// m = sample mean, fitted on t = p..n-1 (conditional least squares, no intercept after demeaning).
struct ArFit {
  int order = 0;
  double mean = 0.0;
  std::vector<double> phi;        // phi_1..phi_p
  double sigma2 = 0.0;            // residual sum of squares / number of residuals
  std::vector<double> aic;        // aic[p] for p = 0..cap when the order was chosen; else empty
};

// Fixed order p (0 <= p < n/2). Throws NumericalError if the regression is singular.
ArFit fit_ar(std::span<const double> x, int order);

// Order chosen by AIC over 0..max_order, every order scored on the same observations t >= cap
// (likelihoods over different samples do not compare), AIC = m log(sigma2_p) + 2 (p + 1); the
// chosen order is then refitted on all its usable observations.
ArFit fit_ar_by_aic(std::span<const double> x, int max_order);

// Residuals e_t = (x_t - m) - sum_j phi_j (x_{t-j} - m) for t = p..n-1 (n - p values): the
// prewhitening filter, applied with the same phi and m to any series of the same length.
std::vector<double> ar_filter(std::span<const double> x, const std::vector<double>& phi, double mean);

}  // namespace lagsieve
