#include "model/simulate.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <set>

#include "core/error.h"
#include "core/random.h"
#include "data/events.h"
#include "data/time_index.h"
#include "data/transform.h"
#include "model/polynomial.h"

namespace lagsieve {

namespace {

// Integrates x by the inverse of the differencing, starting from zeros.
std::vector<double> integrate(const std::vector<double>& w, const Differencing& diff) {
  const std::vector<double> head(static_cast<size_t>(diff.lost()), 0.0);
  return undifference(head, w, diff);
}

// Roots of a stationary (stable) polynomial lie outside the unit circle; a small margin keeps
// near-unit-root specs, which would take thousands of rows to settle, out as well.
bool stationary(const std::vector<double>& coef) {
  return coef.empty() || min_root_modulus(coef, -1.0) > 1.0 + 1e-6;
}

void check_spec(const SimulationSpec& spec) {
  if (spec.n < 1) throw InputError(fmt::format("simulation: n must be positive, got {}", spec.n));
  if (spec.burn_in < 0)
    throw InputError(fmt::format("simulation: burn_in must be >= 0, got {}", spec.burn_in));
  if (spec.burn_in < spec.integrate.lost())
    throw InputError(
        fmt::format("simulation: burn_in {} is shorter than the {} rows the "
                    "integration needs; raise burn_in",
                    spec.burn_in, spec.integrate.lost()));
  if (!(spec.sigma >= 0.0) || !std::isfinite(spec.sigma))
    throw InputError(fmt::format("simulation: noise sigma must be >= 0, got {}", spec.sigma));
  if ((!spec.seasonal_phi.empty() || !spec.seasonal_theta.empty()) && spec.noise.period < 2)
    throw InputError("simulation: seasonal noise terms need a period of at least 2");
  if (!stationary(expand_ar(spec.phi, spec.seasonal_phi, spec.noise.period)))
    throw InputError(
        "simulation: the noise AR polynomial is not stationary (a root on or inside "
        "the unit circle); the series would not settle. Shrink the AR coefficients");
  std::set<std::string> names{spec.target};
  for (const auto& in : spec.inputs) {
    const auto where = fmt::format("simulation: input '{}'", in.name);
    if (in.name.empty()) throw InputError("simulation: an input has no name");
    if (!names.insert(in.name).second)
      throw InputError(
          fmt::format("{}: the name is used twice (inputs and target need distinct "
                      "names)",
                      where));
    if (in.order.delay < 0 || in.order.numerator < 0 || in.order.denominator < 0)
      throw InputError(fmt::format("{}: negative order", where));
    if (in.params.omega.size() != static_cast<size_t>(in.order.numerator) + 1 ||
        in.params.delta.size() != static_cast<size_t>(in.order.denominator))
      throw InputError(
          fmt::format("{}: {} omega and {} delta values do not match numerator {} "
                      "and denominator {}",
                      where, in.params.omega.size(), in.params.delta.size(), in.order.numerator,
                      in.order.denominator));
    if (!stationary(in.params.delta))
      throw InputError(
          fmt::format("{}: the delta polynomial is not stable (a root on or inside "
                      "the unit circle); its response would never die out",
                      where));
    if (in.is_event) {
      if (in.at_row < 0 || in.at_row >= spec.n)
        throw InputError(
            fmt::format("{}: the event row {} is outside the simulated rows "
                        "0..{}; simulate more rows or move the event earlier",
                        where, in.at_row, spec.n - 1));
      continue;
    }
    if (!(std::abs(in.ar) < 1.0))
      throw InputError(fmt::format("{}: ar {} must lie strictly between -1 and 1", where, in.ar));
    if (!(in.sd >= 0.0) || !std::isfinite(in.sd) || !std::isfinite(in.mean))
      throw InputError(fmt::format("{}: sd must be >= 0 and mean finite", where));
    if (in.cycle_amplitude != 0.0 && !(in.cycle_period > 0.0))
      throw InputError(fmt::format("{}: a cycle needs a period > 0 (rows per cycle), got {}", where,
                                   in.cycle_period));
  }
}

std::string iso_date(std::chrono::sys_days day) {
  const std::chrono::year_month_day ymd{day};
  return fmt::format("{:04d}-{:02d}-{:02d}", static_cast<int>(ymd.year()),
                     static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
}

}  // namespace

std::vector<std::string> simulated_stamps(const std::string& start_date,
                                          SimulatedFrequency frequency, int n) {
  const auto stamp = parse_time_stamp(start_date);
  if (!stamp || stamp->format != TimeFormat::date)
    throw InputError(
        fmt::format("simulation: start date '{}' is not a date; write YYYY-MM-DD", start_date));
  const std::chrono::sys_days first{std::chrono::days{stamp->key / 86400}};
  const int step = frequency == SimulatedFrequency::weekly ? 7 : 1;
  std::vector<std::string> out;
  out.reserve(static_cast<size_t>(std::max(n, 0)));
  for (int t = 0; t < n; ++t) out.push_back(iso_date(first + std::chrono::days{t * step}));
  return out;
}

SeriesData simulate(const SimulationSpec& spec) {
  check_spec(spec);
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
  out.target_name = spec.target;
  std::vector<double> w(total);
  for (int t = 0; t < total; ++t) w[t] = spec.constant + noise[t];
  const int lost = spec.integrate.lost();
  for (const auto& input : spec.inputs) {
    std::vector<double> u(total);  // the input on the differenced scale, where the model holds
    if (input.is_event) {
      // The event is defined on the output scale; the model sees its differences. The burn-in
      // is at least `lost` rows long and the event is zero there, so zero padding is exact.
      const auto level = event_values(input.shape, spec.burn_in + input.at_row, total);
      const auto diffed = difference(level, spec.integrate);
      std::copy(diffed.begin(), diffed.end(), u.begin() + lost);
    } else {
      double level = 0.0;
      for (int t = 0; t < total; ++t) {
        level = input.ar * level + input.sd * rng.normal();
        u[t] = input.mean + level;
        if (input.cycle_amplitude != 0.0) {
          const double row = static_cast<double>(t - spec.burn_in);
          u[t] += input.cycle_amplitude *
                  std::cos(2.0 * std::numbers::pi * (row - input.cycle_peak) / input.cycle_period);
        }
      }
    }
    const auto x = transfer_response(u, input.order, input.params);
    for (int t = 0; t < total; ++t) w[t] += x[t];
    if (input.is_event) {
      out.add_input(input.name, event_values(input.shape, input.at_row + lost, spec.n + lost),
                    true);
    } else {
      std::vector<double> kept(u.begin() + spec.burn_in, u.end());
      out.add_input(input.name, integrate(kept, spec.integrate), false);
    }
  }
  std::vector<double> kept(w.begin() + spec.burn_in, w.end());
  out.target = integrate(kept, spec.integrate);
  // The integrated series are longer by the differencing lag count; keep exactly n rows. (Event
  // values above were made n + lost long with the event shifted by lost, to line up here.)
  const size_t drop = out.target.size() - static_cast<size_t>(spec.n);
  out.target.erase(out.target.begin(), out.target.begin() + drop);
  for (auto& u : out.inputs) u.erase(u.begin(), u.begin() + drop);
  if (spec.start_date.empty()) {
    out.time.resize(out.target.size());
    for (size_t t = 0; t < out.time.size(); ++t) out.time[t] = std::to_string(t + 1);
  } else {
    out.time = simulated_stamps(spec.start_date, spec.frequency, spec.n);
  }
  return out;
}

}  // namespace lagsieve
