#include "model/simulate.h"

#include "core/error.h"
#include "core/random.h"
#include "data/transform.h"
#include "model/polynomial.h"

namespace lagsieve {

namespace {

// Integrates x by the inverse of the differencing, starting from zeros.
std::vector<double> integrate(const std::vector<double>& w, const Differencing& diff) {
  const std::vector<double> head(static_cast<size_t>(diff.lost()), 0.0);
  return undifference(head, w, diff);
}

}  // namespace

SeriesData simulate(const SimulationSpec& spec) {
  if (spec.n < 1) throw InputError("simulation: n must be positive");
  Random rng(spec.seed);
  const int total = spec.n + spec.burn_in;

  // Noise: ARMA filter of Gaussian innovations, with the multiplicative seasonal polynomials
  // expanded into one AR and one MA polynomial.
  const auto ar = expand_ar(spec.phi, spec.seasonal_phi, spec.noise.period);
  const auto ma = expand_ma(spec.theta, spec.seasonal_theta, spec.noise.period);
  std::vector<double> a(total), noise(total, 0.0);
  for (auto& v : a) v = spec.sigma * rng.normal();
  for (int t = 0; t < total; ++t) {
    double v = a[t];
    for (size_t j = 0; j < ma.size(); ++j)
      if (t - 1 - static_cast<int>(j) >= 0) v += ma[j] * a[t - 1 - j];
    for (size_t j = 0; j < ar.size(); ++j)
      if (t - 1 - static_cast<int>(j) >= 0) v += ar[j] * noise[t - 1 - j];
    noise[t] = v;
  }

  SeriesData out;
  out.target_name = "y";
  std::vector<double> w(total);
  for (int t = 0; t < total; ++t) w[t] = spec.constant + noise[t];
  for (const auto& input : spec.inputs) {
    std::vector<double> u(total);
    double level = 0.0;
    for (int t = 0; t < total; ++t) {
      level = input.ar * level + input.sd * rng.normal();
      u[t] = input.mean + level;
    }
    const auto x = transfer_response(u, input.order, input.params);
    for (int t = 0; t < total; ++t) w[t] += x[t];
    std::vector<double> kept(u.begin() + spec.burn_in, u.end());
    out.input_names.push_back(input.name);
    out.inputs.push_back(integrate(kept, spec.integrate));
  }
  std::vector<double> kept(w.begin() + spec.burn_in, w.end());
  out.target = integrate(kept, spec.integrate);
  // The integrated series are longer by the differencing lag count; keep exactly n rows.
  const size_t drop = out.target.size() - static_cast<size_t>(spec.n);
  out.target.erase(out.target.begin(), out.target.begin() + drop);
  for (auto& u : out.inputs) u.erase(u.begin(), u.begin() + drop);
  out.time.resize(out.target.size());
  for (size_t t = 0; t < out.time.size(); ++t) out.time[t] = std::to_string(t + 1);
  return out;
}

}  // namespace lagsieve
