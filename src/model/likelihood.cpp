#include "model/likelihood.h"
#include "model/collinearity.h"

#include <fmt/format.h>
#include <Eigen/Cholesky>
#include <Eigen/QR>
#include <algorithm>
#include <cmath>
#include <numbers>

#include "core/error.h"
#include "data/transform.h"
#include "model/polynomial.h"

namespace lagsieve {

int LikelihoodProblem::n_nonlinear() const {
  int k = spec.noise.p + spec.noise.q + spec.noise.seasonal_p + spec.noise.seasonal_q;
  for (const auto& term : spec.inputs) k += term.order.denominator;
  return k;
}

int LikelihoodProblem::n_obs() const {
  int n = n_rows();
  if (!missing.empty())
    for (int t = std::max(start, 0); t < static_cast<int>(w.size()); ++t) n -= missing[t] ? 1 : 0;
  return n;
}

int LikelihoodProblem::n_linear() const {
  int k = spec.constant ? 1 : 0;
  for (size_t i = 0; i < spec.inputs.size(); ++i)
    k += spec.inputs[i].order.numerator + 1 + spec.start_states(i);
  return k;
}

int minimum_start(const ModelSpec& spec) {
  int start = 0;
  for (const auto& term : spec.inputs)
    start = std::max(start, term.order.delay + term.order.numerator);
  return start;
}

// Inputs whose lagged values over the estimation sample are (nearly) a linear combination of the
// constant and the columns before them cannot have separate effects: the GLS step would fail with
// no name attached. Gram-Schmidt over the columns the omegas multiply (constant first, if any,
// then each input's lags b..b+s in spec order; with a denominator the regressor is the filtered
// input, whose lags are collinear when the raw ones are) finds the first column that adds nothing
// new; a least-squares fit on the columns before it names the ones it is made of.
std::string collinear_inputs(const LikelihoodProblem& problem, double tolerance) {
  const int n = problem.n_rows();
  const auto& spec = problem.spec;
  std::vector<Eigen::VectorXd> columns, basis;
  std::vector<std::string> names;
  auto add = [&](const Eigen::VectorXd& column, const std::string& name) -> std::string {
    // A column of zeros (a lag reaching only zeros of an input) is a combination of nothing:
    // said as it is, also when no column comes before it.
    if (column.isZero(0.0))
      return fmt::format(
          "{} is zero at every row of the estimation sample, so its effect cannot be estimated; "
          "leave it out, use another delay or check the column",
          name);
    if (!std::isfinite(column.norm()))
      return fmt::format(
          "{} has values too large to compute with over the estimation sample (their squares "
          "overflow); rescale the column",
          name);
    Eigen::VectorXd r = column;
    for (const auto& q : basis) r -= q.dot(r) * q;  // modified Gram-Schmidt
    const double norm = r.norm();
    if (norm > tolerance * column.norm()) {
      columns.push_back(column);
      basis.emplace_back(r / norm);
      names.push_back(name);
      return std::string();
    }
    Eigen::MatrixXd x(n, static_cast<Eigen::Index>(columns.size()));
    for (size_t j = 0; j < columns.size(); ++j) x.col(static_cast<Eigen::Index>(j)) = columns[j];
    const Eigen::VectorXd beta = x.colPivHouseholderQr().solve(column);
    std::string parts;
    for (size_t j = 0; j < columns.size(); ++j)
      if (std::abs(beta(static_cast<Eigen::Index>(j))) * columns[j].norm() > 1e-6 * column.norm())
        parts += (parts.empty() ? "" : ", ") + names[j];
    return fmt::format(
        "{} is (nearly) a linear combination of {} over the estimation sample, so their effects "
        "cannot be told apart; leave one of them out or check the columns",
        name, parts);
  };
  if (spec.constant) {
    if (auto why = add(Eigen::VectorXd::Ones(n), "the constant"); !why.empty()) return why;
  }
  for (size_t i = 0; i < problem.u.size(); ++i) {
    const auto& order = spec.inputs[i].order;
    for (int j = 0; j <= order.numerator; ++j) {  // the lagged columns the omegas multiply
      const int lag = order.delay + j;
      auto why =
          add(Eigen::Map<const Eigen::VectorXd>(problem.u[i].data() + problem.start - lag, n),
              lag == 0 ? fmt::format("input '{}'", spec.inputs[i].name)
                       : fmt::format("input '{}' at lag {}", spec.inputs[i].name, lag));
      if (!why.empty()) return why;
    }
  }
  return {};
}

LikelihoodProblem make_problem(const SeriesData& data, const ModelSpec& spec, int start) {
  LikelihoodProblem problem;
  problem.spec = spec;
  const auto transformed = apply_transform(data.target, spec.transform, data.target_name.c_str());
  problem.w = difference(transformed, spec.differencing);
  for (const auto& term : spec.inputs) {
    const int index = data.input_index(term.name);
    if (index < 0)
      throw InputError(
          fmt::format("input '{}' is not in the data of series '{}'", term.name, data.target_name));
    problem.u.push_back(difference(data.inputs[index], spec.differencing));
    // The same rule as the screen's: an event by the config, else an indicator by its values.
    const bool event = data.is_event(static_cast<size_t>(index));
    problem.input_kinds.push_back(
        {event, event ? IndicatorShape::none : classify_indicator(data.inputs[index]).shape});
  }
  problem.start = start < 0 ? minimum_start(spec) : start;
  if (std::any_of(problem.w.begin(), problem.w.end(), [](double v) { return std::isnan(v); })) {
    problem.missing.resize(problem.w.size());
    for (size_t t = 0; t < problem.w.size(); ++t) problem.missing[t] = std::isnan(problem.w[t]);
  }
  const int needed = problem.n_params() + 3;
  if (problem.n_obs() < needed)
    throw InputError(fmt::format(
        "series '{}': only {} observations remain after differencing ({} lost), the "
        "largest delay + numerator lag ({}) and missing values; the model has {} parameters and "
        "needs at least {}. Use smaller orders or delays, or more data",
        data.target_name, std::max(problem.n_obs(), 0), spec.differencing.lost(), problem.start,
        problem.n_params(), needed));
  for (size_t i = 0; i < problem.u.size(); ++i) {
    const auto& u = problem.u[i];
    const auto [lo, hi] = std::minmax_element(u.begin() + problem.start, u.end());
    if (*lo == *hi)
      throw InputError(fmt::format(
          "input '{}' is constant over the estimation sample after differencing, so its effect "
          "cannot be estimated; leave it out or check the column",
          spec.inputs[i].name));
  }
  if (auto why = collinear_inputs(problem, kCollinearTolerance); !why.empty())
    throw InputError(why);
  return problem;
}

std::vector<std::string> nonlinear_names(const ModelSpec& spec) {
  std::vector<std::string> names;
  for (const auto& term : spec.inputs)
    for (int j = 1; j <= term.order.denominator; ++j)
      names.push_back(fmt::format("{}.delta{}", term.name, j));
  for (int j = 1; j <= spec.noise.p; ++j) names.push_back(fmt::format("phi{}", j));
  for (int j = 1; j <= spec.noise.q; ++j) names.push_back(fmt::format("theta{}", j));
  for (int j = 1; j <= spec.noise.seasonal_p; ++j) names.push_back(fmt::format("Phi{}", j));
  for (int j = 1; j <= spec.noise.seasonal_q; ++j) names.push_back(fmt::format("Theta{}", j));
  return names;
}

std::vector<std::string> linear_names(const ModelSpec& spec) {
  std::vector<std::string> names;
  if (spec.constant) names.emplace_back("constant");
  for (const auto& term : spec.inputs)
    for (int j = 0; j <= term.order.numerator; ++j)
      names.push_back(fmt::format("{}.omega{}", term.name, j));
  for (size_t i = 0; i < spec.inputs.size(); ++i)
    for (int k = 1; k <= spec.start_states(i); ++k)
      names.push_back(fmt::format("{}.start{}", spec.inputs[i].name, k));
  return names;
}

std::vector<double> pack_nonlinear(const ModelSpec& spec, const ModelParams& p) {
  std::vector<double> v;
  for (size_t i = 0; i < spec.inputs.size(); ++i)
    v.insert(v.end(), p.inputs[i].delta.begin(), p.inputs[i].delta.end());
  v.insert(v.end(), p.phi.begin(), p.phi.end());
  v.insert(v.end(), p.theta.begin(), p.theta.end());
  v.insert(v.end(), p.seasonal_phi.begin(), p.seasonal_phi.end());
  v.insert(v.end(), p.seasonal_theta.begin(), p.seasonal_theta.end());
  return v;
}

std::vector<double> pack_linear(const ModelSpec& spec, const ModelParams& p) {
  std::vector<double> v;
  if (spec.constant) v.push_back(p.constant);
  for (size_t i = 0; i < spec.inputs.size(); ++i)
    v.insert(v.end(), p.inputs[i].omega.begin(), p.inputs[i].omega.end());
  for (size_t i = 0; i < spec.inputs.size(); ++i)  // absent states (a zero start) count as 0
    for (int k = 0; k < spec.start_states(i); ++k)
      v.push_back(k < static_cast<int>(p.inputs[i].state.size()) ? p.inputs[i].state[k] : 0.0);
  return v;
}

ModelParams unpack(const ModelSpec& spec, std::span<const double> nonlinear,
                   std::span<const double> linear, double sigma2) {
  ModelParams p = zero_params(spec);
  size_t k = 0;
  for (auto& input : p.inputs)
    for (auto& d : input.delta) d = nonlinear[k++];
  for (auto& v : p.phi) v = nonlinear[k++];
  for (auto& v : p.theta) v = nonlinear[k++];
  for (auto& v : p.seasonal_phi) v = nonlinear[k++];
  for (auto& v : p.seasonal_theta) v = nonlinear[k++];
  size_t l = 0;
  if (spec.constant) p.constant = linear[l++];
  for (auto& input : p.inputs)
    for (auto& o : input.omega) o = linear[l++];
  for (auto& input : p.inputs)
    for (auto& s : input.state) s = linear[l++];
  p.sigma2 = sigma2;
  return p;
}

namespace {

// y = u / delta(B) from zero pre-sample values (the zero-start response; an estimated start adds
// the start-state columns of build_columns), into `out`.
void filter_denominator(const std::vector<double>& u, std::span<const double> delta,
                        std::vector<double>& out) {
  const int total = static_cast<int>(u.size());
  const int r = static_cast<int>(delta.size());
  out.resize(total);
  if (total == 0) return;
  if (r == 0) {  // the common short cases without the inner loop (same arithmetic)
    std::copy(u.begin(), u.end(), out.begin());
    return;
  }
  if (r == 1) {
    const double d = delta[0];
    double prev = u[0];
    out[0] = prev;
    for (int t = 1; t < total; ++t) out[t] = prev = u[t] + d * prev;
    return;
  }
  for (int t = 0; t < std::min(r, total); ++t) {  // the start-up: lags before 0 are zero
    double v = u[t];
    for (int j = 0; j < r; ++j)
      if (t - 1 - j >= 0) v += delta[j] * out[t - 1 - j];
    out[t] = v;
  }
  for (int t = r; t < total; ++t) {
    double v = u[t];
    for (int j = 0; j < r; ++j) v += delta[j] * out[t - 1 - j];
    out[t] = v;
  }
}

// Expanded AR and MA polynomials of the noise part of the nonlinear vector.
void noise_polynomials(const NoiseOrder& ns, std::span<const double> noise, std::vector<double>& ar,
                       std::vector<double>& ma) {
  ar = expand_ar(noise.subspan(0, ns.p), noise.subspan(ns.p + ns.q, ns.seasonal_p), ns.period);
  ma = expand_ma(noise.subspan(ns.p, ns.q),
                 noise.subspan(ns.p + ns.q + ns.seasonal_p, ns.seasonal_q), ns.period);
}

// Fills ws.columns: column 0 the target, then the constant, one column per omega and one per
// start state. Returns the ARMA polynomials (expanded) through `ar`/`ma`.
void build_columns(const LikelihoodProblem& problem, std::span<const double> nonlinear,
                   LikelihoodWorkspace& ws, std::vector<double>& ar, std::vector<double>& ma) {
  const ModelSpec& spec = problem.spec;
  const int n = problem.n_rows();
  const int start = problem.start;
  const Eigen::Index cols = 1 + problem.n_linear();
  ws.columns.resize(n, cols);
  ws.filtered.resize(spec.inputs.size());
  // Where each regressor column reads: the filtered input shifted by its delay and lag, then
  // the start-state columns (already over the sample).
  ws.sources.clear();
  int states = 0;
  for (size_t i = 0; i < spec.inputs.size(); ++i) states += spec.start_states(i);
  ws.starts.resize(static_cast<size_t>(states));  // reused between evaluations: no allocation
  size_t k = 0, column = 0;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& order = spec.inputs[i].order;
    const auto delta = nonlinear.subspan(k, order.denominator);
    filter_denominator(problem.u[i], delta, ws.filtered[i]);
    for (int j = 0; j <= order.numerator; ++j)
      ws.sources.push_back(ws.filtered[i].data() + start - order.delay - j);
    // Start state j: the homogeneous solution that is 1 at sample row j, 0 at the other first r.
    for (int state = 0; state < spec.start_states(i); ++state, ++column) {
      ws.starts[column].resize(static_cast<size_t>(n));
      homogeneous_unit_solution(delta, state, ws.starts[column]);
    }
    k += order.denominator;
  }
  for (const auto& c : ws.starts) ws.sources.push_back(c.data());
  // Row by row: the row-major matrix is written contiguously.
  const int first = spec.constant ? 2 : 1;
  for (int t = 0; t < n; ++t) {
    double* row = ws.columns.data() + static_cast<Eigen::Index>(t) * cols;
    if (problem.is_missing(start + t)) {  // never read into the likelihood, but must be finite
      std::fill(row, row + cols, 0.0);
      continue;
    }
    row[0] = problem.w[start + t];
    if (spec.constant) row[1] = 1.0;
    for (size_t c = 0; c < ws.sources.size(); ++c) row[first + c] = ws.sources[c][t];
  }
  noise_polynomials(spec.noise, nonlinear.subspan(k), ar, ma);
}

// The missing flags of the likelihood sample (empty when nothing is missing).
std::span<const unsigned char> sample_missing(const LikelihoodProblem& problem) {
  if (problem.missing.empty()) return {};
  return std::span<const unsigned char>(problem.missing).subspan(problem.start);
}

double gaussian_loglik(int n, double ssr, double sum_log_f) {
  const double sigma2 = ssr / n;
  return -0.5 * (n * std::log(2.0 * std::numbers::pi * sigma2) + n + sum_log_f);
}

}  // namespace

ProfileValue profile_loglik(const LikelihoodProblem& problem, std::span<const double> nonlinear,
                            LikelihoodWorkspace& ws) {
  ProfileValue out;
  std::vector<double> ar, ma;
  build_columns(problem, nonlinear, ws, ar, ma);
  const auto summary =
      arma_filter(ar, ma, ws.columns, ws.filter, nullptr, nullptr, sample_missing(problem));
  if (!summary.ok) return out;
  const Eigen::Index k = ws.columns.cols() - 1;
  const int n = problem.n_obs();
  const Eigen::MatrixXd& m = summary.cross;
  double ssr = m(0, 0);
  double log_det_information = 0.0;  // log|X' Sigma^-1 X|, for the restricted objective
  if (k > 0) {
    out.linear_information = m.bottomRightCorner(k, k);
    // Equilibrated normal equations: each whitened regressor scaled to unit length, so the
    // pivots (and the collinearity test on them) do not depend on the units of the inputs.
    const Eigen::VectorXd norm = out.linear_information.diagonal().cwiseSqrt();
    if (!(norm.minCoeff() > 0.0) || !norm.allFinite()) return out;
    const Eigen::VectorXd inv = norm.cwiseInverse();
    const Eigen::MatrixXd a = inv.asDiagonal() * out.linear_information * inv.asDiagonal();
    Eigen::LDLT<Eigen::MatrixXd> ldlt(a);
    if (ldlt.info() != Eigen::Success || !ldlt.isPositive()) return out;
    const auto d = ldlt.vectorD();
    if (d.minCoeff() <= 1e-12 * d.maxCoeff()) return out;  // collinear regressors
    // |X' Sigma^-1 X| = |a| prod(norm)^2, and |a| the product of the LDLT pivots; only the
    // restricted objective reads it, so ML evaluations (the hot loop) skip the logarithms.
    if (problem.spec.estimation == Estimation::restricted)
      log_det_information = d.array().log().sum() + 2.0 * norm.array().log().sum();
    Eigen::VectorXd gamma = ldlt.solve(inv.cwiseProduct(m.col(0).tail(k)));
    ssr -= m.col(0).tail(k).dot(inv.cwiseProduct(gamma));
    // ssr = y'y - y'X beta cancels when the fit is close (a large constant, collinear trending
    // regressors): the standard errors take second differences of this log-likelihood at tiny
    // steps, so there the residuals are formed explicitly after one step of iterative
    // refinement, which keeps ssr and beta accurate to working precision at O(n k) extra work.
    if (m(0, 0) > 1e3 * ssr || d.minCoeff() < 1e-6 * d.maxCoeff()) {
      const Eigen::MatrixXd& z = ws.filter.scaled;  // whitened target, then regressors
      const auto x = z.rightCols(k);
      Eigen::VectorXd e = z.col(0) - x * inv.cwiseProduct(gamma);
      gamma += ldlt.solve(inv.cwiseProduct(x.transpose() * e));
      e = z.col(0) - x * inv.cwiseProduct(gamma);
      ssr = e.squaredNorm();
    }
    out.linear = inv.cwiseProduct(gamma);
  } else {
    out.linear.resize(0);
  }
  if (!(ssr > 0.0) || !std::isfinite(ssr)) return out;
  out.sigma2 = ssr / n;
  out.loglik = gaussian_loglik(n, ssr, summary.sum_log_f);
  out.objective = out.loglik;
  if (problem.spec.estimation == Estimation::restricted && k > 0) {
    if (n - k < 1) return out;
    out.objective = gaussian_loglik(static_cast<int>(n - k), ssr, summary.sum_log_f) -
                    0.5 * log_det_information;
  }
  out.ok = std::isfinite(out.loglik) && std::isfinite(out.objective);
  return out;
}

std::vector<double> model_noise(const LikelihoodProblem& problem, const ModelParams& p) {
  std::vector<double> noise(problem.w.begin(), problem.w.end());
  for (auto& v : noise) v -= p.constant;
  for (size_t i = 0; i < problem.spec.inputs.size(); ++i) {
    const auto x =
        transfer_output(problem.u[i], problem.spec.inputs[i].order, p.inputs[i], problem.start);
    for (size_t t = 0; t < noise.size(); ++t) noise[t] -= x[t];
  }
  return noise;
}

namespace {

// The model's noise over the likelihood sample through the ARMA filter at the parameters of `p`.
ArmaFilterSummary filter_noise(const LikelihoodProblem& problem, const ModelParams& p,
                               LikelihoodWorkspace& ws, std::vector<double>* innovations) {
  const auto noise = model_noise(problem, p);
  RowMatrix col(problem.n_rows(), 1);
  for (int t = 0; t < problem.n_rows(); ++t)
    col(t, 0) = problem.is_missing(problem.start + t) ? 0.0 : noise[problem.start + t];
  const auto ar = expand_ar(p.phi, p.seasonal_phi, problem.spec.noise.period);
  const auto ma = expand_ma(p.theta, p.seasonal_theta, problem.spec.noise.period);
  auto summary = arma_filter(ar, ma, col, ws.filter, innovations, nullptr, sample_missing(problem));
  if (innovations && !problem.missing.empty()) {  // observed innovations only
    size_t k = 0;
    for (int t = 0; t < problem.n_rows(); ++t)
      if (!problem.is_missing(problem.start + t)) (*innovations)[k++] = (*innovations)[t];
    innovations->resize(k);
  }
  return summary;
}

}  // namespace

double loglik_at(const LikelihoodProblem& problem, const ModelParams& p, LikelihoodWorkspace& ws,
                 double* sigma2_out) {
  const auto summary = filter_noise(problem, p, ws, nullptr);
  if (!summary.ok) return -std::numeric_limits<double>::infinity();
  const double ssr = summary.cross(0, 0);
  if (sigma2_out) *sigma2_out = ssr / problem.n_obs();
  return gaussian_loglik(problem.n_obs(), ssr, summary.sum_log_f);
}

std::vector<double> model_residuals(const LikelihoodProblem& problem, const ModelParams& p,
                                    LikelihoodWorkspace& ws) {
  std::vector<double> innovations;
  filter_noise(problem, p, ws, &innovations);
  return innovations;
}

}  // namespace lagsieve
