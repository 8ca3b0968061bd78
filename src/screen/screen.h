#pragma once
// Identification screen: for every input, prewhitening, cross-correlation with the target,
// impulse-response estimates, and suggested delay and (r, s); for the model as a whole, suggested
// noise orders (p, q) and the warnings a practitioner needs before a search.
//
// The rules, in one place (each step is on the target after its transform and the differencing,
// and on every input after the same differencing):
//
// Prewhitening (column inputs). An AR(p) model is fitted to the demeaned input by conditional
// least squares (not Yule-Walker: least squares is less biased when the input is close to
// non-stationary or non-invertible, which differenced series often are), p chosen by AIC over
// 0..min(ar_max_order, n/5) on a common sample, or fixed by `ar_order`. Input and target are both
// filtered by (1 - phi_1 B - ... - phi_p B^p): alpha_t (input) and beta_t (target).
// Event inputs are deterministic (pulse, step, ramp) and are NOT prewhitened: alpha is the
// differenced event itself and beta the differenced target, so v_k below is the average target
// response after the event; their bands assume a roughly uncorrelated target and are rough.
// An event or indicator that is still a step after the model's differencing (it changes value
// exactly once: a step in an undifferenced model) is screened on one more regular difference of
// it and of the target: its information is in its change, and a step against an autocorrelated
// target otherwise correlates at every lag near the true delay. The impulse response is the same
// (a common difference commutes with the transfer function); n is one shorter.
//
// Indicator columns (the rule is in screen/indicator.h: two-valued steps, pulses and temporary
// shifts) are deterministic like events, so they are screened as events are (not prewhitened),
// and a note says so. The fit's residual-input check (model/residual_input.h) treats both alike.
//
// Cross-correlation r(k) = corr(alpha_t, beta_{t+k}) at k = -L..L, L = min(max_lag, n/4); positive
// k: the input comes first. Per-lag band: +-band_z / sqrt(n'), n' = length of the prewhitened pair.
// Family band: +-z_F / sqrt(n'), z_F the two-sided normal quantile at family_level / (L + 1)
// (Bonferroni over the lags 0..L): with no relation at all, an input crosses it with probability
// about family_level, whereas with 21 lags about two in three unrelated inputs would cross the
// per-lag band somewhere.
//
// Relevance: an input is relevant when some r(k), 0 <= k <= L, crosses the family band; otherwise
// it is flagged "no significant cross-correlation" and the suggestion is to leave it out.
//
// Delay b: the first lag k >= 0 crossing the family band, moved back over the immediately
// preceding lags that cross the per-lag band (the run of significant lags it belongs to). Isolated
// per-lag crossings before the main run are treated as noise.
//
// Impulse response: v_k = r(k) s_beta / s_alpha (k = 0..L), s = standard deviations with divisor
// n'. Standard error se_k = s_e / (s_alpha sqrt(n')), s_e^2 = s_beta^2 - s_alpha^2 sum_k vfit_k^2
// (what the fitted shape leaves unexplained; floored at 1% of s_beta^2). For an irrelevant input
// vfit = 0 and se_k is the band in units of v.
//
// Orders (r, s): every shape omega(B) B^b / delta(B) with r, s in 0..max_shape_order is fitted by
// least squares to v_b..v_L (omega concentrated out for each delta; delta kept stable through the
// partial-autocorrelation map; a grid then a Nelder-Mead polish), and the shape with the smallest
// BIC_v = SSE / se0^2 + (r + s + 1) log m (m = L - b + 1 points; se0 = s_beta / (s_alpha sqrt(n')),
// the sampling sd of a weight with no response behind it: the BIC of a Gaussian fit with known
// variance) is computed. The suggestion is
// the smallest shape (fewest r + s, then smallest r) whose BIC_v is within `shape_bic_margin` of
// the best: a BIC difference below 2 is "not worth more than a bare mention" as evidence (Kass &
// Raftery 1995, JASA 90, p. 777, quoted from memory), so a richer shape must beat a plainer one
// by more than that.
// Its omega, delta are the starting values in `suggested_omega`, `suggested_delta` (signs of
// core/spec.h).
//
// Noise (p, q): the residual e_t = w_t - sum over relevant inputs of the fitted transfer-function
// output (zero pre-sample start, the first L values dropped) is examined by its ACF and PACF over
// K = min(noise_lags, n/4) lags with the band +-band_z / sqrt(n). The cut-off of a function is its
// last significant lag within 1..max_noise_order; the function "cuts off" there when at most one
// later lag up to K is significant (one stray crossing in K lags is expected by chance).
//   - no significant ACF and PACF lag at all: (0, 0);
//   - only the PACF cuts off: (p, 0); only the ACF cuts off: (0, q);
//   - both cut off: the lower order; on a tie the function whose next three lags are smaller in
//     absolute sum is the one that cuts off (an AR(1) has a geometric ACF but a single PACF spike);
//   - neither cuts off: (1, 1).
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json_fwd.hpp>

#include "core/config.h"
#include "core/series.h"
#include "core/spec.h"
#include "screen/correlation.h"
#include "screen/indicator.h"

namespace lagsieve {

struct ScreenOptions {
  int max_lag = 20;               // L asked; capped at n/4 of the differenced length (warning)
  int ar_max_order = 10;          // cap of the prewhitening AR order chosen by AIC
  std::optional<int> ar_order;    // fixed prewhitening order instead of AIC
  double band_z = 2.0;            // per-lag band +-band_z / sqrt(n)
  double family_level = 0.05;     // family-wise level of the relevance and feedback tests
  int max_shape_order = 2;        // r and s tried in 0..this
  double shape_bic_margin = 2.0;  // smallest shape within this BIC_v of the best (see above)
  int max_noise_order = 3;        // p and q suggested in 0..this
  int noise_lags = 12;            // ACF/PACF lags inspected for the noise suggestion
  double collinear = 0.8;         // |corr| of two differenced inputs that triggers a warning
  int min_observations = 50;      // fewer differenced observations: a warning

  // Throws InputError naming the option and the rule it breaks.
  void validate() const;
};

// One candidate of the (r, s) shape fit to the impulse-response estimates.
struct ShapeFit {
  int numerator = 0;    // s
  int denominator = 0;  // r
  double sse = 0.0;
  double bic = 0.0;           // BIC_v (see above); +inf when there are too few points
  std::vector<double> omega;  // omega_0..omega_s
  std::vector<double> delta;  // delta_1..delta_r (delta(B) = 1 - delta_1 B - ...)
};

struct InputScreen {
  std::string name;
  bool is_event = false;
  IndicatorInfo indicator;                // shape none unless a data column is indicator-like
  bool prewhitened = false;               // false for events, indicator columns and constant inputs
  ArFit prewhitening;                     // AR model of the input (order 0 when not prewhitened)
  int extra_differences = 0;              // events and indicators: regular differences added (0..2)
  int n = 0;                              // length of the prewhitened pair
  int max_lag = 0;                        // L
  std::vector<double> cross_correlation;  // r(k), k = -L..L at [k + L]
  double band = 0.0;                      // per-lag band
  double family_band = 0.0;               // Bonferroni band over lags 0..L
  double feedback_band = 0.0;             // Bonferroni band over lags -L..-1
  double sd_input = 0.0;                  // s_alpha
  double sd_target = 0.0;                 // s_beta
  std::vector<double> impulse;            // v_0..v_L
  std::vector<double> impulse_se;         // se of each v_k
  std::vector<double> impulse_fitted;     // v_0..v_L of the suggested shape (zeros if not relevant)
  bool relevant = false;
  int suggested_delay = 0;        // b (irrelevant input: the lag of the largest |r(k)|, k >= 0)
  int suggested_numerator = 0;    // s
  int suggested_denominator = 0;  // r
  std::vector<double> suggested_omega;  // omega_0..omega_s of the suggested shape: start values
  std::vector<double> suggested_delta;  // delta_1..delta_r of the suggested shape
  std::vector<ShapeFit> shapes;         // every (r, s) tried, s fastest
  std::vector<int> feedback_lags;       // negative lags crossing the feedback band
  std::vector<std::string> notes;       // one-line findings for this input

  double correlation_at(int k) const { return cross_correlation.at(k + max_lag); }
};

struct NoiseSuggestion {
  int p = 0;
  int q = 0;
  int n = 0;  // residual length examined
  double band = 0.0;
  std::vector<double> acf;   // lags 0..K
  std::vector<double> pacf;  // lags 1..K
  std::string reason;        // which branch of the rule decided
};

enum class ScreenWarningKind {
  correlated_inputs,
  feedback,
  few_observations,
  lags_capped,
  constant_input
};
std::string_view to_string(ScreenWarningKind kind);

struct ScreenWarning {
  ScreenWarningKind kind;
  std::vector<std::string> inputs;  // the inputs concerned (empty: the whole screen)
  std::string message;
};

struct ScreenResult {
  std::string target_name;
  int rows = 0;  // observations before differencing
  int n = 0;     // after differencing
  TargetTransform transform;
  Differencing differencing;
  ScreenOptions options;                               // as given
  int max_lag_used = 0;                                // L after the n/4 cap
  std::vector<InputScreen> inputs;                     // config order
  std::vector<std::vector<double>> input_correlation;  // lag-0 corr of the differenced inputs
  NoiseSuggestion noise;
  std::vector<ScreenWarning> warnings;
};

// Screens every input of `data` against its target. `config` supplies the target transform, the
// differencing and which inputs are events (matched by name; inputs absent from config.inputs are
// treated as data columns). Throws InputError for too few observations or bad options.
ScreenResult screen_series(const SeriesData& data, const RunConfig& config,
                           const ScreenOptions& options = {});

nlohmann::json to_json(const ScreenResult& result);

}  // namespace lagsieve
