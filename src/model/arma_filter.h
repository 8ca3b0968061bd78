#pragma once
// Exact Gaussian filtering of ARMA noise by the Kalman filter on the state-space form
//   n_t = Z alpha_t,  alpha_{t+1} = T alpha_t + R a_{t+1},  Z = e_1,
// T = [ar | I; 0] (m x m, m = max(p', q' + 1)), R = (1, ma_1, ..., ma_{m-1})',
// with the stationary initial covariance and sigma^2 = 1 (it is concentrated out by the caller).
// Without missing rows the gains come from Chandrasekhar-type recursions, O(m) per step, started
// from the first column of the stationary covariance (from the autocovariances); with missing
// rows from the Riccati recursion on the full covariance (the Lyapunov equation solved by
// doubling), O(m^2) per step. Once the state covariance has converged the filter switches to the
// steady-state gain (Gardner, Harvey & Phillips 1980).
//
// The gains depend only on the ARMA coefficients, so one pass filters several columns at once
// (the target and every regressor of the GLS step): each column gets its own state vector.
#include <Eigen/Core>
#include <Eigen/LU>
#include <span>
#include <vector>

namespace lagsieve {

using RowMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

// How the filter computes its gains. `fast` uses the O(m)-per-step Chandrasekhar-type
// recursions when no row is missing (the Riccati recursion otherwise); `riccati` always updates
// the full state covariance (O(m^2) per step), the reference the fast one is tested against.
enum class GainRecursion { fast, riccati };

// Scratch space reused across likelihood evaluations of one fit (never shared between threads).
struct ArmaFilterWorkspace {
  Eigen::MatrixXd P, TP, Pnext, lyap_a, lyap_tmp;
  Eigen::VectorXd gain, ar_full, ma_full;
  Eigen::VectorXd chandra_w, chandra_tw;  // W_t and T W_t of the Chandrasekhar recursions
  Eigen::VectorXd p0_column, psi, gamma, gamma_rhs, lyap_tmp_v;  // the stationary first column
  Eigen::PartialPivLU<Eigen::MatrixXd> gamma_lu;                 // its autocovariance system
  GainRecursion recursion = GainRecursion::fast;
  RowMatrix states;            // scratch states of one column group (4 x m) when m > 4
  RowMatrix gains;             // Kalman gain K_t of each step before the steady state (steps x m)
  Eigen::VectorXd inv_sqrt_f;  // 1 / sqrt(F_t) of the same steps
  Eigen::MatrixXd scaled;      // n x columns: standardised innovations v_t / sqrt(F_t)
};

struct ArmaFilterSummary {
  Eigen::MatrixXd cross;   // sum_t v_t v_t' / F_t over the columns (cols x cols)
  double sum_log_f = 0.0;  // sum_t log F_t
  int steady_from = -1;    // first step filtered with the steady-state gain (-1: never)
  bool ok = true;          // false when F_t became non-positive or non-finite
};

// Stationary covariance of the state: P = T P T' + R R'. Returns false when it does not
// converge (a non-stationary AR part).
bool stationary_state_covariance(std::span<const double> ar, std::span<const double> ma,
                                 ArmaFilterWorkspace& ws, Eigen::MatrixXd& p0);

// Filters every column of `y` (n x cols, row t = time t) and accumulates the cross-product of
// the standardised innovations. When `innovations` is non-null it receives v_t / sqrt(F_t) of
// column 0 (the residuals), and `f_values` (if non-null) F_t.
//
// `missing` (empty, or one flag per row) marks rows whose observation is missing: the filter
// predicts through them without an update (gain 0, no innovation, no log F_t), so the summary
// is the exact likelihood of the observed rows alone. Their values in `y` are never read into
// the result but must be finite (callers write 0). Innovations and F_t there are 0.
ArmaFilterSummary arma_filter(std::span<const double> ar, std::span<const double> ma,
                              const RowMatrix& y, ArmaFilterWorkspace& ws,
                              std::vector<double>* innovations = nullptr,
                              std::vector<double>* f_values = nullptr,
                              std::span<const unsigned char> missing = {});

// Filtered state at the end of a single-column pass: the one-step prediction a_{n|n-1} of the
// state for time n (just past the data) and its covariance; the forecaster starts from these.
struct ArmaEndState {
  Eigen::VectorXd state;  // a_{n}: prediction of alpha_n given data up to n - 1
  Eigen::MatrixXd cov;    // its covariance in units of sigma^2
};
// A NaN in `y` is a missing observation: the state is predicted through it without an update.
ArmaEndState arma_end_state(std::span<const double> ar, std::span<const double> ma,
                            std::span<const double> y, ArmaFilterWorkspace& ws);

}  // namespace lagsieve
