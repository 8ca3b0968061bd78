// Starting values for the optimiser: cheap regressions that land near the optimum, so the
// derivative-free search needs few evaluations.
#include <Eigen/Dense>
#include <algorithm>
#include <cmath>

#include "model/fit.h"
#include "model/polynomial.h"

namespace lagsieve {

namespace {

// Least squares with a small ridge so an ill-conditioned start never fails.
Eigen::VectorXd least_squares(const Eigen::MatrixXd& x, const Eigen::VectorXd& y) {
  Eigen::MatrixXd xtx = x.transpose() * x;
  const double ridge = 1e-8 * std::max(1.0, xtx.diagonal().maxCoeff());
  xtx.diagonal().array() += ridge;
  return xtx.ldlt().solve(x.transpose() * y);
}

// Shrinks coefficients of 1 - sum a_j B^j (sign -1) or 1 + sum a_j B^j (sign +1) towards zero
// until the partial autocorrelations are safely inside (-0.95, 0.95).
void make_admissible(std::vector<double>& a, double sign) {
  if (a.empty()) return;
  std::vector<double> coef(a.size()), z(a.size());
  for (int attempt = 0; attempt < 60; ++attempt) {
    for (size_t j = 0; j < a.size(); ++j) coef[j] = -sign * a[j];
    bool fine = std::all_of(a.begin(), a.end(), [](double v) { return std::isfinite(v); }) &&
                coefficients_to_pacf(coef, z);
    if (fine)
      fine =
          std::all_of(z.begin(), z.end(), [](double v) { return std::abs(std::tanh(v)) < 0.95; });
    if (fine) return;
    for (auto& v : a) v = std::isfinite(v) ? 0.85 * v : 0.0;
  }
  std::fill(a.begin(), a.end(), 0.0);
}

}  // namespace

std::vector<double> start_values(const LikelihoodProblem& problem) {
  if (!problem.missing.empty()) {
    // The regressions need every row: start from a copy with the missing values filled
    // linearly (the likelihood itself never sees the filled values).
    LikelihoodProblem filled = problem;
    filled.missing.clear();
    auto& w = filled.w;
    const int n = static_cast<int>(w.size());
    int last = -1;
    for (int t = 0; t < n; ++t) {
      if (std::isnan(w[t])) continue;
      for (int k = last + 1; k < t; ++k)
        w[k] = last < 0 ? w[t] : w[last] + (w[t] - w[last]) * (k - last) / double(t - last);
      last = t;
    }
    for (int k = last + 1; k < n; ++k) w[k] = last < 0 ? 0.0 : w[last];
    return start_values(filled);
  }
  const ModelSpec& spec = problem.spec;
  const int total = static_cast<int>(problem.w.size());
  std::vector<double> out;

  // 1. Distributed-lag regression of w on each input's lags b..b+J (J longer when r > 0, so
  // the decay of the impulse response is visible).
  std::vector<int> lags(spec.inputs.size());
  int first = problem.start;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& o = spec.inputs[i].order;
    lags[i] = o.numerator + (o.denominator > 0 ? o.denominator + 6 : 0);
    first = std::max(first, o.delay + lags[i]);
  }
  int columns = 1;
  for (int l : lags) columns += l + 1;
  while (total - first < 3 * columns + 10 && first > problem.start) {
    // Too short: fall back to the minimal lag set.
    for (size_t i = 0; i < spec.inputs.size(); ++i) lags[i] = spec.inputs[i].order.numerator;
    first = problem.start;
    columns = 1;
    for (int l : lags) columns += l + 1;
  }
  const int n = total - first;
  Eigen::MatrixXd x(n, columns);
  Eigen::VectorXd y(n);
  for (int t = 0; t < n; ++t) {
    y(t) = problem.w[first + t];
    x(t, 0) = 1.0;
    int c = 1;
    for (size_t i = 0; i < spec.inputs.size(); ++i)
      for (int j = 0; j <= lags[i]; ++j)
        x(t, c++) = problem.u[i][first + t - spec.inputs[i].order.delay - j];
  }
  const Eigen::VectorXd beta = least_squares(x, y);
  int c = 1;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& o = spec.inputs[i].order;
    const Eigen::VectorXd v = beta.segment(c, lags[i] + 1);
    c += lags[i] + 1;
    if (o.denominator == 0) continue;
    // v_k = sum_j delta_j v_{k-j} for k > s.
    std::vector<double> delta(o.denominator, 0.0);
    const int rows = lags[i] - o.numerator;
    if (rows >= o.denominator) {
      Eigen::MatrixXd a(rows, o.denominator);
      Eigen::VectorXd b(rows);
      for (int r = 0; r < rows; ++r) {
        const int k = o.numerator + 1 + r;
        b(r) = v(k);
        for (int j = 0; j < o.denominator; ++j) a(r, j) = k - 1 - j >= 0 ? v(k - 1 - j) : 0.0;
      }
      const Eigen::VectorXd d = least_squares(a, b);
      for (int j = 0; j < o.denominator; ++j) delta[j] = d(j);
    }
    make_admissible(delta, -1.0);
    out.insert(out.end(), delta.begin(), delta.end());
  }

  // 2. Hannan-Rissanen on the regression residuals: a long autoregression estimates the
  // innovations, then the noise is regressed on its own lags and lagged innovations.
  const auto& ns = spec.noise;
  const int s = ns.period;
  std::vector<double> phi(ns.p, 0.0), theta(ns.q, 0.0), sphi(ns.seasonal_p, 0.0),
      stheta(ns.seasonal_q, 0.0);
  if (ns.p + ns.q + ns.seasonal_p + ns.seasonal_q > 0) {
    const Eigen::VectorXd e0 = y - x * beta;
    const int max_lag = std::max(ns.p + s * ns.seasonal_p, ns.q + s * ns.seasonal_q);
    int long_order = std::min(std::max(10, 2 * max_lag + 2), n / 4);
    long_order = std::max(long_order, 1);
    Eigen::VectorXd innov = Eigen::VectorXd::Zero(n);
    if (ns.q + ns.seasonal_q > 0 && n > 2 * long_order + 10) {
      Eigen::MatrixXd la(n - long_order, long_order);
      for (int t = long_order; t < n; ++t)
        for (int j = 0; j < long_order; ++j) la(t - long_order, j) = e0(t - 1 - j);
      const Eigen::VectorXd ar_long = least_squares(la, e0.tail(n - long_order));
      innov.tail(n - long_order) = e0.tail(n - long_order) - la * ar_long;
    }
    const int begin = std::max(long_order, max_lag) + (ns.q + ns.seasonal_q > 0 ? long_order : 0);
    const int k = ns.p + ns.q + ns.seasonal_p + ns.seasonal_q;
    if (n - begin > 2 * k + 5) {
      Eigen::MatrixXd hr(n - begin, k);
      for (int t = begin; t < n; ++t) {
        int col = 0;
        for (int j = 1; j <= ns.p; ++j) hr(t - begin, col++) = e0(t - j);
        for (int j = 1; j <= ns.q; ++j) hr(t - begin, col++) = innov(t - j);
        for (int j = 1; j <= ns.seasonal_p; ++j) hr(t - begin, col++) = e0(t - j * s);
        for (int j = 1; j <= ns.seasonal_q; ++j) hr(t - begin, col++) = innov(t - j * s);
      }
      const Eigen::VectorXd coef = least_squares(hr, e0.tail(n - begin));
      int col = 0;
      for (auto& v : phi) v = coef(col++);
      for (auto& v : theta) v = coef(col++);
      for (auto& v : sphi) v = coef(col++);
      for (auto& v : stheta) v = coef(col++);
    }
  }
  make_admissible(phi, -1.0);
  make_admissible(theta, +1.0);
  make_admissible(sphi, -1.0);
  make_admissible(stheta, +1.0);
  for (const auto* block : {&phi, &theta, &sphi, &stheta})
    out.insert(out.end(), block->begin(), block->end());
  return out;
}

}  // namespace lagsieve
