#include "outliers/detect.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

#include "core/error.h"
#include "core/names.h"
#include "evaluation/distributions.h"
#include "model/likelihood.h"
#include "model/polynomial.h"

namespace lagsieve {

OutlierOptions outlier_options(const OutliersConfig& config) {
  OutlierOptions o;
  o.detect = config.detect;
  o.critical = config.critical;
  o.max_effects = config.max;
  o.decay = config.decay;
  return o;
}

double default_critical_value(int n, int types) {
  const double tests = double(std::max(n, 1)) * std::max(types, 1);
  return std::max(3.0, normal_quantile(1.0 - 0.025 / tests));
}

std::vector<double> noise_pi_weights(const ModelSpec& spec, const ModelParams& p, int count) {
  // Numerator a(B) = phi(B) Phi(B^S) (1 - B)^d (1 - B^S)^D as coefficients a_0 = 1, a_1, ...
  const auto ar = expand_ar(p.phi, p.seasonal_phi, spec.noise.period);
  std::vector<double> a{1.0};
  for (double c : ar) a.push_back(-c);
  auto times = [&a](int lag) {  // a(B) * (1 - B^lag)
    std::vector<double> out(a.size() + lag, 0.0);
    for (size_t j = 0; j < a.size(); ++j) {
      out[j] += a[j];
      out[j + lag] -= a[j];
    }
    a = std::move(out);
  };
  for (int d = 0; d < spec.differencing.regular; ++d) times(1);
  for (int d = 0; d < spec.differencing.seasonal; ++d) times(spec.differencing.period);
  const auto ma = expand_ma(p.theta, p.seasonal_theta, spec.noise.period);
  // theta(B) pi(B) = a(B): pi_j = a_j - sum_k m_k pi_{j-k}.
  std::vector<double> pi(static_cast<size_t>(std::max(count, 0)), 0.0);
  for (int j = 0; j < count; ++j) {
    double v = j < static_cast<int>(a.size()) ? a[j] : 0.0;
    for (int k = 1; k <= std::min(j, static_cast<int>(ma.size())); ++k) v -= ma[k - 1] * pi[j - k];
    pi[j] = v;
  }
  return pi;
}

std::vector<double> residual_signature(OutlierType type, double decay,
                                       const std::vector<double>& pi, int count) {
  std::vector<double> h(static_cast<size_t>(std::max(count, 0)), 0.0);
  if (type == OutlierType::innovational) {  // pi(B) psi(B) = 1: the pulse itself
    if (count > 0) h[0] = 1.0;
    return h;
  }
  std::vector<double> xi(h.size(), 0.0);
  double value = 1.0;
  for (int j = 0; j < count; ++j, value *= decay)
    xi[j] = type == OutlierType::additive      ? (j == 0 ? 1.0 : 0.0)
            : type == OutlierType::level_shift ? 1.0
                                               : value;
  for (int j = 0; j < count; ++j) {
    double v = 0.0;
    for (int k = 0; k <= j; ++k) v += pi[k] * xi[j - k];
    h[j] = v;
  }
  return h;
}

OutlierEffect effect_of(const OutlierCandidate& c, const SeriesData& data, int first_row,
                        double decay) {
  OutlierEffect e;
  e.type = c.type;
  e.row = first_row + c.index;
  e.time = e.row < static_cast<int>(data.time.size()) ? data.time[e.row] : "";
  e.name = effect_name(e.type, data.time, e.row);
  e.decay = decay;
  e.size = c.size;
  e.statistic = c.statistic;
  e.std_error = c.statistic != 0.0 ? std::abs(c.size / c.statistic) : std::nan("");
  return e;
}

double robust_scale(std::vector<double> e) {
  if (e.empty()) return 0.0;
  auto median = [](std::vector<double> v) {
    const size_t m = v.size() / 2;
    std::nth_element(v.begin(), v.begin() + m, v.end());
    double med = v[m];
    if (v.size() % 2 == 0) med = 0.5 * (med + *std::max_element(v.begin(), v.begin() + m));
    return med;
  };
  const double centre = median(e);
  std::vector<double> dev(e.size());
  for (size_t i = 0; i < e.size(); ++i) dev[i] = std::abs(e[i] - centre);
  const double mad = 1.4826 * median(dev);
  if (!(mad > 0.0)) return mad;
  // The median absolute deviation alone is a noisy scale (37 % efficiency at the normal), which
  // widens the tails of the statistics; the root mean square of the residuals within 3 MAD
  // scales of the centre, corrected for the truncation (its variance is 0.97334 sigma^2 at the
  // normal), is nearly as efficient as the standard deviation and still ignores the outliers.
  double ss = 0.0;
  int kept = 0;
  for (size_t i = 0; i < e.size(); ++i)
    if (dev[i] <= 3.0 * mad) {
      ss += (e[i] - centre) * (e[i] - centre);
      ++kept;
    }
  return kept > 1 ? std::sqrt(ss / kept / 0.97334) : mad;
}

OutlierCandidate largest_statistic(const std::vector<double>& residuals,
                                   const std::vector<OutlierType>& types,
                                   const std::vector<std::vector<double>>& signatures,
                                   const std::vector<bool>& excluded,
                                   const std::vector<double>& constant) {
  OutlierCandidate best;
  const int n = static_cast<int>(residuals.size());
  const double sigma = robust_scale(residuals);
  if (!(sigma > 0.0)) return best;
  const bool has_constant = static_cast<int>(constant.size()) >= n;
  double cc = 0.0, ce = 0.0;
  for (int t = 0; has_constant && t < n; ++t) {
    cc += constant[t] * constant[t];
    ce += constant[t] * residuals[t];
  }
  for (size_t k = 0; k < types.size(); ++k) {
    const auto& h = signatures[k];
    // sum_{j < n - i} h_j^2 for each start i, from the end.
    std::vector<double> tail(n + 1, 0.0);
    for (int m = 1; m <= n; ++m) tail[m] = tail[m - 1] + h[m - 1] * h[m - 1];
    for (int i = 0; i < n; ++i) {
      if (excluded[i]) continue;
      // A level shift from the first observation is the constant (d = 0) or nothing to
      // tell apart from the start-up; it is not tested there.
      if (types[k] == OutlierType::level_shift && i == 0) continue;
      double num = 0.0, xc = 0.0;
      for (int j = 0; j < n - i; ++j) num += residuals[i + j] * h[j];
      double den = tail[n - i];
      if (has_constant && cc > 0.0) {
        // The constant is re-estimated with the effect: regress on the part of the effect's
        // signature orthogonal to the constant's (a shift over most of the sample is largely
        // a change of the constant, and its statistic is that of the remainder).
        for (int j = 0; j < n - i; ++j) xc += constant[i + j] * h[j];
        num -= xc / cc * ce;
        den -= xc * xc / cc;
      }
      if (!(den > 1e-9 * tail[n - i])) continue;
      const double size = num / den;
      const double tau = size * std::sqrt(den) / sigma;
      if (best.index < 0 || std::abs(tau) > std::abs(best.statistic))
        best = {types[k], i, size, tau};
    }
  }
  return best;
}

std::vector<OutlierType> ambiguous_types(OutlierType type, const std::vector<OutlierType>& types,
                                         double decay, const std::vector<double>& pi, int remaining,
                                         double threshold) {
  std::vector<OutlierType> out;
  const auto h = residual_signature(type, decay, pi, remaining);
  const double hh = std::inner_product(h.begin(), h.end(), h.begin(), 0.0);
  for (OutlierType other : types) {
    if (other == type) continue;
    const auto g = residual_signature(other, decay, pi, remaining);
    const double gg = std::inner_product(g.begin(), g.end(), g.begin(), 0.0);
    const double hg = std::inner_product(h.begin(), h.end(), g.begin(), 0.0);
    if (hh > 0.0 && gg > 0.0 && std::abs(hg) / std::sqrt(hh * gg) > threshold) out.push_back(other);
  }
  return out;
}

SeriesData with_effect_columns(const SeriesData& data, const std::vector<OutlierEffect>& effects) {
  SeriesData out = data;
  for (const auto& e : effects) {
    out.add_input(e.name, effect_values(e, data.rows()), true);
  }
  return out;
}

ModelSpec with_effect_terms(const ModelSpec& spec, const std::vector<OutlierEffect>& effects) {
  ModelSpec out = spec;
  for (const auto& e : effects) out.inputs.push_back({e.name, {0, 0, 0}});
  return out;
}

std::string describe_effect(const OutlierEffect& e) {
  std::string type(to_string(e.type));
  std::replace(type.begin(), type.end(), '_', ' ');
  std::string text = fmt::format("{:<22} {:<13} size {:>10.4g}  s.e. {:>9.3g}  t = {:>6.2f}",
                                 e.name, type, e.size, e.std_error, e.statistic);
  if (!e.ambiguous_with.empty()) {
    std::string others;
    for (auto t : e.ambiguous_with)
      others += fmt::format("{}{}", others.empty() ? "" : ", ", to_string(t));
    text += fmt::format("  (ambiguous: could be {})", others);
  }
  return text;
}

namespace {

// One joint fit of `spec` plus `effects`; warm-started at `warm` (extended or cut to the new
// inputs) when given.
struct JointFit {
  SeriesData data;
  ModelSpec spec;
  LikelihoodProblem problem;
  FitResult fit;
};

JointFit joint_fit(const SeriesData& data, const ModelSpec& spec,
                   const std::vector<OutlierEffect>& effects, int start, const FitOptions& options,
                   const ModelParams* warm) {
  JointFit j;
  j.data = with_effect_columns(data, effects);
  j.spec = with_effect_terms(spec, effects);
  j.problem = make_problem(j.data, j.spec, start);
  FitOptions o = options;
  if (warm) {
    ModelParams p = *warm;
    p.inputs.resize(j.spec.inputs.size());
    for (size_t i = spec.inputs.size(); i < p.inputs.size(); ++i) p.inputs[i] = {{0.0}, {}, {}};
    o.warm_start = p;
  }
  j.fit = fit_model(j.problem, o);
  return j;
}

}  // namespace

void read_sizes(const FitResult& fit, std::vector<OutlierEffect>& effects) {
  for (auto& e : effects) {
    const auto key = e.name + ".omega0";
    for (const auto& est : fit.estimates)
      if (est.name == key) {
        e.size = est.value;
        e.std_error = est.std_error;
        e.statistic = est.std_error > 0.0 ? est.value / est.std_error
                                          : std::numeric_limits<double>::quiet_NaN();
      }
  }
}

namespace {

void set_noise(OutlierEffect& e, const ModelSpec& spec, const ModelParams& p) {
  e.differencing = spec.differencing;
  if (e.type != OutlierType::innovational) return;
  e.ar = expand_ar(p.phi, p.seasonal_phi, spec.noise.period);
  e.ma = expand_ma(p.theta, p.seasonal_theta, spec.noise.period);
}

std::vector<OutlierType> ambiguity_pool(const std::vector<OutlierType>& detect) {
  std::vector<OutlierType> pool{OutlierType::additive, OutlierType::level_shift,
                                OutlierType::temporary};
  if (std::find(detect.begin(), detect.end(), OutlierType::innovational) != detect.end())
    pool.push_back(OutlierType::innovational);
  return pool;
}

OutlierFit finish(JointFit&& j, std::vector<OutlierEffect> effects, double critical,
                  const std::vector<OutlierType>& pool, double ambiguity) {
  OutlierFit out;
  read_sizes(j.fit, effects);
  const int lost = j.spec.differencing.lost();
  const int n = j.fit.n_obs;
  const auto pi = noise_pi_weights(j.spec, j.fit.params, n);
  for (auto& e : effects) {
    const int remaining = j.data.rows() - e.row;
    if (remaining >= 1 && e.row >= lost)
      e.ambiguous_with =
          ambiguous_types(e.type, pool, e.decay, pi, std::min(remaining, n), ambiguity);
  }
  std::sort(effects.begin(), effects.end(),
            [](const auto& a, const auto& b) { return a.row < b.row; });
  // The effects were placed where the residuals were largest, so the residuals right after them
  // are small by construction: their residual-input entries (and warnings) would say nothing.
  auto& diag = j.fit.diagnostics;
  for (const auto& e : effects) {
    std::erase_if(diag.residual_input, [&](const auto& c) { return c.input == e.name; });
    std::erase_if(diag.warnings, [&](const Warning& w) {
      return w.is("residual_input_correlation") &&
             w.message.starts_with(residual_input_warning_prefix(e.name));
    });
  }
  out.data = std::move(j.data);
  out.spec = std::move(j.spec);
  out.fit = std::move(j.fit);
  out.effects = std::move(effects);
  out.critical = critical;
  return out;
}

// Type review at the joint fit's parameters: each effect in turn is replaced by every detectable
// type at its row and the rows next to it, the other effects kept; the variant with the highest
// profile likelihood (GLS at the fitted ARMA and denominators, the same parameter count) wins.
// The stage-1 choice is made at parameters estimated with every effect still in the data, which
// an unmodelled level shift pulls toward a unit root; at the joint fit a shift and a temporary
// change are told apart more reliably. Returns true when a type or row changed.
bool review_types(const SeriesData& data, const ModelSpec& spec,
                  std::vector<OutlierEffect>& effects, int start, const JointFit& current,
                  const std::vector<OutlierType>& detect, int first_row) {
  const auto nonlinear = pack_nonlinear(current.spec, current.fit.params);
  LikelihoodWorkspace ws;
  auto loglik_of = [&](const std::vector<OutlierEffect>& set) {
    try {
      const auto problem =
          make_problem(with_effect_columns(data, set), with_effect_terms(spec, set), start);
      const auto v = profile_loglik(problem, nonlinear, ws);
      return v.ok ? v.loglik : -std::numeric_limits<double>::infinity();
    } catch (const InputError&) {
      return -std::numeric_limits<double>::infinity();
    }
  };
  bool changed = false;
  double best = loglik_of(effects);
  for (size_t i = 0; i < effects.size(); ++i) {
    const OutlierEffect original = effects[i];
    OutlierEffect chosen = original;
    for (auto type : detect)
      for (int shift = -1; shift <= 1; ++shift) {
        const int row = original.row + shift;
        if ((type == original.type && shift == 0) || row < first_row || row >= data.rows())
          continue;
        if (type == OutlierType::level_shift && row == first_row) continue;
        bool taken = false;
        for (size_t k = 0; k < effects.size(); ++k)
          taken = taken || (k != i && effects[k].row == row);
        if (taken) continue;
        auto variant = effects;
        auto& e = variant[i];
        e.type = type;
        e.row = row;
        e.time = row < static_cast<int>(data.time.size()) ? data.time[row] : "";
        e.name = effect_name(type, data.time, row);
        set_noise(e, current.spec, current.fit.params);
        const double ll = loglik_of(variant);
        if (ll > best + 1e-9) {
          best = ll;
          chosen = e;
        }
      }
    if (chosen.type != original.type || chosen.row != original.row) {
      effects[i] = chosen;
      changed = true;
    }
  }
  return changed;
}

}  // namespace

OutlierFit fit_with_effects(const SeriesData& data, const ModelSpec& spec,
                            const std::vector<OutlierEffect>& effects, const FitOptions& options,
                            int start) {
  auto j = joint_fit(data, spec, effects, start, options, nullptr);
  std::vector<OutlierType> pool{OutlierType::additive, OutlierType::level_shift,
                                OutlierType::temporary};
  for (const auto& e : effects)
    if (e.type == OutlierType::innovational) pool = ambiguity_pool({OutlierType::innovational});
  return finish(std::move(j), effects, 0.0, pool, 0.9);
}

OutlierFit fit_with_outliers(const SeriesData& data, const ModelSpec& spec,
                             const OutlierOptions& options, int start) {
  FitOptions quick = options.fit;
  quick.standard_errors = false;
  quick.diagnostics = false;
  FitOptions with_se = quick;
  with_se.standard_errors = true;

  std::vector<OutlierEffect> effects;
  auto current = joint_fit(data, spec, effects, start, quick, nullptr);
  if (!current.fit.usable())
    throw NumericalError(
        "the model without effects could not be fitted, so no outliers can be "
        "detected: " +
        current.fit.message);
  const int n = current.problem.n_obs();
  const double critical = options.critical > 0.0
                              ? options.critical
                              : default_critical_value(n, static_cast<int>(options.detect.size()));
  const int first_row = current.problem.start + spec.differencing.lost();
  const auto pool = ambiguity_pool(options.detect);
  std::vector<OutlierEffect> dropped;

  int rounds = 0;
  while (rounds < options.max_rounds && static_cast<int>(effects.size()) < options.max_effects) {
    ++rounds;
    // Stage 1 at the current parameters.
    LikelihoodWorkspace ws;
    auto residuals = model_residuals(current.problem, current.fit.params, ws);
    const auto pi = noise_pi_weights(current.spec, current.fit.params, n);
    std::vector<std::vector<double>> signatures;
    for (auto type : options.detect)
      signatures.push_back(residual_signature(type, options.decay, pi, n));
    // The constant's signature on the residuals: pi(B) applied to ones from the first residual.
    std::vector<double> constant;
    if (spec.constant) {
      constant.resize(n);
      double sum = 0.0;
      for (int t = 0; t < n; ++t) constant[t] = sum += pi[t];
    }
    std::vector<bool> excluded(n, false);
    for (const auto& e : effects)
      if (e.row - first_row >= 0 && e.row - first_row < n) excluded[e.row - first_row] = true;
    std::vector<OutlierEffect> found;
    bool tentative = false;
    while (static_cast<int>(effects.size() + found.size()) < options.max_effects) {
      const auto c = largest_statistic(residuals, options.detect, signatures, excluded, constant);
      // Tentative entry: nothing above C at these parameters, but an effect that distorts them
      // (a level shift pulls an ARMA toward a unit root, which masks it) may exceed C once they
      // are re-estimated with it; the largest above `entry` is tried once in a joint fit.
      const bool above = c.index >= 0 && std::abs(c.statistic) > critical;
      tentative = !above && found.empty() && c.index >= 0 && options.entry > 0.0 &&
                  std::abs(c.statistic) > options.entry;
      if (!above && !tentative) break;
      OutlierEffect e = effect_of(c, data, first_row, options.decay);
      set_noise(e, current.spec, current.fit.params);
      found.push_back(e);
      excluded[c.index] = true;
      const size_t k =
          std::find(options.detect.begin(), options.detect.end(), c.type) - options.detect.begin();
      for (int j = 0; c.index + j < n; ++j) residuals[c.index + j] -= c.size * signatures[k][j];
      if (!constant.empty()) {  // and re-centre: the constant takes its share of the effect
        double cc = 0.0, ce = 0.0;
        for (int t = 0; t < n; ++t) {
          cc += constant[t] * constant[t];
          ce += constant[t] * residuals[t];
        }
        for (int t = 0; t < n; ++t) residuals[t] -= ce / cc * constant[t];
      }
      if (tentative) break;
    }
    if (found.empty()) break;
    // Stage 2: the joint fit with every effect; an effect the data cannot carry (collinear with
    // others) is dropped, newest first.
    bool fitted = false;
    while (!found.empty()) {
      auto trial = effects;
      for (auto& e : trial) set_noise(e, current.spec, current.fit.params);
      trial.insert(trial.end(), found.begin(), found.end());
      try {
        auto next =
            joint_fit(data, spec, trial, start, tentative ? with_se : quick, &current.fit.params);
        if (next.fit.usable() && tentative) {
          // Kept only when the joint fit confirms it above C + margin (the parameters have
          // adapted to it there, so the bar is higher); otherwise detection ends here.
          std::vector<OutlierEffect> last{trial.back()};
          read_sizes(next.fit, last);
          if (!(std::abs(last[0].statistic) >= critical + options.entry_margin)) break;
        }
        if (next.fit.usable()) {
          effects = std::move(trial);
          current = std::move(next);
          fitted = true;
          break;
        }
      } catch (const InputError&) {
      }
      found.pop_back();
    }
    if (!fitted) break;
  }

  // Stage 3: drop the least significant effect while it is below C.
  auto fit_se = [&](const std::vector<OutlierEffect>& set, const FitOptions& o) {
    return joint_fit(data, spec, set, start, o, &current.fit.params);
  };
  for (int pass = 0; pass < 3 && !effects.empty(); ++pass) {
    if (!review_types(data, spec, effects, start, current, options.detect, first_row)) break;
    current = joint_fit(data, spec, effects, start, quick, &current.fit.params);
  }
  if (!effects.empty()) current = fit_se(effects, with_se);
  while (!effects.empty()) {
    read_sizes(current.fit, effects);
    size_t weakest = 0;
    for (size_t i = 1; i < effects.size(); ++i)
      if (!(std::abs(effects[i].statistic) >= std::abs(effects[weakest].statistic))) weakest = i;
    const double t = effects[weakest].statistic;
    if (std::isfinite(t) && std::abs(t) >= critical) break;
    dropped.push_back(effects[weakest]);
    effects.erase(effects.begin() + static_cast<std::ptrdiff_t>(weakest));
    auto params = current.fit.params;
    params.inputs.erase(params.inputs.begin() +
                        static_cast<std::ptrdiff_t>(spec.inputs.size() + weakest));
    current = joint_fit(data, spec, effects, start, with_se, &params);
  }
  // The final fit with the caller's options (standard errors, diagnostics).
  current = joint_fit(data, spec, effects, start, options.fit, &current.fit.params);
  auto out = finish(std::move(current), effects, critical, pool, options.ambiguity);
  out.dropped = std::move(dropped);
  out.rounds = rounds;
  return out;
}

}  // namespace lagsieve
