#pragma once
// Automatic detection of effects the data do not announce, joint with the transfer-function fit,
// after Chen & Liu (1993, JASA 88, "Joint estimation of model parameters and outlier effects in
// time series"), building on Tsay (1988, J. Forecasting).
//
// An effect of type j at row T changes the residuals of the fitted model by omega * h_j(t - T),
// where h_j = pi(B) xi_j is the type's shape xi_j (pulse, step, decay, or psi(B) pulse for an
// innovational outlier) through the pi-weights of the noise model, the inverse of
// theta(B) Theta(B^S) / [phi(B) Phi(B^S) (1 - B)^d (1 - B^S)^D]. For every row and type the
// least-squares size omega = sum e_t h(t - T) / sum h(t - T)^2 over the residuals e gives the
// statistic tau = omega sqrt(sum h^2) / sigma, with sigma a robust residual scale
// (robust_scale below).
//
//  1. At the current parameters: the largest |tau| over rows and types; above the critical value
//     C it is recorded and its effect removed from the residuals; repeat until none exceeds C.
//     When none exceeds C in a round, the largest above `entry` (3.0) is tried tentatively: it
//     enters the joint fit of step 2 and stays only if its |size / s.e.| there reaches C + 1 (an
//     effect can mask itself by distorting the parameters, e.g. a level shift under an ARMA(1,1)
//     pulled toward a unit root); detection ends otherwise.
//  2. Re-estimate the whole model (ARMA and transfer functions) with every effect found as an
//     event input of order b = s = r = 0 (its size concentrated out by GLS like any omega);
//     go back to 1 on the new residuals until no new effect is found (or `max_effects`).
//  3. Drop, one at a time, the effect with the smallest |size / s.e.| in the joint fit while it
//     is below C, re-estimating after each drop.
#include <string>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "core/spec.h"
#include "model/fit.h"
#include "outliers/effects.h"

namespace lagsieve {

struct OutlierOptions {
  std::vector<OutlierType> detect{OutlierType::additive, OutlierType::level_shift,
                                  OutlierType::temporary};
  double critical = 0.0;   // |tau| threshold; 0 = default_critical_value(n)
  int max_effects = 10;    // effects at most
  double decay = 0.7;      // delta of the temporary change
  int max_rounds = 10;     // detect / re-estimate rounds at most
  double ambiguity = 0.9;  // types whose responses correlate above this are not told apart
  // Tentative entry (stage 1): when no statistic exceeds C, the largest above `entry` is tried
  // once in a joint fit and kept only if its |size / s.e.| there reaches C + entry_margin
  // (entry 0 = off).
  double entry = 3.0;
  double entry_margin = 1.0;
  FitOptions fit;  // the final fit's options (intermediate fits skip diagnostics)
};

// From the config's `outliers` section.
OutlierOptions outlier_options(const OutliersConfig& config);

// The default critical value for n observations in the likelihood and m types tested: the
// two-sided Bonferroni bound over the n m statistics at family-wise level 5 %,
// C = Phi^-1(1 - 0.025 / (n m)), never below 3.0 (our rule; with m = 3: C(100) = 3.76,
// C(200) = 3.94, C(500) = 4.15). Chen & Liu (1993) used fixed values between 2.5 and 4 in their
// simulations (from memory).
double default_critical_value(int n, int types);

// pi_0..pi_{count-1} of the noise model of `spec` at `p`, differencing included (pi_0 = 1).
std::vector<double> noise_pi_weights(const ModelSpec& spec, const ModelParams& p, int count);

// h_0..h_{count-1}: the type's shape through the pi-weights (see above).
std::vector<double> residual_signature(OutlierType type, double decay,
                                       const std::vector<double>& pi, int count);

// The largest statistic over rows and types at fixed parameters (stage 1, one step). With the
// constant's signature on the residuals (`constant`, pi(B) applied to ones; empty without a
// constant), each effect's signature is taken orthogonal to it, since the constant is
// re-estimated with the effect.
struct OutlierCandidate {
  OutlierType type = OutlierType::additive;
  int index = -1;  // position in the residual vector; -1 when none could be computed
  double size = 0.0;
  double statistic = 0.0;
};
OutlierCandidate largest_statistic(const std::vector<double>& residuals,
                                   const std::vector<OutlierType>& types,
                                   const std::vector<std::vector<double>>& signatures,
                                   const std::vector<bool>& excluded,
                                   const std::vector<double>& constant = {});

// The effect a candidate names: type, data row (first_row + index), stamp, name, decay, size
// and statistic (the s.e. is |size / statistic|). Model-dependent fields are left to the caller.
OutlierEffect effect_of(const OutlierCandidate& c, const SeriesData& data, int first_row,
                        double decay);

// Robust scale: the root mean square of the residuals within 3 MADs (1.4826 * median |e - median|)
// of their median, corrected to be consistent at the normal.
double robust_scale(std::vector<double> residuals);

// The types, among `types`, whose residual signature over the `remaining` positions from the
// effect on correlates with that of `type` above `threshold` (1 for every pair at the last row).
std::vector<OutlierType> ambiguous_types(OutlierType type, const std::vector<OutlierType>& types,
                                         double decay, const std::vector<double>& pi, int remaining,
                                         double threshold);

struct OutlierFit {
  SeriesData data;                     // the input data plus one column per effect
  ModelSpec spec;                      // the input spec plus one input (b = s = r = 0) per effect
  FitResult fit;                       // the joint fit
  std::vector<OutlierEffect> effects;  // kept, in row order, with size, s.e. and statistic
  std::vector<OutlierEffect> dropped;  // found in stage 1 but below C in the joint fit
  double critical = 0.0;
  int rounds = 0;
};

// Detection and joint estimation (steps 1-3). `start` is the first differenced index inside the
// likelihood (< 0: minimum_start(spec)), so a search keeps its common sample.
OutlierFit fit_with_outliers(const SeriesData& data, const ModelSpec& spec,
                             const OutlierOptions& options, int start = -1);

// The joint fit with a given set of effects, none detected or dropped (a search's shortlist
// shares the chosen model's set). Effects keep their definitions; sizes come from this fit.
OutlierFit fit_with_effects(const SeriesData& data, const ModelSpec& spec,
                            const std::vector<OutlierEffect>& effects, const FitOptions& options,
                            int start = -1);

// Size, s.e. and ratio of each effect from a fit that holds it as an input `<name>.omega0`.
void read_sizes(const FitResult& fit, std::vector<OutlierEffect>& effects);

// The data with one column per effect, and the spec with one term per effect.
SeriesData with_effect_columns(const SeriesData& data, const std::vector<OutlierEffect>& effects);
ModelSpec with_effect_terms(const ModelSpec& spec, const std::vector<OutlierEffect>& effects);

// One line per effect, e.g. "LS@1899 level shift, size -242.2 (s.e. 27.1, t = -8.9)".
std::string describe_effect(const OutlierEffect& effect);

// The rule by which an effect is reported as ambiguous, for output next to the list.
inline constexpr const char* kAmbiguityRule =
    "an effect is ambiguous when another type's response through the noise model, over the "
    "observations from the effect to the end of the data, correlates above 0.9 with its own "
    "(always so at the last observation, where every type is one value)";

}  // namespace lagsieve
