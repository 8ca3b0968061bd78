#include "model/arma_filter.h"

#include <algorithm>
#include <cmath>
#include <cstddef>

namespace lagsieve {

namespace {

// Tolerance on the largest change of the state covariance below which the gain is frozen. The
// likelihood changes by far less than the optimiser's tolerance.
constexpr double kSteadyTolerance = 1e-12;

int state_dim(size_t p, size_t q) { return static_cast<int>(std::max(p, q + 1)); }

void load_polynomials(std::span<const double> ar, std::span<const double> ma, int m,
                      ArmaFilterWorkspace& ws) {
  ws.ar_full.setZero(m);
  ws.ma_full.setZero(m);  // ma_full(0) = 1, ma_full(j) = ma_j
  for (size_t i = 0; i < ar.size(); ++i) ws.ar_full(i) = ar[i];
  ws.ma_full(0) = 1.0;
  for (size_t j = 0; j < ma.size(); ++j) ws.ma_full(j + 1) = ma[j];
}

// out = T * in for the companion-type T: (T X)(i, .) = ar_i X(0, .) + X(i + 1, .).
template <typename In, typename Out>
void multiply_t_left(const Eigen::VectorXd& ar, const In& in, Out& out) {
  const Eigen::Index m = in.rows();
  for (Eigen::Index i = 0; i < m; ++i) {
    out.row(i) = ar(i) * in.row(0);
    if (i + 1 < m) out.row(i) += in.row(i + 1);
  }
}

// out = X * T' : (X T')(., j) = ar_j X(., 0) + X(., j + 1).
void multiply_t_right(const Eigen::VectorXd& ar, const Eigen::MatrixXd& in, Eigen::MatrixXd& out) {
  const Eigen::Index m = in.cols();
  for (Eigen::Index j = 0; j < m; ++j) {
    out.col(j) = ar(j) * in.col(0);
    if (j + 1 < m) out.col(j) += in.col(j + 1);
  }
}

// State recursion of G columns from column c0 with the gains already computed:
// a_{t+1} = T a_t + K_t v_t, v_t = y_t - a_t(0), storing v_t / sqrt(F_t). Steps from `transient`
// on use the steady gain (the last row of `gains`). Each column's recursion is a serial chain of
// dependent multiply-adds, so G independent columns advance together to keep the floating-point
// units busy (and row-major `y` makes their values at one step contiguous); every column sees
// the same operations in the same order as when filtered alone. M > 0 fixes the state dimension
// at compile time so the states live in registers; M = 0 handles any m through `buffer` (G x m).
template <int M, int G>
void filter_group(const RowMatrix& y, Eigen::Index c0, int m, const double* ar,
                  const RowMatrix& gains, const Eigen::VectorXd& inv_sqrt_f, Eigen::Index transient,
                  Eigen::MatrixXd& scaled, double* buffer) {
  const Eigen::Index n = y.rows();
  const Eigen::Index cols = y.cols();
  const int dim = M > 0 ? M : m;
  double local[G][std::max(M, 1)];
  double* a[G];
  double* w[G];
  for (int g = 0; g < G; ++g) {
    a[g] = M > 0 ? local[g] : buffer + static_cast<std::ptrdiff_t>(g) * m;
    for (int i = 0; i < dim; ++i) a[g][i] = 0.0;
    w[g] = scaled.col(c0 + g).data();
  }
  auto step = [&](Eigen::Index t, const double* k, double scale) {
    const double* yt = y.data() + t * cols + c0;
    for (int g = 0; g < G; ++g) {
      double* ag = a[g];
      const double v = yt[g] - ag[0];
      w[g][t] = v * scale;
      const double a0 = ag[0];
      for (int i = 0; i + 1 < dim; ++i) ag[i] = ar[i] * a0 + ag[i + 1] + k[i] * v;
      ag[dim - 1] = ar[dim - 1] * a0 + k[dim - 1] * v;
    }
  };
  for (Eigen::Index t = 0; t < transient; ++t) step(t, gains.data() + t * m, inv_sqrt_f(t));
  const double* k = gains.data() + (transient - 1) * m;
  const double scale = inv_sqrt_f(transient - 1);
  for (Eigen::Index t = transient; t < n; ++t) step(t, k, scale);
}

constexpr int kColumnGroup = 4;

template <int M>
void filter_columns(const RowMatrix& y, int m, const double* ar, const RowMatrix& gains,
                    const Eigen::VectorXd& inv_sqrt_f, Eigen::Index transient,
                    Eigen::MatrixXd& scaled, double* buffer) {
  const Eigen::Index cols = y.cols();
  Eigen::Index c = 0;
  for (; c + kColumnGroup <= cols; c += kColumnGroup)
    filter_group<M, kColumnGroup>(y, c, m, ar, gains, inv_sqrt_f, transient, scaled, buffer);
  for (; c + 2 <= cols; c += 2)
    filter_group<M, 2>(y, c, m, ar, gains, inv_sqrt_f, transient, scaled, buffer);
  for (; c < cols; ++c)
    filter_group<M, 1>(y, c, m, ar, gains, inv_sqrt_f, transient, scaled, buffer);
}

}  // namespace

bool stationary_state_covariance(std::span<const double> ar, std::span<const double> ma,
                                 ArmaFilterWorkspace& ws, Eigen::MatrixXd& p0) {
  const int m = state_dim(ar.size(), ma.size());
  load_polynomials(ar, ma, m, ws);
  // Doubling: P_{k+1} = P_k + A_k P_k A_k', A_{k+1} = A_k^2, from P_0 = R R', A_0 = T. After k
  // steps P holds the first 2^k terms of sum_j T^j R R' T'^j.
  p0.noalias() = ws.ma_full * ws.ma_full.transpose();
  ws.lyap_a.setZero(m, m);
  for (int i = 0; i < m; ++i) {
    ws.lyap_a(i, 0) = ws.ar_full(i);
    if (i + 1 < m) ws.lyap_a(i, i + 1) = 1.0;
  }
  for (int iter = 0; iter < 60; ++iter) {
    ws.lyap_tmp.noalias() = ws.lyap_a * p0;
    p0.noalias() += ws.lyap_tmp * ws.lyap_a.transpose();
    const double a_norm = ws.lyap_a.cwiseAbs().maxCoeff();
    if (!std::isfinite(a_norm) || a_norm > 1e12 || !p0.allFinite()) return false;
    if (a_norm == 0.0) return true;
    ws.lyap_tmp.noalias() = ws.lyap_a * ws.lyap_a;
    ws.lyap_a.swap(ws.lyap_tmp);
    // Converged when A^(2^k) is negligible beside P, and small in absolute terms: an explosive
    // AR part (phi = 2) grows P faster than A, so the relative test alone would accept it with
    // P near 1e38. P(0, 0) >= 1, so the absolute bound never delays a stationary P below 1e12.
    const double next_norm = ws.lyap_a.cwiseAbs().maxCoeff();
    if (next_norm < 1e-18 * std::max(1.0, p0.cwiseAbs().maxCoeff()) && next_norm < 1e-6)
      return true;
  }
  return false;
}

namespace {

// The gains K_t = T P_t Z' / F_t and 1 / sqrt(F_t) of every step until the state covariance has
// converged (then the gain is frozen) or the data end.
struct GainPass {
  Eigen::Index transient = 0;  // steps with their own gain; later ones use the last
  double sum_log_f = 0.0;      // over the transient steps
  double f = 0.0;              // F of the last transient step
  bool steady = false;         // the covariance converged (at step `transient`)
  bool ok = true;
};

// The Riccati recursion on the full state covariance, O(m^2) per step; it handles missing rows
// (a skipped update: a_{t+1} = T a_t, P_{t+1} = T P T' + R R').
GainPass riccati_gains(Eigen::Index n, int m, std::span<const unsigned char> missing,
                       ArmaFilterWorkspace& ws, std::vector<double>* f_values) {
  GainPass pass;
  pass.transient = n;
  ws.TP.resize(m, m);
  ws.Pnext.resize(m, m);
  ws.gain.resize(m);
  // The gain may freeze only after the last missing row (a skipped update moves P away again).
  Eigen::Index last_missing = -1;
  for (Eigen::Index t = 0; t < static_cast<Eigen::Index>(missing.size()) && t < n; ++t)
    if (missing[t]) last_missing = t;
  for (Eigen::Index t = 0; t < n; ++t) {
    if (t <= last_missing && missing[t]) {
      ws.gains.row(t).setZero();
      ws.inv_sqrt_f(t) = 0.0;
      multiply_t_left(ws.ar_full, ws.P, ws.TP);
      multiply_t_right(ws.ar_full, ws.TP, ws.Pnext);
      ws.Pnext.noalias() += ws.ma_full * ws.ma_full.transpose();
      ws.P.swap(ws.Pnext);
      continue;
    }
    const double f = ws.P(0, 0);
    if (!(f > 0.0) || !std::isfinite(f)) {
      pass.ok = false;
      return pass;
    }
    pass.f = f;
    // K = T P Z' / F
    multiply_t_left(ws.ar_full, ws.P.col(0), ws.gain);
    ws.gain /= f;
    ws.gains.row(t) = ws.gain.transpose();
    ws.inv_sqrt_f(t) = 1.0 / std::sqrt(f);
    pass.sum_log_f += std::log(f);
    if (f_values) (*f_values)[t] = f;
    // P_{t+1} = T P T' + R R' - K K' F
    multiply_t_left(ws.ar_full, ws.P, ws.TP);
    multiply_t_right(ws.ar_full, ws.TP, ws.Pnext);
    ws.Pnext.noalias() += ws.ma_full * ws.ma_full.transpose();
    ws.Pnext.noalias() -= (f * ws.gain) * ws.gain.transpose();
    const double change = (ws.Pnext - ws.P).cwiseAbs().maxCoeff();
    ws.P.swap(ws.Pnext);
    if (change < kSteadyTolerance && t > last_missing) {
      pass.transient = t + 1;
      pass.steady = true;
      break;
    }
  }
  return pass;
}

// Whether 1 - sum a_j B^j has every root outside the unit circle: the step-down recursion (the
// Durbin-Levinson recursion run backwards) keeps every partial autocorrelation inside (-1, 1).
bool is_stationary(const double* coef, int p, Eigen::VectorXd& a, Eigen::VectorXd& prev) {
  a = Eigen::Map<const Eigen::VectorXd>(coef, p);
  prev.resize(p);
  for (int k = p - 1; k >= 0; --k) {
    const double r = a(k);
    if (!(std::abs(r) < 1.0)) return false;
    const double denom = 1.0 - r * r;
    for (int j = 0; j < k; ++j) prev(j) = (a(j) + r * a(k - 1 - j)) / denom;
    for (int j = 0; j < k; ++j) a(j) = prev(j);
  }
  return true;
}

// First column of the stationary state covariance (sigma^2 = 1) from the autocovariances
// gamma(k) of the ARMA process and its psi-weights: unrolling the state recursion gives
//   alpha_t(l) = sum_{j=0}^{m-1-l} (ar_{l+j} n_{t-1-j} + R_{l+j} a_{t-j}),
// so P(0, l) = Cov(n_t, alpha_t(l)) = sum_j (ar_{l+j} gamma(j + 1) + R_{l+j} psi_j). The
// autocovariances solve the (p + 1) x (p + 1) system
//   gamma(k) - sum_i phi_i gamma(|k - i|) = sum_{j >= k} theta_j psi_{j-k},  k = 0..p
// (Brockwell & Davis 1991, sec. 3.3, the second method), and follow by the recursion beyond.
// Costs O(p^3 + m^2) against the O(m^3 log) of the doubling, which the filter needs only for the
// full covariance. Returns false for a non-stationary AR part.
bool stationary_first_column(int p, int q, int m, ArmaFilterWorkspace& ws, Eigen::VectorXd& col) {
  const double* ar = ws.ar_full.data();
  const double* ma = ws.ma_full.data();  // ma[0] = 1
  if (p > 0 && !is_stationary(ar, p, ws.lyap_tmp_v, ws.chandra_tw)) return false;
  Eigen::VectorXd& psi = ws.psi;
  Eigen::VectorXd& gamma = ws.gamma;
  psi.resize(m);
  for (int j = 0; j < m; ++j) {
    double v = ma[j];
    for (int i = 1; i <= std::min(j, p); ++i) v += ar[i - 1] * psi(j - i);
    psi(j) = v;
  }
  gamma.setZero(m + 1);
  if (p == 0) {
    for (int k = 0; k < m; ++k)
      for (int j = 0; j + k < m; ++j) gamma(k) += ma[j] * ma[j + k];
  } else {
    // c_k = sum_{j=k}^{q} theta_j psi_{j-k}
    auto rhs = [&](int k) {
      double c = 0.0;
      for (int j = k; j <= q; ++j) c += ma[j] * psi(j - k);
      return c;
    };
    ws.lyap_a.setZero(p + 1, p + 1);
    ws.gamma_rhs.resize(p + 1);
    for (int k = 0; k <= p; ++k) {
      ws.lyap_a(k, k) += 1.0;
      for (int i = 1; i <= p; ++i) ws.lyap_a(k, std::abs(k - i)) -= ar[i - 1];
      ws.gamma_rhs(k) = rhs(k);
    }
    ws.gamma_lu.compute(ws.lyap_a);
    gamma.head(p + 1) = ws.gamma_lu.solve(ws.gamma_rhs);
    for (int k = p + 1; k <= m; ++k) {
      double v = rhs(k);
      for (int i = 1; i <= p; ++i) v += ar[i - 1] * gamma(k - i);
      gamma(k) = v;
    }
  }
  col.resize(m);
  for (int l = 0; l < m; ++l) {
    double v = 0.0;
    for (int j = 0; l + j < m; ++j) v += ar[l + j] * gamma(j + 1) + ma[l + j] * psi(j);
    col(l) = v;
  }
  return col.allFinite() && col(0) > 0.0;
}

// The same gains by the Chandrasekhar-type recursions of a time-invariant model (Morf, Sidhu &
// Kailath 1974; Harvey 1989, sec. 3.3.4): the filter needs only F_t and T P_t Z', and from the
// stationary start the change P_{t+1} - P_t = W_t M_t W_t' has rank one, so
//   F_{t+1} = F_t + M_t w_t^2,                  w_t = Z W_t = W_t(0),
//   T P_{t+1} Z' = T P_t Z' + M_t w_t T W_t,
//   W_{t+1} = T W_t - (T P_t Z') w_t / F_t,     M_{t+1} = M_t - M_t^2 w_t^2 / F_{t+1},
// from W_0 = T P_0 Z', M_0 = -1 / F_0: O(m) per step with the companion T instead of the
// O(m^2) update of P (14 states for an MA(1) x seasonal MA(1) at period 12). Only the first
// column of P_0 is read. The steady state is declared on the same test as the Riccati pass:
// max |P_{t+1} - P_t| = |M_t| max_i W_t(i)^2 below the tolerance.
GainPass chandrasekhar_gains(Eigen::Index n, int m, const Eigen::VectorXd& p0,
                             ArmaFilterWorkspace& ws, std::vector<double>* f_values) {
  GainPass pass;
  pass.transient = n;
  const double* ar = ws.ar_full.data();
  ws.gain.resize(m);       // T P_t Z'
  ws.chandra_w.resize(m);  // W_t
  ws.chandra_tw.resize(m);
  double* kbar = ws.gain.data();
  double* w = ws.chandra_w.data();
  double* tw = ws.chandra_tw.data();
  double f = p0(0);
  for (int i = 0; i < m; ++i) kbar[i] = ar[i] * f + (i + 1 < m ? p0(i + 1) : 0.0);
  for (int i = 0; i < m; ++i) w[i] = kbar[i];
  double mm = -1.0 / f;
  for (Eigen::Index t = 0; t < n; ++t) {
    if (!(f > 0.0) || !std::isfinite(f)) {
      pass.ok = false;
      return pass;
    }
    pass.f = f;
    const double inv_f = 1.0 / f;
    double* k = ws.gains.data() + t * m;
    for (int i = 0; i < m; ++i) k[i] = kbar[i] * inv_f;
    ws.inv_sqrt_f(t) = 1.0 / std::sqrt(f);
    pass.sum_log_f += std::log(f);
    if (f_values) (*f_values)[t] = f;
    double w_max = 0.0;
    for (int i = 0; i < m; ++i) w_max = std::max(w_max, std::abs(w[i]));
    if (std::abs(mm) * w_max * w_max < kSteadyTolerance) {
      pass.transient = t + 1;
      pass.steady = true;
      break;
    }
    const double w0 = w[0];
    for (int i = 0; i + 1 < m; ++i) tw[i] = ar[i] * w0 + w[i + 1];
    tw[m - 1] = ar[m - 1] * w0;
    const double mw = mm * w0;
    const double f_next = f + mw * w0;
    const double shift = w0 * inv_f;
    for (int i = 0; i < m; ++i) {
      w[i] = tw[i] - kbar[i] * shift;
      kbar[i] += mw * tw[i];
    }
    mm -= mw * mw / f_next;
    f = f_next;
  }
  return pass;
}

}  // namespace

ArmaFilterSummary arma_filter(std::span<const double> ar, std::span<const double> ma,
                              const RowMatrix& y, ArmaFilterWorkspace& ws,
                              std::vector<double>* innovations, std::vector<double>* f_values,
                              std::span<const unsigned char> missing) {
  ArmaFilterSummary out;
  const Eigen::Index n = y.rows();
  const Eigen::Index cols = y.cols();
  const int m = state_dim(ar.size(), ma.size());
  out.cross.setZero(cols, cols);
  if (innovations) innovations->assign(n, 0.0);
  if (f_values) f_values->assign(n, 0.0);
  ws.gains.resize(n, m);
  ws.inv_sqrt_f.resize(n);

  // 1. The gains depend only on the ARMA coefficients: run the covariance recursion once,
  // until it has converged (then the gain is frozen) or the data end. The fast recursion needs
  // only the first column of the stationary covariance; with missing rows the Riccati one needs
  // all of it.
  const bool any_missing =
      std::any_of(missing.begin(), missing.end(), [](unsigned char flag) { return flag != 0; });
  const bool fast = !any_missing && ws.recursion == GainRecursion::fast;
  load_polynomials(ar, ma, m, ws);
  const bool stationary =
      fast ? stationary_first_column(static_cast<int>(ar.size()), static_cast<int>(ma.size()), m,
                                     ws, ws.p0_column)
           : stationary_state_covariance(ar, ma, ws, ws.P);
  if (!stationary) {
    out.ok = false;
    return out;
  }
  if (n == 0) return out;
  const GainPass pass = fast ? chandrasekhar_gains(n, m, ws.p0_column, ws, f_values)
                             : riccati_gains(n, m, missing, ws, f_values);
  if (!pass.ok) {
    out.ok = false;
    return out;
  }
  const Eigen::Index transient = pass.transient;
  const double f = pass.f;
  out.sum_log_f = pass.sum_log_f;
  if (pass.steady) out.steady_from = static_cast<int>(transient);
  // Every later step has the same F.
  out.sum_log_f += static_cast<double>(n - transient) * std::log(f);
  if (f_values)
    for (Eigen::Index t = transient; t < n; ++t) (*f_values)[t] = f;

  // 2. Each column through the state recursion (one column at a time keeps its state in
  // registers; this loop is where a fit spends most of its time), then the weighted
  // cross-products of the standardised innovations as dot products of contiguous columns
  // (cheaper than a blocked product at these sizes).
  ws.scaled.resize(n, cols);
  const double* ar_coef = ws.ar_full.data();
  switch (m) {
    case 1:
      filter_columns<1>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    case 2:
      filter_columns<2>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    case 3:
      filter_columns<3>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    case 4:
      filter_columns<4>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    case 13:  // AR(1) x seasonal AR(1) at period 12
      filter_columns<13>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    case 14:  // MA(1) x seasonal MA(1) at period 12
      filter_columns<14>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled, nullptr);
      break;
    default:
      ws.states.resize(kColumnGroup, m);
      filter_columns<0>(y, m, ar_coef, ws.gains, ws.inv_sqrt_f, transient, ws.scaled,
                        ws.states.data());
  }
  if (innovations)
    for (Eigen::Index t = 0; t < n; ++t) (*innovations)[t] = ws.scaled(t, 0);
  for (Eigen::Index a = 0; a < cols; ++a)
    for (Eigen::Index b = 0; b <= a; ++b)
      out.cross(a, b) = out.cross(b, a) = ws.scaled.col(a).dot(ws.scaled.col(b));
  return out;
}

ArmaEndState arma_end_state(std::span<const double> ar, std::span<const double> ma,
                            std::span<const double> y, ArmaFilterWorkspace& ws) {
  const int m = state_dim(ar.size(), ma.size());
  ArmaEndState end;
  if (!stationary_state_covariance(ar, ma, ws, ws.P)) return end;
  Eigen::VectorXd a = Eigen::VectorXd::Zero(m), next(m), gain(m);
  Eigen::MatrixXd tp(m, m), pn(m, m);
  for (const double yt : y) {
    if (std::isnan(yt)) {  // missing: predict without an update
      multiply_t_left(ws.ar_full, a, next);
      a = next;
      multiply_t_left(ws.ar_full, ws.P, tp);
      multiply_t_right(ws.ar_full, tp, pn);
      pn.noalias() += ws.ma_full * ws.ma_full.transpose();
      ws.P.swap(pn);
      continue;
    }
    const double f = ws.P(0, 0);
    multiply_t_left(ws.ar_full, ws.P.col(0), gain);
    gain /= f;
    const double v = yt - a(0);
    multiply_t_left(ws.ar_full, a, next);
    a = next + gain * v;
    multiply_t_left(ws.ar_full, ws.P, tp);
    multiply_t_right(ws.ar_full, tp, pn);
    pn.noalias() += ws.ma_full * ws.ma_full.transpose();
    pn.noalias() -= (f * gain) * gain.transpose();
    ws.P.swap(pn);
  }
  end.state = a;
  end.cov = ws.P;
  return end;
}

}  // namespace lagsieve
