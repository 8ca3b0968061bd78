#include "model/residual_input.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "core/error.h"
#include "evaluation/distributions.h"
#include "screen/correlation.h"

namespace lagsieve {

std::optional<ResidualInputCorrelation> residual_input_correlation(
    const std::string& input, std::span<const double> residuals,
    std::span<const double> input_values, int fitted_terms, const InputKind& kind,
    const ResidualInputOptions& options) {
  const int n = static_cast<int>(input_values.size());
  if (n < 12 || residuals.size() != input_values.size()) return std::nullopt;
  ResidualInputCorrelation out;
  out.input = input;
  out.kind = kind;
  try {
    std::vector<double> alpha(input_values.begin(), input_values.end());
    size_t lost = 0;  // rows of both lost at the start
    if (kind.deterministic()) {
      out.prewhitened = false;
      if (is_single_step(alpha)) {
        for (size_t t = alpha.size(); t-- > 1;) alpha[t] -= alpha[t - 1];
        alpha.erase(alpha.begin());
        out.extra_differences = 1;
        lost = 1;
      }
    } else {
      const ArFit ar = fit_ar_by_aic(input_values, std::min(options.ar_max_order, n / 5));
      alpha = ar_filter(input_values, ar.phi, ar.mean);
      out.ar_order = ar.order;
      lost = static_cast<size_t>(ar.order);
    }
    out.n = static_cast<int>(alpha.size());
    out.max_lag = std::min(options.max_lag, out.n / 4);
    if (out.max_lag < 1) return std::nullopt;
    out.values = ccf(alpha, residuals.subspan(lost), out.max_lag);
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

std::string residual_input_warning_prefix(const std::string& input) {
  return fmt::format("residual_input_correlation: residuals still correlate with {} (", input);
}

Warning residual_input_warning(const ResidualInputCorrelation& c) {
  const double largest = c.values[static_cast<size_t>(c.largest_lag + c.max_lag)];
  return {"residual_input_correlation",
          fmt::format(
              "{}{}; S = {:.1f}, df {}, p = {:.2g}; largest at lag {}: {:.2f}, band {:.2f}); its "
              "transfer function misses a lag or has the wrong delay",
              residual_input_warning_prefix(c.input),
              describe_treatment(c.kind, c.prewhitened, c.ar_order), c.statistic, c.df, c.p_value,
              c.largest_lag, largest, c.band),
          {{"statistic", c.statistic},
           {"df", c.df},
           {"p_value", c.p_value},
           {"lag", c.largest_lag},
           {"correlation", largest},
           {"band", c.band}},
          {{"input", c.input}}};
}

}  // namespace lagsieve
