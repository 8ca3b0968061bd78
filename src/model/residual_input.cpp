#include "model/residual_input.h"

#include <algorithm>
#include <cmath>

#include "core/error.h"
#include "evaluation/distributions.h"
#include "screen/correlation.h"

namespace lagsieve {

std::optional<ResidualInputCorrelation> residual_input_correlation(
    const std::string& input, std::span<const double> residuals,
    std::span<const double> input_values, int fitted_terms, const ResidualInputOptions& options) {
  const int n = static_cast<int>(input_values.size());
  if (n < 12 || residuals.size() != input_values.size()) return std::nullopt;
  ResidualInputCorrelation out;
  out.input = input;
  try {
    const ArFit ar = fit_ar_by_aic(input_values, std::min(options.ar_max_order, n / 5));
    const auto alpha = ar_filter(input_values, ar.phi, ar.mean);
    out.ar_order = ar.order;
    out.n = static_cast<int>(alpha.size());
    out.max_lag = std::min(options.max_lag, out.n / 4);
    if (out.max_lag < 1) return std::nullopt;
    out.values = ccf(alpha, residuals.subspan(static_cast<size_t>(ar.order)), out.max_lag);
  } catch (const NumericalError&) {
    return std::nullopt;  // a constant input or residual series: nothing to correlate
  }
  const int L = out.max_lag;
  const double m = out.n;
  out.lags.resize(2 * static_cast<size_t>(L) + 1);
  for (int k = -L; k <= L; ++k) out.lags[k + L] = k;
  out.band = options.band_z / std::sqrt(m);
  double s = 0.0;
  for (int k = 0; k <= L; ++k) {
    const double r = out.values[k + L];
    s += r * r / (m - k);
    if (std::fabs(r) > std::fabs(out.values[out.largest_lag + L])) out.largest_lag = k;
  }
  out.statistic = m * (m + 2.0) * s;
  out.df = std::max(1, L + 1 - fitted_terms);
  out.p_value = chi_square_upper_tail(out.statistic, out.df);
  return out;
}

}  // namespace lagsieve
