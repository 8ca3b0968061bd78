#pragma once
// Diebold-Mariano (1995, JBES 13) test of equal forecast accuracy for two loss series at one
// horizon h, with the Harvey-Leybourne-Newbold (1997, IJF 13) small-sample correction.
//   d_t = loss_a_t - loss_b_t,  dbar = mean(d),  n = length,
//   gamma_k = (1/n) sum_{t=k+1}^{n} (d_t - dbar)(d_{t-k} - dbar),
//   V = (gamma_0 + 2 sum_{k=1}^{h-1} gamma_k) / n        (rectangular window: h-step errors are
//                                                         at most MA(h-1) under optimal forecasts)
//   DM = dbar / sqrt(V),  HLN = DM * sqrt((n + 1 - 2h + h(h-1)/n) / n),
//   p = 2 P(T_{n-1} > |HLN|)  (Student t with n - 1 df, two-sided).
// The rectangular estimate can be non-positive; then V falls back to gamma_0 / n and the result
// says so (status variance_fallback). Positive statistics mean series a has the larger loss,
// i.e. b forecasts better.
#include <span>
#include <string>

namespace lagsieve {

struct DieboldMarianoOptions {
  int horizon = 1;                    // h >= 1; sets the number of autocovariances, h - 1
  bool small_sample_correction = true;  // false: plain DM with the normal distribution
};

enum class DieboldMarianoStatus {
  ok,
  variance_fallback,  // the long-run variance with lags 1..h-1 was <= 0; lag 0 alone was used
  degenerate,         // the loss differential is constant: no test possible, statistic NaN
};

struct DieboldMarianoResult {
  DieboldMarianoStatus status = DieboldMarianoStatus::ok;
  int n = 0;
  int horizon = 1;
  double mean_difference = 0.0;   // dbar = mean(loss_a - loss_b)
  double variance = 0.0;          // V, the variance estimate of dbar actually used
  double dm_statistic = 0.0;      // uncorrected DM
  double statistic = 0.0;         // HLN-corrected (equals dm_statistic without the correction)
  double degrees_of_freedom = 0.0;  // n - 1 with the correction; +inf (normal) without
  double p_value = 0.0;           // two-sided
  std::string note;               // empty when status is ok; otherwise what happened, in words
};

// Throws InputError when the lengths differ, a loss is not finite, h < 1, or n <= h.
DieboldMarianoResult diebold_mariano(std::span<const double> loss_a,
                                     std::span<const double> loss_b,
                                     const DieboldMarianoOptions& options = {});

}  // namespace lagsieve
