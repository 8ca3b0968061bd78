#pragma once
// Cross-correlation of a fitted model's residuals with one of its inputs, the Box-Jenkins check
// of the transfer-function part: a term the model misses (a wrong delay, too few numerator or
// denominator lags) leaves residuals that still correlate with the input's past. A data column is
// prewhitened first, as the screen does (AR by AIC, screen/correlation.h), so that the input's own
// autocorrelation does not smear one missing lag over its neighbours; the residuals are already
// white when the noise model is right, so they are used as they are.
//
// Events and indicator columns (screen/indicator.h) are deterministic and, as in the screen, not
// prewhitened: an AR model fitted to a step or a pulse whitens away the change itself. A single
// step that stays (after the model's differencing) is differenced once more into a pulse, as the
// screen does; the residuals are not (they are white already). Against a pulse, m r(k)^2 is about
// the squared standardised residual k rows after the event, so the portmanteau asks whether the
// residuals right after it are larger than the rest: a response the transfer function misses.
// For a deterministic input that is not a single pulse (a temporary shift, a pulse after a
// difference), neighbouring r(k) are correlated and the p-value is approximate (docs/model.md).
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "core/warning.h"
#include "screen/indicator.h"

namespace lagsieve {

struct ResidualInputOptions {
  int max_lag = 24;          // L = min(max_lag, m / 4), m = pairs after prewhitening
  int ar_max_order = 10;     // prewhitening AR order chosen by AIC over 0..min(this, n / 5)
  double band_z = 1.96;      // band = band_z / sqrt(m): pointwise 95% under no correlation
  double warn_level = 0.01;  // the fit adds a warning when the portmanteau p-value is below
};

struct ResidualInputCorrelation {
  std::string input;
  InputKind kind;             // event or indicator column: deterministic, not prewhitened
  bool prewhitened = true;    // false for events and indicator columns
  int ar_order = 0;           // prewhitening AR order used (0 when not prewhitened)
  int extra_differences = 0;  // 1: a single step, differenced once more into a pulse
  int n = 0;  // pairs: residual sample length minus the AR order (or the extra difference)
  int max_lag = 0;        // L
  std::vector<int> lags;  // -L..L
  // r(k) = corr(alpha_{t-k}, e_t) (the screen's ccf with the input first): k >= 0 is where a
  // missing transfer-function term shows; k < 0 (residual before input) points to feedback.
  std::vector<double> values;
  double band = 0.0;
  // S = m (m + 2) sum_{k=0..L} r(k)^2 / (m - k), chi-square with df = max(1, L + 1 - (r + s + 1))
  // when the transfer function is adequate (Box & Jenkins' cross-correlation check, with the
  // Ljung-Box small-sample weights).
  double statistic = 0.0;
  int df = 0;
  double p_value = 1.0;
  int largest_lag = 0;  // k in 0..L with the largest |r(k)|
};

// `residuals` e_t and `input` u_t (the differenced input) over the same rows, t = 0..n-1: row t of
// one is paired with row t of the other. `fitted_terms` = r + s + 1 of the input's transfer
// function; `kind` says whether the input is prewhitened (a plain column) or not (see above).
// Pairs lost to the AR filter or the extra difference are dropped from the start of both. Returns
// nullopt when the check is undefined: fewer than 12 rows, fewer than 4 pairs per lag, or a
// constant series.
std::optional<ResidualInputCorrelation> residual_input_correlation(
    const std::string& input, std::span<const double> residuals,
    std::span<const double> input_values, int fitted_terms, const InputKind& kind = {},
    const ResidualInputOptions& options = {});

// "residuals still correlate with NAME (TREATMENT; S = ...)": the fit's warning when p is below
// options.warn_level, and its fixed start (everything up to the treatment) for matching it.
Warning residual_input_warning(
    const ResidualInputCorrelation& check);  // residual_input_correlation
std::string residual_input_warning_prefix(const std::string& input);

}  // namespace lagsieve
