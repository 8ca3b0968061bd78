#pragma once
// The transfer-function model, in one place. Sign conventions (used everywhere, converted only
// when comparing with a published table that uses another):
//
//   w_t = c + sum_i [omega_i(B) / delta_i(B)] B^{b_i} u_{i,t} + n_t
//   phi(B) Phi(B^S) n_t = theta(B) Theta(B^S) a_t,   a_t ~ iid N(0, sigma^2)
//
//   omega(B) = omega_0 + omega_1 B + ... + omega_s B^s
//   delta(B) = 1 - delta_1 B - ... - delta_r B^r
//   phi(B)   = 1 - phi_1 B - ... - phi_p B^p          (likewise Phi)
//   theta(B) = 1 + theta_1 B + ... + theta_q B^q      (likewise Theta; the sign of R's arima)
//
// w_t and u_{i,t} are the target and the inputs after the same transform of the target and the
// same differencing (1 - B)^d (1 - B^S)^D.
//
// Start of 1/delta_i(B): the filter's output before the sample is unknown. `estimated` (the
// default) adds, for each input with r > 0, r linear start states: the part of the input's effect
// at the first r rows of the likelihood sample that its history before the data carries, which
// then decays by delta_i(B) (see model/likelihood.h). `zero` starts the filter from zero values
// before the first differenced row (the conditional start of many printed tables).
#include <string>
#include <vector>

namespace lagsieve {

enum class TransformKind { none, log, boxcox };

struct TargetTransform {
  TransformKind kind = TransformKind::none;
  double lambda = 1.0;  // Box-Cox only
  bool operator==(const TargetTransform&) const = default;
};

struct Differencing {
  int regular = 0;   // d
  int seasonal = 0;  // D
  int period = 1;    // S of the seasonal difference
  int lost() const { return regular + seasonal * period; }  // observations consumed
  bool operator==(const Differencing&) const = default;
};

// Dynamic shape of one input: b, s, r.
struct InputOrder {
  int delay = 0;        // b
  int numerator = 0;    // s: omega_0..omega_s
  int denominator = 0;  // r: delta_1..delta_r
  bool operator==(const InputOrder&) const = default;
};

struct NoiseOrder {
  int p = 0;
  int q = 0;
  int seasonal_p = 0;  // P
  int seasonal_q = 0;  // Q
  int period = 1;      // S of the seasonal ARMA terms
  bool operator==(const NoiseOrder&) const = default;
};

enum class FilterStart { estimated, zero };

// What a fit maximises over the nonlinear parameters (every delta and ARMA coefficient; see
// model/likelihood.h). ml: the exact likelihood with the linear parameters (constant, omegas,
// start states) at their GLS values, as R's arima and statsmodels do. restricted: the likelihood
// of the data with those linear parameters integrated out under a flat prior (restricted, or
// marginal, likelihood), which removes most of the small-sample bias that estimating them puts on
// the noise parameters. Both report the exact log-likelihood at the estimates and the same k.
enum class Estimation { ml, restricted };

struct InputTerm {
  std::string name;  // column name or event name
  InputOrder order;
  bool operator==(const InputTerm&) const = default;
};

// One fully specified model: what a single fit estimates.
struct ModelSpec {
  std::vector<InputTerm> inputs;  // the inputs included, in config order
  NoiseOrder noise;
  bool constant = true;
  Differencing differencing;
  TargetTransform transform;
  FilterStart filter_start = FilterStart::estimated;
  Estimation estimation = Estimation::ml;
  bool operator==(const ModelSpec&) const = default;
  // Start states of input i's filter estimated by the fit: r_i, or 0 (no denominator, zero start).
  int start_states(size_t i) const {
    return filter_start == FilterStart::estimated ? inputs[i].order.denominator : 0;
  }
};

}  // namespace lagsieve
