#include "model/polynomial.h"

#include <Eigen/Eigenvalues>
#include <algorithm>
#include <cmath>
#include <limits>

namespace lagsieve {

std::vector<double> expand_ar(std::span<const double> phi, std::span<const double> seasonal_phi,
                              int period) {
  // (1 - sum phi_i B^i)(1 - sum Phi_j B^{jS}) = 1 - sum a_k B^k
  const size_t p = phi.size();
  const size_t len = p + seasonal_phi.size() * static_cast<size_t>(period);
  std::vector<double> a(len, 0.0);
  for (size_t i = 0; i < p; ++i) a[i] += phi[i];
  for (size_t j = 0; j < seasonal_phi.size(); ++j) {
    const size_t lag = (j + 1) * period;
    a[lag - 1] += seasonal_phi[j];
    for (size_t i = 0; i < p; ++i) a[lag + i] -= phi[i] * seasonal_phi[j];
  }
  return a;
}

std::vector<double> expand_ma(std::span<const double> theta, std::span<const double> seasonal_theta,
                              int period) {
  const size_t q = theta.size();
  const size_t len = q + seasonal_theta.size() * static_cast<size_t>(period);
  std::vector<double> m(len, 0.0);
  for (size_t i = 0; i < q; ++i) m[i] += theta[i];
  for (size_t j = 0; j < seasonal_theta.size(); ++j) {
    const size_t lag = (j + 1) * period;
    m[lag - 1] += seasonal_theta[j];
    for (size_t i = 0; i < q; ++i) m[lag + i] += theta[i] * seasonal_theta[j];
  }
  return m;
}

std::vector<double> psi_weights(std::span<const double> ar, std::span<const double> ma, int count) {
  std::vector<double> psi(std::max(count, 0), 0.0);
  for (int j = 0; j < count; ++j) {
    double v = j == 0 ? 1.0 : (j - 1 < static_cast<int>(ma.size()) ? ma[j - 1] : 0.0);
    for (int k = 1; k <= std::min<int>(j, static_cast<int>(ar.size())); ++k)
      v += ar[k - 1] * psi[j - k];
    psi[j] = v;
  }
  return psi;
}

std::vector<double> impulse_response(const InputOrder& order, const InputParams& p, int count) {
  std::vector<double> v(std::max(count, 0), 0.0);
  for (int k = 0; k < count; ++k) {
    const int j = k - order.delay;
    double x = (j >= 0 && j < static_cast<int>(p.omega.size())) ? p.omega[j] : 0.0;
    for (size_t i = 0; i < p.delta.size(); ++i)
      if (k - 1 - static_cast<int>(i) >= 0) x += p.delta[i] * v[k - 1 - i];
    v[k] = x;
  }
  return v;
}

std::vector<double> transfer_response(std::span<const double> u, const InputOrder& order,
                                      const InputParams& p) {
  const int n = static_cast<int>(u.size());
  std::vector<double> x(n, 0.0);
  for (int t = 0; t < n; ++t) {
    double v = 0.0;
    for (size_t j = 0; j < p.omega.size(); ++j) {
      const int lag = t - order.delay - static_cast<int>(j);
      if (lag >= 0) v += p.omega[j] * u[lag];
    }
    for (size_t i = 0; i < p.delta.size(); ++i) {
      const int lag = t - 1 - static_cast<int>(i);
      if (lag >= 0) v += p.delta[i] * x[lag];
    }
    x[t] = v;
  }
  return x;
}

namespace {

// g_t = sum_j delta_j g_{t-j} for t >= r, the first r values of g given.
void continue_recursion(std::span<const double> delta, std::span<double> g) {
  const int r = static_cast<int>(delta.size()), n = static_cast<int>(g.size());
  for (int t = r; t < n; ++t) {
    double v = 0.0;
    for (int j = 0; j < r; ++j) v += delta[j] * g[t - 1 - j];
    g[t] = v;
  }
}

}  // namespace

std::vector<double> homogeneous_solution(std::span<const double> delta,
                                         std::span<const double> state, int n) {
  std::vector<double> g(static_cast<size_t>(std::max(n, 0)), 0.0);
  for (int t = 0; t < n && t < static_cast<int>(delta.size()); ++t)
    g[t] = t < static_cast<int>(state.size()) ? state[t] : 0.0;
  continue_recursion(delta, g);
  return g;
}

void homogeneous_unit_solution(std::span<const double> delta, int unit, std::span<double> out) {
  const int n = static_cast<int>(out.size());
  for (int t = 0; t < n && t < static_cast<int>(delta.size()); ++t) out[t] = t == unit ? 1.0 : 0.0;
  continue_recursion(delta, out);
}

std::vector<double> transfer_output(std::span<const double> u, const InputOrder& order,
                                    const InputParams& p, int anchor) {
  auto x = transfer_response(u, order, p);
  const int n = static_cast<int>(x.size());
  if (p.state.empty() || p.delta.empty() || anchor < 0 || anchor >= n) return x;
  const auto g = homogeneous_solution(p.delta, p.state, n - anchor);
  for (int t = anchor; t < n; ++t) x[t] += g[t - anchor];
  return x;
}

void pacf_to_coefficients(std::span<const double> unconstrained, std::span<double> coef) {
  // Durbin-Levinson: a^{(k)}_j = a^{(k-1)}_j - r_k a^{(k-1)}_{k-j}, a^{(k)}_k = r_k.
  const size_t p = unconstrained.size();
  double work[64];
  double* prev = p <= 32 ? work : nullptr;
  std::vector<double> heap;
  if (!prev) {
    heap.resize(p);
    prev = heap.data();
  }
  for (size_t k = 0; k < p; ++k) {
    const double r = std::tanh(unconstrained[k]);
    for (size_t j = 0; j < k; ++j) prev[j] = coef[j];
    for (size_t j = 0; j < k; ++j) coef[j] = prev[j] - r * prev[k - 1 - j];
    coef[k] = r;
  }
}

bool coefficients_to_pacf(std::span<const double> coef, std::span<double> unconstrained) {
  const size_t p = coef.size();
  std::vector<double> a(coef.begin(), coef.end()), prev(p);
  for (size_t k = p; k-- > 0;) {
    const double r = a[k];
    if (!(std::abs(r) < 1.0)) return false;
    unconstrained[k] = std::atanh(r);
    const double denom = 1.0 - r * r;
    for (size_t j = 0; j < k; ++j) prev[j] = (a[j] + r * a[k - 1 - j]) / denom;
    for (size_t j = 0; j < k; ++j) a[j] = prev[j];
  }
  return true;
}

std::vector<std::complex<double>> polynomial_roots(std::span<const double> a, double sign) {
  // Coefficients c_0 + c_1 z + ... + c_n z^n with c_0 = 1, c_j = sign * a_j.
  size_t n = a.size();
  while (n > 0 && a[n - 1] == 0.0) --n;
  if (n == 0) return {};
  // Companion matrix of the monic polynomial z^n + (c_{n-1}/c_n) z^{n-1} + ... + c_0/c_n.
  Eigen::MatrixXd companion = Eigen::MatrixXd::Zero(n, n);
  const double lead = sign * a[n - 1];
  for (size_t i = 0; i < n; ++i) {
    const double c = i == 0 ? 1.0 : sign * a[i - 1];
    companion(i, n - 1) = -c / lead;
    if (i > 0) companion(i, i - 1) = 1.0;
  }
  Eigen::EigenSolver<Eigen::MatrixXd> solver(companion, false);
  std::vector<std::complex<double>> roots(n);
  for (size_t i = 0; i < n; ++i) roots[i] = solver.eigenvalues()[i];
  return roots;
}

double min_root_modulus(std::span<const double> a, double sign) {
  double best = std::numeric_limits<double>::infinity();
  for (const auto& r : polynomial_roots(a, sign)) best = std::min(best, std::abs(r));
  return best;
}

}  // namespace lagsieve
