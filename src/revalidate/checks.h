#pragma once
// The statistical checks of a re-validation, as pure functions of plain numbers (so each one is
// checked against R in tests/revalidate/reference/).
//
// Degradation of accuracy. The model file keeps, per horizon h, only the mean scaled absolute
// error (MASE) and the record count of the training-time backtest, not the errors themselves,
// and its origins do not overlap the new period's; a paired Diebold-Mariano test is therefore
// impossible. The test is a two-sample one-sided comparison of means with a Diebold-Mariano
// style long-run variance:
//   e_j = |y - yhat| / scale, the new period's scaled errors at horizon h (origin order), n of them
//   ebar = mean(e),  gamma_k = (1/n) sum_{j>k} (e_j - ebar)(e_{j-k} - ebar)
//   S = gamma_0 + 2 sum_{k=1}^{h-1} gamma_k   (h-step errors overlap: at most MA(h-1); S <= 0 falls
//                                              back to gamma_0, as in evaluation/diebold_mariano.h)
//   T = (ebar - m0) / sqrt(S (1/n + 1/n0)),  p = P(T_{n-1} > T)   (one-sided: worse than before)
// m0, n0: the training-time MASE and record count at h. Under "nothing changed" the training
// errors have the same dispersion as the new ones, so S stands in for both samples (n0 = 0:
// m0 taken as exact). If the new period is worse, S is inflated too, which makes the test
// conservative exactly when it rejects, never anti-conservative.
//
// Residual checks on the new period's one-step innovations r_t (standardised, variance sigma^2):
//   Ljung-Box (Ljung & Box 1978): Q = n(n+2) sum_{k<=L} rho_k^2 / (n-k), df = L - (ARMA terms);
//   mean shift: t = mean / (sd sqrt(1/n + 1/n_fit)), df n - 1, two-sided. The constant was
//     estimated on the n_fit training residuals, whose mean its error carries into every new
//     residual (for ARMA noise, new mean ~ mean(a_new) - mean(a_train)); the 1/n_fit term is
//     that error (the logic of a predictive test). n_fit = 0 gives the one-sample t-test;
//   variance change: F = mean(r^2) / sigma2 (the innovations have mean zero under the model, so
//     mean(r^2) has n degrees of freedom; sigma2 has n_fit - k), F(n, n_fit - k), two-sided;
//   interval coverage at horizon 1 (independent under the model): count inside ~ Binomial(n, level),
//     p = min(1, 2 min(P(X <= x), P(X >= x))) (central two-sided).
#include <span>
#include <string>

namespace lagsieve {

struct DegradationTest {
  int horizon = 1;
  int n = 0;                      // new-period scaled errors
  double mean = 0.0;              // new-period MASE
  double baseline = 0.0;          // training-time MASE (m0)
  int baseline_count = 0;         // its record count (n0; 0 = taken as exact)
  double ratio = 0.0;             // mean / baseline
  double long_run_variance = 0.0; // S
  double statistic = 0.0;         // T; NaN when no test was possible
  double p_value = 1.0;           // one-sided (new period worse)
  std::string note;               // why no test, or the variance fallback
};

// Needs n >= 5 finite errors and a positive finite baseline; otherwise statistic NaN, p 1, note.
DegradationTest degradation_test(std::span<const double> scaled_errors, int horizon,
                                 double baseline, int baseline_count);

struct LjungBoxCheck {
  int n = 0;
  int lag = 0;
  int df = 0;
  double statistic = 0.0;
  double p_value = 1.0;           // NaN statistic and p 1 when df < 1 or n too small
};
LjungBoxCheck ljung_box_check(std::span<const double> residuals, int lag, int fitted_arma_terms);

struct MeanShiftCheck {
  int n = 0;
  double mean = 0.0;
  double sd = 0.0;
  int fit_count = 0;              // n_fit (0: the fitted mean taken as exact)
  double statistic = 0.0;
  double p_value = 1.0;           // two-sided
};
MeanShiftCheck mean_shift_check(std::span<const double> residuals, int fit_count = 0);

struct VarianceChangeCheck {
  int n = 0;
  double new_variance = 0.0;      // mean(r^2)
  double reference_variance = 0.0;  // sigma^2 of the fit
  double ratio = 0.0;
  double df_new = 0.0, df_reference = 0.0;
  double p_value = 1.0;           // two-sided
};
VarianceChangeCheck variance_change_check(std::span<const double> residuals, double sigma2,
                                          double df_reference);

struct CoverageCheck {
  double level = 0.0;
  int count = 0;
  int inside = 0;
  double observed = 0.0;
  double p_value = 1.0;           // central two-sided binomial
};
CoverageCheck coverage_check(int inside, int count, double level);

// P(F <= x) for F ~ F(d1, d2), by the regularized incomplete beta function.
double f_cdf(double x, double d1, double d2);
// P(X <= k) for X ~ Binomial(n, p).
double binomial_cdf(int k, int n, double p);

}  // namespace lagsieve
