#include "forecast/model_checks.h"

#include <fmt/format.h>
#include <cmath>
#include <set>
#include <span>

#include "core/error.h"
#include "io/config.h"
#include "model/polynomial.h"

namespace lagsieve {

namespace {

class Checker {
 public:
  explicit Checker(const std::string& source) : source_(source) {}

  [[noreturn]] void fail(const std::string& path, const std::string& what) const {
    throw InputError(fmt::format("{}: model file field '{}' {}", source_, path, what));
  }
  void range(int v, int lo, int hi, const std::string& path) const {
    if (v < lo || v > hi) fail(path, fmt::format("is {}; it must be between {} and {}", v, lo, hi));
  }
  // `expected` coefficients, as `rule` (an expression over other fields) says.
  void size(size_t n, int expected, const std::string& path, const std::string& rule) const {
    if (static_cast<long long>(n) != expected)
      fail(path, fmt::format("has {} coefficient{} where {} gives {}; the file was edited or "
                             "damaged",
                             n, n == 1 ? "" : "s", rule, expected));
  }
  // 1 - sum a_j B^j with every root outside the unit circle.
  void stationary(std::span<const double> a, const std::string& path, const char* what) const {
    if (a.empty()) return;
    const double modulus = min_root_modulus(a, -1.0);
    if (!(modulus > 1.0))
      fail(path, fmt::format("is not {} (smallest root modulus {:.6g}, it must exceed 1); re-fit "
                             "the model",
                             what, modulus));
  }
  // 1 + sum a_j B^j with no root inside the unit circle.
  void invertible(std::span<const double> a, const std::string& path) const {
    if (a.empty()) return;
    const double modulus = min_root_modulus(a, 1.0);
    if (!(modulus >= 1.0 - kMaRootTolerance))
      fail(path, fmt::format("is not invertible (smallest root modulus {:.6g}, it must be at "
                             "least 1); re-fit the model",
                             modulus));
  }
  void positive(double v, const std::string& path) const {
    if (!(v > 0.0) || !std::isfinite(v))
      fail(path, fmt::format("is {}; a variance must be a positive number", v));
  }

 private:
  const std::string& source_;
};

void check_spec(const Checker& c, const ModelSpec& spec) {
  const auto& t = spec.transform;
  if (t.kind == TransformKind::boxcox && !(std::abs(t.lambda) <= 3.0))
    c.fail("spec.transform.lambda", fmt::format("is {}; it must be between -3 and 3", t.lambda));
  const auto& d = spec.differencing;
  c.range(d.regular, 0, kMaxDifferencing, "spec.differencing.regular");
  c.range(d.seasonal, 0, kMaxDifferencing, "spec.differencing.seasonal");
  c.range(d.period, d.seasonal > 0 ? 2 : 1, kMaxModelPeriod, "spec.differencing.period");
  const auto& n = spec.noise;
  c.range(n.p, 0, kMaxArma, "spec.noise.p");
  c.range(n.q, 0, kMaxArma, "spec.noise.q");
  c.range(n.seasonal_p, 0, kMaxSeasonalArma, "spec.noise.seasonal_p");
  c.range(n.seasonal_q, 0, kMaxSeasonalArma, "spec.noise.seasonal_q");
  const bool seasonal = n.seasonal_p > 0 || n.seasonal_q > 0;
  c.range(n.period, seasonal ? 2 : 1, kMaxModelPeriod, "spec.noise.period");
  std::set<std::string> names;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const std::string path = fmt::format("spec.inputs[{}].", i);
    const auto& in = spec.inputs[i];
    if (in.name.empty()) c.fail(path + "name", "is empty");
    if (!names.insert(in.name).second)
      c.fail(path + "name", fmt::format("'{}' appears twice among the inputs", in.name));
    c.range(in.order.delay, 0, kMaxDelay, path + "delay");
    c.range(in.order.numerator, 0, kMaxNumerator, path + "numerator");
    c.range(in.order.denominator, 0, kMaxDenominator, path + "denominator");
  }
}

void check_params(const Checker& c, const FittedModel& m) {
  const auto& spec = m.spec;
  const auto& p = m.params;
  c.positive(p.sigma2, "params.sigma2");
  c.size(p.phi.size(), spec.noise.p, "params.phi", "spec.noise.p");
  c.size(p.theta.size(), spec.noise.q, "params.theta", "spec.noise.q");
  c.size(p.seasonal_phi.size(), spec.noise.seasonal_p, "params.seasonal_phi",
         "spec.noise.seasonal_p");
  c.size(p.seasonal_theta.size(), spec.noise.seasonal_q, "params.seasonal_theta",
         "spec.noise.seasonal_q");
  // The product phi(B) Phi(B^S) is stationary exactly when both factors are.
  c.stationary(p.phi, "params.phi", "stationary");
  c.stationary(p.seasonal_phi, "params.seasonal_phi", "stationary");
  c.invertible(p.theta, "params.theta");
  c.invertible(p.seasonal_theta, "params.seasonal_theta");
  if (p.inputs.size() != spec.inputs.size())
    c.fail("params.inputs", fmt::format("has {} entries for the {} inputs of spec.inputs",
                                        p.inputs.size(), spec.inputs.size()));
  for (size_t i = 0; i < p.inputs.size(); ++i) {
    const std::string path = fmt::format("params.inputs[{}].", i);
    const auto& order = spec.inputs[i].order;
    c.size(p.inputs[i].omega.size(), order.numerator + 1, path + "omega",
           fmt::format("spec.inputs[{}].numerator + 1", i));
    c.size(p.inputs[i].delta.size(), order.denominator, path + "delta",
           fmt::format("spec.inputs[{}].denominator", i));
    if (!p.inputs[i].state.empty())  // empty: the filter starts from zero
      c.size(p.inputs[i].state.size(), spec.start_states(i), path + "state",
             fmt::format("spec.inputs[{}].denominator with spec.filter_start: estimated (else 0)",
                         i));
    c.stationary(p.inputs[i].delta, path + "delta", "stable");
  }
}

void check_uses(const Checker& c, const FittedModel& m) {
  if (m.inputs.size() != m.spec.inputs.size())
    c.fail("spec.inputs", "holds a different number of input uses than input terms");
  for (size_t i = 0; i < m.inputs.size(); ++i) {
    const std::string path = fmt::format("spec.inputs[{}].", i);
    const auto& use = m.inputs[i];
    if (use.known_steps < 0)
      c.fail(path + "known_steps", fmt::format("is {}; it must be 0 or more", use.known_steps));
    if (use.is_event && use.at.empty()) c.fail(path + "at", "is empty; an event needs its time");
  }
}

void check_input_models(const Checker& c, const FittedModel& m) {
  std::set<std::string> seen;
  for (size_t k = 0; k < m.input_models.size(); ++k) {
    const std::string path = fmt::format("input_models[{}].", k);
    const auto& im = m.input_models[k];
    bool known = false;
    for (const auto& t : m.spec.inputs) known = known || t.name == im.input;
    if (!known)
      c.fail(path + "input", fmt::format("'{}' is not an input of spec.inputs", im.input));
    if (!seen.insert(im.input).second)
      c.fail(path + "input", fmt::format("'{}' has a second own model", im.input));
    c.range(im.p, 0, kMaxArma, path + "p");
    c.range(im.q, 0, kMaxArma, path + "q");
    c.size(im.phi.size(), im.p, path + "phi", path + "p");
    c.size(im.theta.size(), im.q, path + "theta", path + "q");
    c.positive(im.sigma2, path + "sigma2");
    c.stationary(im.phi, path + "phi", "stationary");
    c.invertible(im.theta, path + "theta");
    if (im.covariance.size() > 0 && im.covariance.rows() != im.p + im.q + 1)
      c.fail(path + "covariance",
             fmt::format("has {} rows; it must have p + q + 1 = {} (phi, theta, the mean)",
                         im.covariance.rows(), im.p + im.q + 1));
  }
}

void check_fit(const Checker& c, const FittedModel& m) {
  const auto n = m.param_names.size();
  if (m.covariance.rows() != static_cast<Eigen::Index>(n) ||
      m.covariance.cols() != static_cast<Eigen::Index>(n))
    c.fail("covariance.matrix", fmt::format("is {} x {} for the {} names of covariance.names",
                                            m.covariance.rows(), m.covariance.cols(), n));
  for (Eigen::Index i = 0; i < m.covariance.rows(); ++i)
    if (m.covariance(i, i) < 0.0)  // NaN (null: not estimated) is allowed
      c.fail(fmt::format("covariance.matrix[{}][{}]", i, i),
             fmt::format("is {}; a variance cannot be negative", m.covariance(i, i)));
  if (m.n_obs < 0) c.fail("fit.n_obs", "is negative");
  if (m.n_params < 0) c.fail("fit.n_params", "is negative");
  if (m.start < 0) c.fail("fit.start", "is negative");
  if (m.training.rows < 0) c.fail("training.rows", "is negative");
}

}  // namespace

void check_model_spec(const FittedModel& model, const std::string& source) {
  const Checker c(source);
  check_spec(c, model.spec);
  check_uses(c, model);
}

void check_fitted_model(const FittedModel& model, const std::string& source) {
  check_model_spec(model, source);
  const Checker c(source);
  check_params(c, model);
  check_input_models(c, model);
  check_fit(c, model);
}

}  // namespace lagsieve
