#pragma once
// Distribution functions the evaluation and diagnostics layers need for p-values and interval
// bounds, written here so the engine does not depend on a statistics library:
//   normal_cdf, normal_quantile (Wichura 1988, Applied Statistics 37, AS 241, PPND16),
//   student_t_cdf / student_t_two_sided_p via the regularized incomplete beta function,
//   chi_square_upper_tail via the regularized incomplete gamma function (Ljung-Box p-values).
// The incomplete beta and gamma use the classical series / continued-fraction expansions
// (Abramowitz & Stegun 6.5.29, 6.5.31, 26.5.8) evaluated with the modified Lentz method.
// Accuracy is checked against R's pnorm/qnorm/pt/pchisq in tests/reference/distributions/.
// All functions are pure; invalid arguments (df <= 0, p outside [0,1]) return NaN.

namespace lagsieve {

// P(Z <= x) for Z ~ N(0, 1).
double normal_cdf(double x);

// x with P(Z <= x) = p; -inf at p = 0, +inf at p = 1, NaN outside [0, 1].
double normal_quantile(double p);

// P(T <= x) for T ~ Student t with df > 0 degrees of freedom (df need not be an integer).
double student_t_cdf(double x, double df);

// x with P(T <= x) = p for T ~ Student t with df > 0 degrees of freedom; -inf at p = 0, +inf at
// p = 1, NaN outside [0, 1].
double student_t_quantile(double p, double df);

// P(|T| >= |x|), computed without the cancellation of 1 - cdf in the tails.
double student_t_two_sided_p(double x, double df);

// P(X > x) for X ~ chi-square with df > 0 degrees of freedom; 1 for x <= 0.
double chi_square_upper_tail(double x, double df);

// I_x(a, b), the regularized incomplete beta function, for a, b > 0 and 0 <= x <= 1.
double regularized_incomplete_beta(double a, double b, double x);

// P(a, x) and Q(a, x) = 1 - P(a, x), the regularized lower/upper incomplete gamma functions,
// for a > 0, x >= 0. Each is computed directly where it is small, so tails keep relative accuracy.
double regularized_gamma_lower(double a, double x);
double regularized_gamma_upper(double a, double x);

}  // namespace lagsieve
