#include "evaluation/distributions.h"

#include <algorithm>
#include <math.h>  // lgamma_r

#include <cmath>
#include <numbers>
#include <limits>

namespace lagsieve {
namespace {

// ln|Gamma(x)| without std::lgamma, which writes the global `signgam` and so races when the
// search's threads compute p-values at once (found by ThreadSanitizer); lgamma_r is reentrant.
double log_gamma(double x) {
  int sign = 0;
  return ::lgamma_r(x, &sign);
}

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kEps = 1e-16;
constexpr double kTiny = 1e-300;  // keeps Lentz's recurrences away from division by zero
constexpr int kMaxTerms = 10000;

// Evaluates the continued fraction  a1/(b1 + a2/(b2 + a3/(b3 + ...)))  by the modified Lentz
// method; term(j, a, b) fills a_j and b_j for j = 1, 2, ...
template <typename Terms>
double continued_fraction(Terms term) {
  double f = kTiny;
  double c = f;
  double d = 0.0;
  for (int j = 1; j <= kMaxTerms; ++j) {
    double aj = 0.0;
    double bj = 0.0;
    term(j, aj, bj);
    d = bj + aj * d;
    if (std::fabs(d) < kTiny) d = kTiny;
    c = bj + aj / c;
    if (std::fabs(c) < kTiny) c = kTiny;
    d = 1.0 / d;
    const double delta = c * d;
    f *= delta;
    if (std::fabs(delta - 1.0) < kEps) break;
  }
  return f;
}

// lgamma(x) - [(x - 1/2) ln x - x + ln(2 pi)/2], the Stirling remainder, for x >= 10; the terms
// beyond x^-11 are below 1e-17 there.
double stirling_remainder(double x) {
  const double r = 1.0 / (x * x);
  return (1.0 / 12.0 +
          r * (-1.0 / 360.0 + r * (1.0 / 1260.0 + r * (-1.0 / 1680.0 +
                                                       r * (1.0 / 1188.0 + r * (-691.0 / 360360.0)))))) /
         x;
}

// ln B(a, b). Summing three lgamma values cancels badly when an argument is large (t with
// thousands of df loses 3 digits), so large arguments use Stirling's form with the leading terms
// combined analytically.
double log_beta(double a, double b) {
  const double small = std::min(a, b);
  const double big = std::max(a, b);
  if (big < 10.0) return log_gamma(a) + log_gamma(b) - log_gamma(a + b);
  const double corr = stirling_remainder(big) - stirling_remainder(big + small);
  if (small < 10.0) {
    // lgamma(big) - lgamma(big + small) = -(big - 1/2) log1p(small/big) - small ln(big + small)
    //                                     + small + corr.
    return log_gamma(small) - (big - 0.5) * std::log1p(small / big) -
           small * std::log(big + small) + small + corr;
  }
  return 0.5 * std::log(2.0 * std::numbers::pi) - big * std::log1p(small / big) -
         small * std::log1p(big / small) + 0.5 * std::log((a + b) / (a * b)) + corr +
         stirling_remainder(small);
}

// I_x(a, b) with y = 1 - x passed separately so callers that know y exactly keep its precision.
double incomplete_beta(double a, double b, double x, double y) {
  if (x <= 0.0) return 0.0;
  if (y <= 0.0) return 1.0;
  // The fraction converges quickly only below the mean-ish point; use the reflection
  // I_x(a, b) = 1 - I_{1-x}(b, a) above it.
  if (x > (a + 1.0) / (a + b + 2.0)) return 1.0 - incomplete_beta(b, a, y, x);
  const double front = std::exp(a * std::log(x) + b * std::log(y) - log_beta(a, b)) / a;
  // A&S 26.5.8: I_x = front / (1 + d1/(1 + d2/(1 + ...))), with
  //   d_{2m+1} = -(a+m)(a+b+m) x / ((a+2m)(a+2m+1)),  d_{2m} = m(b-m) x / ((a+2m-1)(a+2m)).
  const double cf = continued_fraction([&](int j, double& aj, double& bj) {
    bj = 1.0;
    if (j == 1) {
      aj = 1.0;
      return;
    }
    const int k = j - 1;  // index of d_k
    if (k % 2 == 1) {
      const double m = (k - 1) / 2;
      aj = -(a + m) * (a + b + m) * x / ((a + 2.0 * m) * (a + 2.0 * m + 1.0));
    } else {
      const double m = k / 2;
      aj = m * (b - m) * x / ((a + 2.0 * m - 1.0) * (a + 2.0 * m));
    }
  });
  return front * cf;
}

// Series for P(a, x) (A&S 6.5.29): x^a e^-x / Gamma(a+1) * sum_n x^n / ((a+1)...(a+n)).
double gamma_lower_series(double a, double x) {
  double term = 1.0;
  double sum = 1.0;
  for (int n = 1; n <= kMaxTerms; ++n) {
    term *= x / (a + n);
    sum += term;
    if (std::fabs(term) < std::fabs(sum) * kEps) break;
  }
  return sum * std::exp(a * std::log(x) - x - log_gamma(a + 1.0));
}

// Continued fraction for Q(a, x) (A&S 6.5.31 in its even form):
// Q = x^a e^-x / Gamma(a) * 1/(x+1-a - 1(1-a)/(x+3-a - 2(2-a)/(x+5-a - ...))).
double gamma_upper_fraction(double a, double x) {
  const double cf = continued_fraction([&](int j, double& aj, double& bj) {
    const double n = j - 1;
    aj = j == 1 ? 1.0 : -n * (n - a);
    bj = x + 2.0 * n + 1.0 - a;
  });
  return cf * std::exp(a * std::log(x) - x - log_gamma(a));
}

double evaluate(const double* coef, int count, double r) {
  double v = coef[count - 1];
  for (int i = count - 2; i >= 0; --i) v = v * r + coef[i];
  return v;
}

}  // namespace

double normal_cdf(double x) { return 0.5 * std::erfc(-x / std::sqrt(2.0)); }

double normal_quantile(double p) {
  // Wichura (1988), AS 241, PPND16: rational approximations in three regions, about 1e-16
  // relative accuracy. Coefficients are listed lowest power first.
  static constexpr double a[] = {3.3871328727963666080e0,  1.3314166789178437745e+2,
                                 1.9715909503065514427e+3, 1.3731693765509461125e+4,
                                 4.5921953931549871457e+4, 6.7265770927008700853e+4,
                                 3.3430575583588128105e+4, 2.5090809287301226727e+3};
  static constexpr double b[] = {1.0,
                                 4.2313330701600911252e+1, 6.8718700749205790830e+2,
                                 5.3941960214247511077e+3, 2.1213794301586595867e+4,
                                 3.9307895800092710610e+4, 2.8729085735721942674e+4,
                                 5.2264952788528545610e+3};
  static constexpr double c[] = {1.42343711074968357734e0,  4.63033784615654529590e0,
                                 5.76949722146069140550e0,  3.64784832476320460504e0,
                                 1.27045825245236838258e0,  2.41780725177450611770e-1,
                                 2.27238449892691845833e-2, 7.74545014278341407640e-4};
  static constexpr double d[] = {1.0,
                                 2.05319162663775882187e0,  1.67638483018380384940e0,
                                 6.89767334985100004550e-1, 1.48103976427480074590e-1,
                                 1.51986665636164571966e-2, 5.47593808499534494600e-4,
                                 1.05075007164441684324e-9};
  static constexpr double e[] = {6.65790464350110377720e0,  5.46378491116411436990e0,
                                 1.78482653991729133580e0,  2.96560571828504891230e-1,
                                 2.65321895265761230930e-2, 1.24266094738807843860e-3,
                                 2.71155556874348757815e-5, 2.01033439929228813265e-7};
  static constexpr double f[] = {1.0,
                                 5.99832206555887937690e-1, 1.36929880922735805310e-1,
                                 1.48753612908506148525e-2, 7.86869131145613259100e-4,
                                 1.84631831751005468180e-5, 1.42151175831644588870e-7,
                                 2.04426310338993978564e-15};
  if (std::isnan(p) || p < 0.0 || p > 1.0) return kNaN;
  if (p == 0.0) return -kInf;
  if (p == 1.0) return kInf;
  const double q = p - 0.5;
  if (std::fabs(q) <= 0.425) {
    const double r = 0.180625 - q * q;
    return q * evaluate(a, 8, r) / evaluate(b, 8, r);
  }
  double r = std::sqrt(-std::log(q < 0.0 ? p : 1.0 - p));
  double value = 0.0;
  if (r <= 5.0) {
    r -= 1.6;
    value = evaluate(c, 8, r) / evaluate(d, 8, r);
  } else {
    r -= 5.0;
    value = evaluate(e, 8, r) / evaluate(f, 8, r);
  }
  return q < 0.0 ? -value : value;
}

double regularized_incomplete_beta(double a, double b, double x) {
  if (!(a > 0.0) || !(b > 0.0) || std::isnan(x) || x < 0.0 || x > 1.0) return kNaN;
  return incomplete_beta(a, b, x, 1.0 - x);
}

double student_t_two_sided_p(double x, double df) {
  if (!(df > 0.0) || std::isnan(x)) return kNaN;
  if (std::isinf(x)) return 0.0;
  // P(|T| >= |x|) = I_{df/(df+x^2)}(df/2, 1/2); both arguments of the beta function are formed
  // directly so neither loses digits to 1 - (something close to 1).
  const double x2 = x * x;
  const double w = df / (df + x2);
  const double wc = x2 / (df + x2);
  return incomplete_beta(0.5 * df, 0.5, w, wc);
}

double student_t_cdf(double x, double df) {
  const double two_sided = student_t_two_sided_p(x, df);
  if (std::isnan(two_sided)) return kNaN;
  return x < 0.0 ? 0.5 * two_sided : 1.0 - 0.5 * two_sided;
}

double student_t_quantile(double p, double df) {
  if (!(df > 0.0) || std::isnan(p) || p < 0.0 || p > 1.0) return kNaN;
  if (p == 0.0) return -std::numeric_limits<double>::infinity();
  if (p == 1.0) return std::numeric_limits<double>::infinity();
  if (p == 0.5) return 0.0;
  // Solve P(|T| >= x) = 2 min(p, 1 - p) for x > 0 on the upper-tail side (no cancellation in the
  // tails): Newton steps on the log of the tail, safeguarded by a bracket that bisection keeps.
  const double tail = 2.0 * std::min(p, 1.0 - p);
  // f(x) = (1 + x^2 / df)^(-(df + 1) / 2) / (sqrt(df) B(df / 2, 1 / 2)).
  const double log_density_constant = -0.5 * std::log(df) - log_beta(0.5 * df, 0.5);
  double lo = 0.0, hi = 1.0;
  while (student_t_two_sided_p(hi, df) > tail && hi < 1e300) lo = hi, hi *= 4.0;
  const double z = normal_quantile(1.0 - 0.5 * tail);  // Cornish-Fisher start (Hill 1970)
  double x = z + (z * z * z + z) / (4.0 * df);
  if (!(x > lo && x < hi)) x = 0.5 * (lo + hi);
  for (int iter = 0; iter < 200; ++iter) {
    const double q = student_t_two_sided_p(x, df);
    if (q > tail)
      lo = x;
    else
      hi = x;
    const double log_density = log_density_constant - 0.5 * (df + 1.0) * std::log1p(x * x / df);
    // d/dx log q(x) = -2 f(x) / q(x); the step solves log q = log tail to first order.
    double next = x + (std::log(q) - std::log(tail)) * q / (2.0 * std::exp(log_density));
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (std::abs(next - x) <= 1e-15 * x) {
      x = next;
      break;
    }
    x = next;
  }
  return p < 0.5 ? -x : x;
}

double regularized_gamma_lower(double a, double x) {
  if (!(a > 0.0) || std::isnan(x) || x < 0.0) return kNaN;
  if (x == 0.0) return 0.0;
  if (std::isinf(x)) return 1.0;
  return x < a + 1.0 ? gamma_lower_series(a, x) : 1.0 - gamma_upper_fraction(a, x);
}

double regularized_gamma_upper(double a, double x) {
  if (!(a > 0.0) || std::isnan(x) || x < 0.0) return kNaN;
  if (x == 0.0) return 1.0;
  if (std::isinf(x)) return 0.0;
  return x < a + 1.0 ? 1.0 - gamma_lower_series(a, x) : gamma_upper_fraction(a, x);
}

double chi_square_upper_tail(double x, double df) {
  if (!(df > 0.0) || std::isnan(x)) return kNaN;
  if (x <= 0.0) return 1.0;
  return regularized_gamma_upper(0.5 * df, 0.5 * x);
}

}  // namespace lagsieve
