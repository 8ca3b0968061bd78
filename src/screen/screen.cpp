#include "screen/screen.h"

#include <fmt/format.h>

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <limits>
#include <nlohmann/json.hpp>
#include <span>

#include "core/error.h"
#include "core/names.h"
#include "data/transform.h"
#include "evaluation/distributions.h"

namespace lagsieve {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr int kMinObservations = 10;

// z with P(|Z| > z) = two_sided_tail for a standard normal Z.
double normal_two_sided_quantile(double two_sided_tail) {
  return -normal_quantile(0.5 * two_sided_tail);
}

double mean_of(const std::vector<double>& x) {
  double s = 0.0;
  for (double v : x) s += v;
  return x.empty() ? 0.0 : s / static_cast<double>(x.size());
}

// Standard deviation with divisor n (the normalisation of the correlations).
double sd_of(const std::vector<double>& x) {
  const double m = mean_of(x);
  double s = 0.0;
  for (double v : x) s += (v - m) * (v - m);
  return x.empty() ? 0.0 : std::sqrt(s / static_cast<double>(x.size()));
}

bool is_constant(const std::vector<double>& x) {
  const double m = mean_of(x);
  const double scale = std::max(1.0, std::abs(m));
  return sd_of(x) <= 1e-12 * scale;
}

// The screen sits below the model layer, so it carries its own three small lag-polynomial
// helpers (same conventions as core/spec.h).

// Impulse-response weights v_0..v_{count-1} of omega(B) B^b / delta(B).
std::vector<double> shape_weights(int b, const std::vector<double>& omega,
                                  const std::vector<double>& delta, int count) {
  std::vector<double> v(std::max(count, 0), 0.0);
  for (int k = 0; k < count; ++k) {
    const int j = k - b;
    double x = (j >= 0 && j < static_cast<int>(omega.size())) ? omega[j] : 0.0;
    for (int i = 0; i < static_cast<int>(delta.size()) && i < k; ++i) x += delta[i] * v[k - 1 - i];
    v[k] = x;
  }
  return v;
}

// x_t = [omega(B) B^b / delta(B)] u_t with zero pre-sample values of u and x.
std::vector<double> shape_output(const std::vector<double>& u, int b,
                                 const std::vector<double>& omega,
                                 const std::vector<double>& delta) {
  const int n = static_cast<int>(u.size());
  std::vector<double> x(n, 0.0);
  for (int t = 0; t < n; ++t) {
    double v = 0.0;
    for (int j = 0; j < static_cast<int>(omega.size()); ++j)
      if (t - b - j >= 0) v += omega[j] * u[t - b - j];
    for (int i = 0; i < static_cast<int>(delta.size()); ++i)
      if (t - 1 - i >= 0) v += delta[i] * x[t - 1 - i];
    x[t] = v;
  }
  return x;
}

// Unconstrained z -> partial autocorrelations tanh(z) -> coefficients of a stable
// 1 - a_1 B - ... - a_r B^r (the Durbin-Levinson step), so every delta tried is stable.
// r <= kMaxShapeOrder; writes a_1..a_r into `a`.
constexpr int kMaxShapeOrder = 2;
void stable_coefficients(std::span<const double> z, std::span<double> a) {
  double prev[kMaxShapeOrder] = {};
  for (size_t k = 0; k < z.size(); ++k) {
    const double rho = std::tanh(z[k]);
    for (size_t j = 0; j < k; ++j) prev[j] = a[j];
    for (size_t j = 0; j < k; ++j) a[j] = prev[j] - rho * prev[k - 1 - j];
    a[k] = rho;
  }
}

// ---------------------------------------------------------------------------------------------
// Shape fit: omega(B) B^b / delta(B) to v_b..v_L by least squares.

struct ShapeProblem {
  std::vector<double> v;  // v_b..v_L (m values)
  int s = 0;
  int r = 0;
  std::vector<double> h;  // workspace: impulse response of 1 / delta(B), m values
};

// Concentrated SSE for a given delta; fills omega when asked.
double concentrated_sse(ShapeProblem& pb, std::span<const double> delta,
                        std::vector<double>* omega) {
  const int m = static_cast<int>(pb.v.size());
  auto& h = pb.h;
  h.resize(m);
  for (int k = 0; k < m; ++k) {
    double x = k == 0 ? 1.0 : 0.0;
    for (int i = 0; i < static_cast<int>(delta.size()) && i < k; ++i) x += delta[i] * h[k - 1 - i];
    h[k] = x;
  }
  // Columns X_j(k) = h_{k-j} (j = 0..s) form a lower-triangular Toeplitz block with a unit
  // diagonal, so X'X is positive definite whenever m > s: the normal equations are safe, and
  // with at most three columns they are solved by hand (Cholesky) without any heap work in
  // this inner loop.
  const int c = pb.s + 1;
  double xtx[3][3] = {}, xty[3] = {}, yty = 0.0;
  for (int k = 0; k < m; ++k) {
    yty += pb.v[k] * pb.v[k];
    for (int i = 0; i < c && i <= k; ++i) {
      xty[i] += h[k - i] * pb.v[k];
      for (int j = 0; j <= i; ++j) xtx[i][j] += h[k - i] * h[k - j];
    }
  }
  double l[3][3] = {};
  for (int i = 0; i < c; ++i)
    for (int j = 0; j <= i; ++j) {
      double v = xtx[i][j];
      for (int q = 0; q < j; ++q) v -= l[i][q] * l[j][q];
      if (i == j) {
        if (!(v > 0.0)) return kInf;
        l[i][i] = std::sqrt(v);
      } else {
        l[i][j] = v / l[j][j];
      }
    }
  double z[3] = {}, beta[3] = {};
  for (int i = 0; i < c; ++i) {
    double v = xty[i];
    for (int q = 0; q < i; ++q) v -= l[i][q] * z[q];
    z[i] = v / l[i][i];
  }
  for (int i = c - 1; i >= 0; --i) {
    double v = z[i];
    for (int q = i + 1; q < c; ++q) v -= l[q][i] * beta[q];
    beta[i] = v / l[i][i];
  }
  if (omega != nullptr) omega->assign(beta, beta + c);
  // SSE = y'y - beta' X'y at the least-squares solution; rounding below zero is clamped.
  double fitted = 0.0;
  for (int i = 0; i < c; ++i) fitted += beta[i] * xty[i];
  const double sse = std::max(yty - fitted, 0.0);
  return std::isfinite(sse) ? sse : kInf;
}

double sse_of_unconstrained(ShapeProblem& pb, const std::vector<double>& z,
                            std::vector<double>* omega) {
  double delta[kMaxShapeOrder] = {};
  stable_coefficients(z, std::span<double>(delta, z.size()));
  return concentrated_sse(pb, std::span<const double>(delta, z.size()), omega);
}

ShapeFit fit_shape(const std::vector<double>& v_tail, int r, int s) {
  ShapeFit fit;
  fit.numerator = s;
  fit.denominator = r;
  const int m = static_cast<int>(v_tail.size());
  const int k = r + s + 1;
  if (m < k + 1) {
    fit.sse = kInf;
    fit.bic = kInf;
    return fit;
  }
  ShapeProblem pb{v_tail, s, r, {}};
  std::vector<double> best_z(r, 0.0);
  double best = sse_of_unconstrained(pb, best_z, nullptr);
  if (r > 0) {
    // Coarse grid over the partial autocorrelations of delta (-0.95..0.95), then a polish.
    std::vector<double> grid;
    for (int i = -19; i <= 19; i += 2) grid.push_back(std::atanh(0.05 * i));
    std::vector<double> z(r);
    const int gsize = static_cast<int>(grid.size());
    const int cells = r == 1 ? gsize : gsize * gsize;
    for (int c = 0; c < cells; ++c) {
      z[0] = grid[c % gsize];
      if (r == 2) z[1] = grid[c / gsize];
      const double e = sse_of_unconstrained(pb, z, nullptr);
      if (e < best) {
        best = e;
        best_z = z;
      }
    }
    // Polish by compass search (one or two dimensions: no need for a general optimiser).
    // Flat valleys (nearly cancelling delta and omega) would let it creep forever: at most 20
    // moves per step length, and z to 1e-6 is far finer than a suggestion needs.
    for (double step = 0.05; step > 1e-6; step *= 0.5) {
      bool moved = true;
      for (int moves = 0; moved && moves < 20; ++moves) {
        moved = false;
        for (int d = 0; d < r; ++d)
          for (double sign : {-1.0, 1.0}) {
            z = best_z;
            z[d] = std::clamp(z[d] + sign * step, -6.0, 6.0);
            const double e = sse_of_unconstrained(pb, z, nullptr);
            if (e < best) {
              best = e;
              best_z = z;
              moved = true;
            }
          }
      }
    }
  }
  fit.delta.assign(r, 0.0);
  stable_coefficients(best_z, fit.delta);
  fit.sse = concentrated_sse(pb, fit.delta, &fit.omega);
  double scale = 0.0;
  for (double x : v_tail) scale += x * x;
  const double sse = std::max(fit.sse, 1e-12 * scale + 1e-300);
  fit.bic = m * std::log(sse / m) + k * std::log(static_cast<double>(m));
  return fit;
}

// ---------------------------------------------------------------------------------------------
// Noise orders from ACF/PACF cut-offs.

struct Cutoff {
  int order = 0;  // last significant lag within 1..cap
  bool cuts = false;
  int significant = 0;  // significant lags in 1..K
};

Cutoff cutoff_of(const std::vector<double>& f, int first_index, int cap, int K, double band) {
  // f[k - 1 + first_index] is the value at lag k (first_index 1 for an ACF with lag 0 stored).
  auto at = [&](int k) { return f[static_cast<size_t>(k - 1 + first_index)]; };
  Cutoff c;
  for (int k = 1; k <= K; ++k)
    if (std::abs(at(k)) > band) {
      ++c.significant;
      if (k <= cap) c.order = k;
    }
  int later = 0;
  for (int k = c.order + 1; k <= K; ++k)
    if (std::abs(at(k)) > band) ++later;
  c.cuts = later <= 1 && (c.order > 0 || c.significant <= 1);
  return c;
}

NoiseSuggestion suggest_noise(const std::vector<double>& e, const ScreenOptions& opt) {
  NoiseSuggestion ns;
  ns.n = static_cast<int>(e.size());
  if (ns.n < 8 || is_constant(e)) {
    ns.reason = "residual too short or constant: no noise terms suggested";
    return ns;
  }
  const int K = std::max(1, std::min(opt.noise_lags, ns.n / 4));
  ns.band = opt.band_z / std::sqrt(static_cast<double>(ns.n));
  ns.acf = acf(e, K);
  ns.pacf = pacf_from_acf(ns.acf);
  const int cap = std::min(opt.max_noise_order, K);
  const Cutoff a = cutoff_of(ns.acf, 1, cap, K, ns.band);
  const Cutoff p = cutoff_of(ns.pacf, 0, cap, K, ns.band);
  if (a.order == 0 && p.order == 0 && a.significant <= 1 && p.significant <= 1) {
    ns.reason = "no significant autocorrelation: white noise";
    return ns;
  }
  auto tail_sum = [&](const std::vector<double>& f, int first_index, int from) {
    double s = 0.0;
    for (int k = from; k < from + 3 && k <= K; ++k) s += std::abs(f[k - 1 + first_index]);
    return s;
  };
  const bool ar_cut = p.cuts && p.order > 0;
  const bool ma_cut = a.cuts && a.order > 0;
  if (ar_cut && (!ma_cut || p.order < a.order)) {
    ns.p = p.order;
    ns.reason = fmt::format("PACF cuts off after lag {}", p.order);
  } else if (ma_cut && (!ar_cut || a.order < p.order)) {
    ns.q = a.order;
    ns.reason = fmt::format("ACF cuts off after lag {}", a.order);
  } else if (ar_cut && ma_cut) {
    // Same order: the function that is smaller just after the cut is the one that cuts off.
    const int c = p.order;
    if (tail_sum(ns.pacf, 0, c + 1) <= tail_sum(ns.acf, 1, c + 1)) {
      ns.p = c;
      ns.reason = fmt::format("PACF and ACF both end at lag {}; the ACF tails off more", c);
    } else {
      ns.q = c;
      ns.reason = fmt::format("ACF and PACF both end at lag {}; the PACF tails off more", c);
    }
  } else {
    ns.p = std::min(1, opt.max_noise_order);
    ns.q = std::min(1, opt.max_noise_order);
    ns.reason = "neither ACF nor PACF cuts off: mixed ARMA";
  }
  return ns;
}

// ---------------------------------------------------------------------------------------------

bool input_is_event(const RunConfig& config, const std::string& name) {
  for (const auto& in : config.inputs)
    if (in.name == name) return in.is_event;
  return false;
}

std::string indicator_note(const IndicatorInfo& ind) {
  std::string where;
  for (int row : ind.change_rows) where += (where.empty() ? "" : ", ") + std::to_string(row);
  std::string what;
  switch (ind.shape) {
    case IndicatorShape::step:
      what = fmt::format("a step from {:g} to {:g} at row {}", ind.base, ind.other, where);
      break;
    case IndicatorShape::pulse:
      what = fmt::format("pulses of {:g} (base {:g}), value changes at rows {}", ind.other,
                         ind.base, where);
      break;
    default:
      what = fmt::format("a temporary shift to {:g} (base {:g}), value changes at rows {}",
                         ind.other, ind.base, where);
      break;
  }
  return fmt::format(
      "indicator column ({}; rows from 0): screened as an event, not prewhitened; consider "
      "declaring it as an event",
      what);
}

InputScreen screen_input(const std::string& name, bool is_event, const IndicatorInfo& indicator,
                         const std::vector<double>& u, const std::vector<double>& w, int L,
                         int ar_cap, const ScreenOptions& opt,
                         std::vector<ScreenWarning>& warnings) {
  InputScreen s;
  s.name = name;
  s.is_event = is_event;
  if (!is_event) s.indicator = indicator;
  const bool deterministic = is_event || s.indicator.shape != IndicatorShape::none;
  if (s.indicator.shape != IndicatorShape::none) s.notes.push_back(indicator_note(s.indicator));
  s.max_lag = L;
  const int n = static_cast<int>(u.size());
  auto fill_empty = [&](int len) {
    s.n = len;
    s.cross_correlation.assign(2 * L + 1, 0.0);
    s.impulse.assign(L + 1, 0.0);
    s.impulse_se.assign(L + 1, 0.0);
    s.impulse_fitted.assign(L + 1, 0.0);
  };
  if (is_constant(u)) {
    fill_empty(n);
    s.notes.push_back("constant after differencing: nothing to screen (leave it out)");
    warnings.push_back({ScreenWarningKind::constant_input,
                        {name},
                        fmt::format("input '{}' is constant after differencing", name)});
    return s;
  }

  std::vector<double> alpha, beta;
  if (deterministic) {
    alpha = u;
    beta = w;
    // A step that stays, left after the model's differencing (a step in an undifferenced
    // model), carries its information in its change: correlated with an autocorrelated target it
    // smears over every lag near the true delay. One more regular difference of both sides turns
    // it into a pulse and leaves the impulse response as it is (a common difference commutes with
    // the transfer function).
    if (is_single_step(alpha)) {
      alpha = difference(alpha, Differencing{1, 0, 1});
      beta = difference(beta, Differencing{1, 0, 1});
      s.extra_differences = 1;
      s.notes.push_back(
          "a step after the model's differencing: screened on one more regular difference of it "
          "and of the target");
    }
  } else {
    s.prewhitened = true;
    s.prewhitening = opt.ar_order ? fit_ar(u, *opt.ar_order) : fit_ar_by_aic(u, ar_cap);
    alpha = ar_filter(u, s.prewhitening.phi, s.prewhitening.mean);
    beta = ar_filter(w, s.prewhitening.phi, mean_of(w));
  }
  s.n = static_cast<int>(alpha.size());
  if (is_constant(alpha) || is_constant(beta)) {
    fill_empty(s.n);
    s.notes.push_back("prewhitened series is constant: nothing to screen");
    return s;
  }
  const double sqn = std::sqrt(static_cast<double>(s.n));
  s.cross_correlation = ccf(alpha, beta, L);
  s.band = opt.band_z / sqn;
  s.family_band = normal_two_sided_quantile(opt.family_level / (L + 1)) / sqn;
  s.feedback_band = L > 0 ? normal_two_sided_quantile(opt.family_level / L) / sqn : kInf;
  s.sd_input = sd_of(alpha);
  s.sd_target = sd_of(beta);
  const double ratio = s.sd_target / s.sd_input;
  s.impulse.resize(L + 1);
  for (int k = 0; k <= L; ++k) s.impulse[k] = s.correlation_at(k) * ratio;

  // Relevance and delay.
  int first_strong = -1, peak = 0;
  for (int k = 0; k <= L; ++k) {
    if (std::abs(s.correlation_at(k)) > std::abs(s.correlation_at(peak))) peak = k;
    if (first_strong < 0 && std::abs(s.correlation_at(k)) > s.family_band) first_strong = k;
  }
  s.relevant = first_strong >= 0;
  s.impulse_fitted.assign(L + 1, 0.0);
  if (s.relevant) {
    int b = first_strong;
    while (b > 0 && std::abs(s.correlation_at(b - 1)) > s.band) --b;
    s.suggested_delay = b;
    const std::vector<double> tail(s.impulse.begin() + b, s.impulse.end());
    int best = -1;
    // The weights' sampling sd is known from the prewhitened series (that of a weight with no
    // response behind it), so the evidence for a shape is measured against it: BIC with known
    // variance, SSE / se0^2 + (r + s + 1) ln m. Against the fit's own residual variance a
    // flexible shape that follows the noise of the tail would look ever better.
    const double se0 = s.sd_target / (s.sd_input * sqn);
    const double log_m = std::log(static_cast<double>(tail.size()));
    for (int r = 0; r <= opt.max_shape_order; ++r)
      for (int q = 0; q <= opt.max_shape_order; ++q) {
        s.shapes.push_back(fit_shape(tail, r, q));
        auto& f = s.shapes.back();
        if (std::isfinite(f.bic) && se0 > 0.0)
          f.bic = f.sse / (se0 * se0) + (r + q + 1) * log_m;
        if (std::isfinite(f.bic) && (best < 0 || f.bic < s.shapes[best].bic))
          best = static_cast<int>(s.shapes.size()) - 1;
      }
    // The smallest shape within the margin of the best (fewest parameters, then smallest r).
    if (best >= 0) {
      const double limit = s.shapes[best].bic + opt.shape_bic_margin;
      for (int i = 0; i < static_cast<int>(s.shapes.size()); ++i) {
        const auto& f = s.shapes[i];
        const auto& c = s.shapes[best];
        const auto size = [](const auto& shape) {
          return std::pair(shape.numerator + shape.denominator, shape.denominator);
        };
        if (std::isfinite(f.bic) && f.bic <= limit && size(f) < size(c)) best = i;
      }
    }
    if (best >= 0) {
      s.suggested_numerator = s.shapes[best].numerator;
      s.suggested_denominator = s.shapes[best].denominator;
      s.suggested_omega = s.shapes[best].omega;
      s.suggested_delta = s.shapes[best].delta;
    } else {
      s.suggested_omega = {s.impulse[b]};  // too few lags for any fit: a single weight
    }
    s.impulse_fitted = shape_weights(b, s.suggested_omega, s.suggested_delta, L + 1);
    s.notes.push_back(fmt::format(
        "first cross-correlation beyond the family band at lag {} (r = {:.3f}); suggested b = {}, "
        "s = {}, r = {}",
        first_strong, s.correlation_at(first_strong), s.suggested_delay, s.suggested_numerator,
        s.suggested_denominator));
  } else {
    s.suggested_delay = peak;
    s.suggested_omega = {0.0};
    s.notes.push_back("no significant cross-correlation at lags 0..L (suggest leaving it out)");
  }

  double explained = 0.0;
  for (double v : s.impulse_fitted) explained += v * v;
  const double se2 = std::max(s.sd_target * s.sd_target - s.sd_input * s.sd_input * explained,
                              0.01 * s.sd_target * s.sd_target);
  s.impulse_se.assign(L + 1, std::sqrt(se2) / (s.sd_input * sqn));

  // A deterministic input (an event, or a column recognised as a step or pulse indicator) cannot
  // respond to the target: correlation at negative lags is then no sign of feedback.
  for (int k = -L; k < 0 && !deterministic; ++k)
    if (std::abs(s.correlation_at(k)) > s.feedback_band) s.feedback_lags.push_back(k);
  if (!s.feedback_lags.empty()) {
    std::string lags;
    for (int k : s.feedback_lags) {
      if (!lags.empty()) lags += ", ";
      lags += std::to_string(k);
    }
    warnings.push_back(
        {ScreenWarningKind::feedback,
         {name},
         fmt::format("input '{}' correlates with the PAST of the target (lags {}): the input may "
                     "respond to the target, so a one-way transfer function is doubtful",
                     name, lags)});
    s.notes.push_back(fmt::format("significant cross-correlation at negative lags {}", lags));
  }
  return s;
}

}  // namespace

void ScreenOptions::validate() const {
  auto fail = [](const std::string& what) { throw InputError("screen options: " + what); };
  if (max_lag < 1) fail(fmt::format("max_lag = {} must be at least 1", max_lag));
  if (ar_max_order < 0) fail(fmt::format("ar_max_order = {} must be >= 0", ar_max_order));
  if (ar_order && *ar_order < 0) fail(fmt::format("ar_order = {} must be >= 0", *ar_order));
  if (!(band_z > 0.0)) fail(fmt::format("band_z = {} must be positive", band_z));
  if (!(family_level > 0.0 && family_level < 1.0))
    fail(fmt::format("family_level = {} must lie in (0, 1)", family_level));
  if (max_shape_order < 0 || max_shape_order > 2)
    fail(fmt::format("max_shape_order = {} must lie in 0..2", max_shape_order));
  if (!(shape_bic_margin >= 0.0))
    fail(fmt::format("shape_bic_margin = {} must be >= 0", shape_bic_margin));
  if (max_noise_order < 0) fail(fmt::format("max_noise_order = {} must be >= 0", max_noise_order));
  if (noise_lags < 1) fail(fmt::format("noise_lags = {} must be at least 1", noise_lags));
  if (!(collinear > 0.0 && collinear <= 1.0))
    fail(fmt::format("collinear = {} must lie in (0, 1]", collinear));
}

std::string_view to_string(ScreenWarningKind kind) {
  switch (kind) {
    case ScreenWarningKind::correlated_inputs:
      return "correlated_inputs";
    case ScreenWarningKind::feedback:
      return "feedback";
    case ScreenWarningKind::few_observations:
      return "few_observations";
    case ScreenWarningKind::lags_capped:
      return "lags_capped";
    case ScreenWarningKind::constant_input:
      return "constant_input";
  }
  return "unknown";
}

ScreenResult screen_series(const SeriesData& data, const RunConfig& config,
                           const ScreenOptions& options) {
  options.validate();
  ScreenResult res;
  res.target_name = data.target_name;
  res.rows = data.rows();
  res.transform = config.target.transform;
  res.differencing = config.differencing;
  res.options = options;
  if (data.inputs.size() != data.input_names.size())
    throw InputError("screen: the data have " + std::to_string(data.inputs.size()) +
                     " input columns but " + std::to_string(data.input_names.size()) + " names");

  const auto z = apply_transform(data.target, config.target.transform, "target");
  auto w = difference(z, config.differencing);
  // Missing target values: the correlations need every row, so the screen (an identification
  // aid, not the likelihood) fills the missing differenced values linearly.
  {
    int last = -1;
    const int total = static_cast<int>(w.size());
    for (int t = 0; t < total; ++t) {
      if (std::isnan(w[t])) continue;
      for (int k = last + 1; k < t; ++k)
        w[k] = last < 0 ? w[t] : w[last] + (w[t] - w[last]) * (k - last) / double(t - last);
      last = t;
    }
    for (int k = last + 1; k < total; ++k) w[k] = last < 0 ? 0.0 : w[last];
  }
  const int n = static_cast<int>(w.size());
  if (n < kMinObservations)
    throw InputError(fmt::format(
        "screen: target '{}' has {} observations after differencing (of {} rows); screening "
        "needs at least {}: supply more data or reduce `differencing`",
        data.target_name, n, data.rows(), kMinObservations));
  res.n = n;
  if (n < options.min_observations)
    res.warnings.push_back(
        {ScreenWarningKind::few_observations,
         {},
         fmt::format("only {} observations after differencing (fewer than {}): correlations and "
                     "suggestions are unreliable",
                     n, options.min_observations)});

  const int L = std::min(options.max_lag, n / 4);
  res.max_lag_used = std::max(L, 1);
  if (L < options.max_lag)
    res.warnings.push_back(
        {ScreenWarningKind::lags_capped,
         {},
         fmt::format("{} lags asked but only {} observations after differencing: lags capped at "
                     "n/4 = {}",
                     options.max_lag, n, res.max_lag_used)});
  const int ar_cap = std::min(options.ar_max_order, n / 5);
  if (options.ar_order && 5 * *options.ar_order > n)
    throw InputError(fmt::format(
        "screen: ar_order = {} is too large for {} observations after differencing (at most {})",
        *options.ar_order, n, n / 5));

  std::vector<std::vector<double>> us;
  for (size_t i = 0; i < data.inputs.size(); ++i) {
    if (data.inputs[i].size() != data.target.size())
      throw InputError(fmt::format("screen: input '{}' has {} rows, the target {}",
                                   data.input_names[i], data.inputs[i].size(), data.target.size()));
    us.push_back(difference(data.inputs[i], config.differencing));
    const bool event = input_is_event(config, data.input_names[i]);
    const IndicatorInfo indicator = event ? IndicatorInfo{} : classify_indicator(data.inputs[i]);
    res.inputs.push_back(screen_input(data.input_names[i], event, indicator, us.back(), w,
                                      res.max_lag_used, ar_cap, options, res.warnings));
  }

  // Inputs strongly correlated with each other: their separate screens cannot tell them apart.
  const size_t m = us.size();
  res.input_correlation.assign(m, std::vector<double>(m, 0.0));
  for (size_t i = 0; i < m; ++i) {
    res.input_correlation[i][i] = 1.0;
    for (size_t j = 0; j < i; ++j) {
      double c = 0.0;
      if (!is_constant(us[i]) && !is_constant(us[j])) c = ccf(us[i], us[j], 0)[0];
      res.input_correlation[i][j] = res.input_correlation[j][i] = c;
      if (std::abs(c) > options.collinear)
        res.warnings.push_back(
            {ScreenWarningKind::correlated_inputs,
             {data.input_names[j], data.input_names[i]},
             fmt::format("inputs '{}' and '{}' are strongly correlated (r = {:.3f} after "
                         "differencing): their effects are hard to separate; consider keeping one",
                         data.input_names[j], data.input_names[i], c)});
    }
  }

  // Noise: what the suggested transfer-function parts leave of the differenced target.
  std::vector<double> e(w.begin(), w.end());
  const double wbar = mean_of(w);
  for (auto& v : e) v -= wbar;
  for (size_t i = 0; i < m; ++i) {
    const auto& s = res.inputs[i];
    if (!s.relevant) continue;
    std::vector<double> uc = us[i];
    const double ubar = mean_of(uc);
    for (auto& v : uc) v -= ubar;
    const auto x = shape_output(uc, s.suggested_delay, s.suggested_omega, s.suggested_delta);
    for (int t = 0; t < n; ++t) e[t] -= x[t];
  }
  const int drop = std::min(res.max_lag_used, n / 4);
  e.erase(e.begin(), e.begin() + drop);
  res.noise = suggest_noise(e, options);
  return res;
}

nlohmann::json to_json(const ScreenResult& r) {
  using nlohmann::json;
  json out;
  out["target"] = r.target_name;
  out["rows"] = r.rows;
  out["n_differenced"] = r.n;
  out["differencing"] = {{"regular", r.differencing.regular},
                         {"seasonal", r.differencing.seasonal},
                         {"period", r.differencing.period}};
  out["transform"] = {{"kind", std::string(to_string(r.transform.kind))},
                      {"lambda", r.transform.lambda}};
  const auto& o = r.options;
  out["options"] = {{"max_lag", o.max_lag},
                    {"max_lag_used", r.max_lag_used},
                    {"ar_max_order", o.ar_max_order},
                    {"ar_order", o.ar_order ? json(*o.ar_order) : json(nullptr)},
                    {"band_z", o.band_z},
                    {"family_level", o.family_level},
                    {"max_shape_order", o.max_shape_order},
                    {"shape_bic_margin", o.shape_bic_margin},
                    {"max_noise_order", o.max_noise_order},
                    {"noise_lags", o.noise_lags},
                    {"collinear", o.collinear},
                    {"min_observations", o.min_observations},
                    {"prewhitening_fit", "conditional least squares, order by AIC"},
                    {"shape_criterion", "BIC on the impulse-response estimates"}};
  json inputs = json::array();
  for (const auto& s : r.inputs) {
    json lags = json::array();
    for (int k = -s.max_lag; k <= s.max_lag; ++k) lags.push_back(k);
    json shapes = json::array();
    for (const auto& f : s.shapes)
      shapes.push_back({{"numerator", f.numerator},
                        {"denominator", f.denominator},
                        {"sse", std::isfinite(f.sse) ? json(f.sse) : json(nullptr)},
                        {"bic", std::isfinite(f.bic) ? json(f.bic) : json(nullptr)},
                        {"omega", f.omega},
                        {"delta", f.delta}});
    json aic = json::array();
    for (double a : s.prewhitening.aic) aic.push_back(std::isfinite(a) ? json(a) : json(nullptr));
    inputs.push_back(
        {{"name", s.name},
         {"event", s.is_event},
         {"indicator", s.indicator.shape == IndicatorShape::none
                           ? json(nullptr)
                           : json{{"shape", std::string(to_string(s.indicator.shape))},
                                  {"base", s.indicator.base},
                                  {"other", s.indicator.other},
                                  {"change_rows", s.indicator.change_rows}}},
         {"prewhitened", s.prewhitened},
         {"extra_differences", s.extra_differences},
         {"prewhitening",
          {{"order", s.prewhitening.order},
           {"mean", s.prewhitening.mean},
           {"phi", s.prewhitening.phi},
           {"sigma2", s.prewhitening.sigma2},
           {"aic", aic}}},
         {"n", s.n},
         {"max_lag", s.max_lag},
         {"lags", lags},
         {"cross_correlation", s.cross_correlation},
         {"band", s.band},
         {"family_band", s.family_band},
         {"feedback_band", std::isfinite(s.feedback_band) ? json(s.feedback_band) : json(nullptr)},
         {"sd_prewhitened_input", s.sd_input},
         {"sd_prewhitened_target", s.sd_target},
         {"impulse", s.impulse},
         {"impulse_se", s.impulse_se},
         {"impulse_fitted", s.impulse_fitted},
         {"relevant", s.relevant},
         {"suggested_delay", s.suggested_delay},
         {"suggested_numerator", s.suggested_numerator},
         {"suggested_denominator", s.suggested_denominator},
         {"suggested_omega", s.suggested_omega},
         {"suggested_delta", s.suggested_delta},
         {"shapes", shapes},
         {"feedback_lags", s.feedback_lags},
         {"notes", s.notes}});
  }
  out["inputs"] = inputs;
  json names = json::array();
  for (const auto& s : r.inputs) names.push_back(s.name);
  out["input_correlation"] = {{"names", names}, {"matrix", r.input_correlation}};
  out["noise"] = {{"p", r.noise.p},          {"q", r.noise.q},     {"n", r.noise.n},
                  {"band", r.noise.band},    {"acf", r.noise.acf}, {"pacf", r.noise.pacf},
                  {"reason", r.noise.reason}};
  json warnings = json::array();
  for (const auto& wv : r.warnings)
    warnings.push_back({{"kind", std::string(to_string(wv.kind))},
                        {"code", std::string(to_string(wv.kind))},  // as every warning_codes entry
                        {"inputs", wv.inputs},
                        {"message", wv.message}});
  out["warnings"] = warnings;
  return out;
}

}  // namespace lagsieve
