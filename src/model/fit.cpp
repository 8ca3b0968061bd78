#include "model/fit.h"
#include "model/collinearity.h"

#include <fmt/format.h>
#include <Eigen/Dense>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <nlopt.hpp>

#include "core/error.h"
#include "evaluation/distributions.h"
#include "model/polynomial.h"
#include "screen/correlation.h"

namespace lagsieve {

std::string_view to_string(FitStatus s) {
  switch (s) {
    case FitStatus::ok:
      return "ok";
    case FitStatus::no_convergence:
      return "no_convergence";
    case FitStatus::boundary:
      return "boundary";
    case FitStatus::numerical_failure:
      return "numerical_failure";
    case FitStatus::rejected:
      return "rejected";
  }
  return "unknown";
}

double aic(double loglik, int k) { return -2.0 * loglik + 2.0 * k; }
double aicc(double loglik, int k, int n) {
  return n - k - 1 > 0 ? aic(loglik, k) + 2.0 * k * (k + 1) / (n - k - 1)
                       : std::numeric_limits<double>::infinity();
}
double bic(double loglik, int k, int n) { return -2.0 * loglik + k * std::log(double(n)); }

namespace {

// One polynomial's slice of the nonlinear vector and its sign convention: -1 for
// 1 - sum a_j B^j (delta, AR), +1 for 1 + sum a_j B^j (MA).
struct Block {
  int offset = 0;
  int size = 0;
  double sign = -1.0;
};

std::vector<Block> blocks_of(const ModelSpec& spec) {
  std::vector<Block> blocks;
  int offset = 0;
  auto add = [&](int size, double sign) {
    if (size > 0) blocks.push_back({offset, size, sign});
    offset += size;
  };
  for (const auto& term : spec.inputs) add(term.order.denominator, -1.0);
  add(spec.noise.p, -1.0);
  add(spec.noise.q, +1.0);
  add(spec.noise.seasonal_p, -1.0);
  add(spec.noise.seasonal_q, +1.0);
  return blocks;
}

void to_natural(const std::vector<Block>& blocks, std::span<const double> z,
                std::span<double> natural) {
  for (const auto& b : blocks) {
    auto out = natural.subspan(b.offset, b.size);
    pacf_to_coefficients(z.subspan(b.offset, b.size), out);
    if (b.sign > 0)
      for (auto& v : out) v = -v;
  }
}

bool to_unconstrained(const std::vector<Block>& blocks, std::span<const double> natural,
                      std::span<double> z) {
  std::vector<double> coef;
  for (const auto& b : blocks) {
    coef.assign(natural.begin() + b.offset, natural.begin() + b.offset + b.size);
    if (b.sign > 0)
      for (auto& v : coef) v = -v;
    if (!coefficients_to_pacf(coef, z.subspan(b.offset, b.size))) return false;
  }
  return true;
}

constexpr double kBound = 7.0;  // |z| <= 7 keeps |partial autocorrelation| <= 0.999998

struct Objective {
  const LikelihoodProblem* problem;
  const std::vector<Block>* blocks;
  LikelihoodWorkspace* ws;
  std::vector<double> natural;
  int evaluations = 0;
  double best = -std::numeric_limits<double>::infinity();
  std::vector<double> best_z;
};

double objective(unsigned n, const double* z, double* /*grad*/, void* data) {
  auto* obj = static_cast<Objective*>(data);
  ++obj->evaluations;
  to_natural(*obj->blocks, std::span<const double>(z, n), obj->natural);
  const auto value = profile_loglik(*obj->problem, obj->natural, *obj->ws);
  if (!value.ok) return 1e12;
  if (value.loglik > obj->best) {
    obj->best = value.loglik;
    obj->best_z.assign(z, z + n);
  }
  return -value.loglik;
}

struct OptimiserRun {
  std::vector<double> z;
  double loglik = -std::numeric_limits<double>::infinity();
  int evaluations = 0;
  nlopt::result code = nlopt::FAILURE;
};

OptimiserRun optimise(const LikelihoodProblem& problem, const std::vector<Block>& blocks,
                      std::vector<double> z0, const FitOptions& options, LikelihoodWorkspace& ws) {
  const auto dim = static_cast<unsigned>(z0.size());
  Objective obj{
      &problem, &blocks, &ws, std::vector<double>(dim), 0, -std::numeric_limits<double>::infinity(),
      z0};
  for (auto& v : z0) v = std::clamp(v, -kBound + 1e-9, kBound - 1e-9);
  nlopt::opt opt(nlopt::LN_BOBYQA, dim);
  opt.set_lower_bounds(std::vector<double>(dim, -kBound));
  opt.set_upper_bounds(std::vector<double>(dim, kBound));
  opt.set_min_objective(objective, &obj);
  opt.set_ftol_rel(options.relative_tolerance);
  opt.set_xtol_rel(1e-8);
  opt.set_maxeval(options.max_evaluations > 0 ? options.max_evaluations : 300 + 150 * int(dim));
  opt.set_initial_step(std::vector<double>(dim, 0.15));
  OptimiserRun run;
  double value = 0.0;
  std::vector<double> z = z0;
  try {
    run.code = opt.optimize(z, value);
  } catch (const nlopt::roundoff_limited&) {
    run.code = nlopt::ROUNDOFF_LIMITED;
  } catch (const std::exception&) {
    run.code = nlopt::FAILURE;
  }
  run.z = obj.best_z;
  run.loglik = obj.best;
  run.evaluations = obj.evaluations;
  return run;
}

double max_abs_pacf(std::span<const double> z) {
  double m = 0.0;
  for (double v : z) m = std::max(m, std::abs(std::tanh(v)));
  return m;
}

// Covariance of every estimate from the profile log-likelihood, without a Hessian over the
// linear parameters. With H the negative Hessian of the full log-likelihood, split into the
// nonlinear (theta) and linear (beta) blocks, the inverse of the negative profile Hessian S is
// exactly the theta block of H^-1; the linear estimates beta(theta) are the GLS solution, so
// with J = d beta / d theta the other blocks are J S^-1 and C^-1 + J S^-1 J', where
// C^-1 = sigma^2 (X' Sigma^-1 X)^-1 is the GLS covariance at fixed theta. S costs
// 1 + 2d + d(d - 1)/2 profile evaluations for d nonlinear parameters (central differences on
// the diagonal, a one-sided cross difference off it) and J comes free from the diagonal steps,
// against 1 + 2D + 2D(D - 1) for a central Hessian over all D = d + linear parameters.
// Returns false when a step leaves the admissible region or the curvature is not definite.
bool profile_covariance(const LikelihoodProblem& problem, std::span<const double> theta0,
                        const ProfileValue& at_optimum, LikelihoodWorkspace& ws,
                        Eigen::MatrixXd& covariance) {
  const int d = static_cast<int>(theta0.size());
  const auto k = at_optimum.linear.size();
  Eigen::LDLT<Eigen::MatrixXd> gls(at_optimum.linear_information);
  const Eigen::MatrixXd c_inv =
      k > 0 ? Eigen::MatrixXd(at_optimum.sigma2 * gls.solve(Eigen::MatrixXd::Identity(k, k)))
            : Eigen::MatrixXd(0, 0);
  if (d == 0) {
    covariance = c_inv;
    return c_inv.allFinite();
  }
  std::vector<double> x(theta0.begin(), theta0.end());
  bool ok = true;
  auto eval = [&]() {
    auto v = profile_loglik(problem, x, ws);
    ok = ok && v.ok;
    return v;
  };
  std::vector<double> h(d), f_plus(d);
  for (int i = 0; i < d; ++i) h[i] = 1e-4 * std::max(std::abs(theta0[i]), 0.05);
  const double f0 = at_optimum.loglik;
  Eigen::MatrixXd s(d, d);
  Eigen::MatrixXd jac(k, d);
  for (int i = 0; i < d; ++i) {
    x[i] = theta0[i] + h[i];
    const auto plus = eval();
    x[i] = theta0[i] - h[i];
    const auto minus = eval();
    x[i] = theta0[i];
    if (!ok) return false;
    f_plus[i] = plus.loglik;
    s(i, i) = -(plus.loglik - 2.0 * f0 + minus.loglik) / (h[i] * h[i]);
    if (k > 0) jac.col(i) = (plus.linear - minus.linear) / (2.0 * h[i]);
  }
  for (int i = 0; i < d; ++i)
    for (int j = 0; j < i; ++j) {
      x[i] = theta0[i] + h[i];
      x[j] = theta0[j] + h[j];
      const double f_ij = eval().loglik;
      x[i] = theta0[i];
      x[j] = theta0[j];
      if (!ok) return false;
      s(i, j) = s(j, i) = -(f_ij - f_plus[i] - f_plus[j] + f0) / (h[i] * h[j]);
    }
  Eigen::LDLT<Eigen::MatrixXd> ldlt(s);
  if (!s.allFinite() || ldlt.info() != Eigen::Success || !ldlt.isPositive() ||
      ldlt.vectorD().minCoeff() <= 0.0)
    return false;
  const Eigen::MatrixXd s_inv = ldlt.solve(Eigen::MatrixXd::Identity(d, d));
  covariance.resize(d + k, d + k);
  covariance.topLeftCorner(d, d) = s_inv;
  if (k > 0) {
    const Eigen::MatrixXd cross = jac * s_inv;
    covariance.bottomLeftCorner(k, d) = cross;
    covariance.topRightCorner(d, k) = cross.transpose();
    covariance.bottomRightCorner(k, k) = c_inv + cross * jac.transpose();
  }
  return covariance.allFinite();
}

void add_roots(FitDiagnostics& diag, const std::string& name, std::span<const double> a,
               double sign) {
  if (a.empty()) return;
  PolynomialRoots r;
  r.polynomial = name;
  r.roots = polynomial_roots(a, sign);
  r.min_modulus = min_root_modulus(a, sign);
  diag.roots.push_back(std::move(r));
}

// Two polynomials sharing a root (within `tol`) cancel: the model is over-parameterised.
bool near_common_root(std::span<const double> a, double sign_a, std::span<const double> b,
                      double sign_b, double tol, double* distance) {
  const auto ra = polynomial_roots(a, sign_a);
  const auto rb = polynomial_roots(b, sign_b);
  double best = std::numeric_limits<double>::infinity();
  for (const auto& x : ra)
    for (const auto& y : rb) best = std::min(best, std::abs(x - y));
  *distance = best;
  return best < tol;
}

void compute_diagnostics(const LikelihoodProblem& problem, const FitOptions& options,
                         FitResult& fit, LikelihoodWorkspace& ws) {
  const ModelSpec& spec = problem.spec;
  const ModelParams& p = fit.params;
  FitDiagnostics& diag = fit.diagnostics;
  fit.residuals = model_residuals(problem, p, ws);

  // Residual autocorrelation, once: the report's lags 1..min(24, n/4) and Ljung-Box at a few
  // lags, degrees of freedom reduced by the ARMA parameter count.
  const int n = static_cast<int>(fit.residuals.size());
  const int arma = spec.noise.p + spec.noise.q + spec.noise.seasonal_p + spec.noise.seasonal_q;
  std::vector<int> lags{6, 12, 24};
  if (spec.noise.period > 1) lags = {spec.noise.period, 2 * spec.noise.period};
  std::erase_if(lags, [&](int lag) { return lag >= n / 2 || lag - arma <= 0; });
  const int shown = n > 8 ? std::min(24, n / 4) : 0;
  const int max_lag = std::max(shown, lags.empty() ? 0 : lags.back());
  std::vector<double> r;
  if (max_lag > 0) {
    try {
      r = acf(fit.residuals, max_lag);
    } catch (const NumericalError&) {
      r.clear();  // constant residuals: no autocorrelation to report
    }
  }
  if (static_cast<int>(r.size()) > max_lag) {
    diag.residual_acf.assign(r.begin() + 1, r.begin() + 1 + shown);
    diag.residual_acf_band = 2.0 / std::sqrt(double(n));
    for (int lag : lags) {
      double q = 0.0;
      for (int k = 1; k <= lag; ++k) q += r[k] * r[k] / (n - k);
      q *= n * (n + 2.0);
      diag.ljung_box.push_back({lag, lag - arma, q, chi_square_upper_tail(q, lag - arma)});
    }
  }

  // Roots and steady-state gains.
  const int nn = problem.n_nonlinear();
  const int lin_offset = nn;
  int delta_offset = 0;
  int omega_offset = lin_offset + (spec.constant ? 1 : 0);
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& name = spec.inputs[i].name;
    const auto& ip = p.inputs[i];
    add_roots(diag, name + ".delta", ip.delta, -1.0);
    double sum_omega = 0.0, sum_delta = 0.0;
    for (double o : ip.omega) sum_omega += o;
    for (double dl : ip.delta) sum_delta += dl;
    InputGain g{name, sum_omega / (1.0 - sum_delta), std::numeric_limits<double>::quiet_NaN()};
    if (fit.covariance.rows() > 0) {
      Eigen::VectorXd grad = Eigen::VectorXd::Zero(fit.covariance.rows());
      for (size_t j = 0; j < ip.omega.size(); ++j) grad(omega_offset + j) = 1.0 / (1.0 - sum_delta);
      for (size_t j = 0; j < ip.delta.size(); ++j)
        grad(delta_offset + j) = sum_omega / ((1.0 - sum_delta) * (1.0 - sum_delta));
      const double var = grad.dot(fit.covariance * grad);
      if (var >= 0.0) g.std_error = std::sqrt(var);
    }
    diag.gains.push_back(g);
    if (!ip.delta.empty() && ip.omega.size() > 1) {
      // omega(B) = omega_0 (1 + sum (omega_j/omega_0) B^j); compare its roots with delta's.
      std::vector<double> scaled;
      for (size_t j = 1; j < ip.omega.size(); ++j) scaled.push_back(ip.omega[j] / ip.omega[0]);
      double dist = 0.0;
      if (ip.omega[0] != 0.0 && near_common_root(ip.delta, -1.0, scaled, 1.0, 0.1, &dist))
        diag.warnings.push_back(fmt::format(
            "near_cancellation: {} numerator and denominator share a root (distance {:.3g}); a "
            "lower order fits the same",
            name, dist));
    }
    delta_offset += static_cast<int>(ip.delta.size());
    omega_offset += static_cast<int>(ip.omega.size());
  }

  // Residuals against each prewhitened input over the likelihood sample (rows start..N-1 of the
  // differenced input pair with the residuals row by row).
  for (size_t i = 0; options.residual_input_check && i < spec.inputs.size(); ++i) {
    const auto& term = spec.inputs[i];
    const std::span<const double> u(problem.u[i]);
    auto check = residual_input_correlation(term.name, fit.residuals, u.subspan(problem.start),
                                            term.order.numerator + term.order.denominator + 1);
    if (!check) continue;
    if (check->p_value < ResidualInputOptions{}.warn_level)
      diag.warnings.push_back(fmt::format(
          "residual_input_correlation: residuals still correlate with prewhitened {} (S = {:.1f}, "
          "df {}, p = {:.2g}; largest at lag {}: {:.2f}, band {:.2f}); its transfer function "
          "misses a lag or has the wrong delay",
          term.name, check->statistic, check->df, check->p_value, check->largest_lag,
          check->values[check->largest_lag + check->max_lag], check->band));
    diag.residual_input.push_back(std::move(*check));
  }

  add_roots(diag, "ar", p.phi, -1.0);
  add_roots(diag, "ma", p.theta, +1.0);
  add_roots(diag, "seasonal_ar", p.seasonal_phi, -1.0);
  add_roots(diag, "seasonal_ma", p.seasonal_theta, +1.0);
  double dist = 0.0;
  if (!p.phi.empty() && !p.theta.empty() && near_common_root(p.phi, -1.0, p.theta, 1.0, 0.1, &dist))
    diag.warnings.push_back(fmt::format(
        "near_cancellation: AR and MA share a root (distance {:.3g}); a lower order fits the same",
        dist));
}

}  // namespace

FitResult fit_model(const LikelihoodProblem& problem, const FitOptions& options) {
  const auto t0 = std::chrono::steady_clock::now();
  FitResult fit;
  fit.spec = problem.spec;
  fit.n_obs = problem.n_obs();
  fit.n_params = problem.n_params();
  fit.start = problem.start;
  LikelihoodWorkspace ws;
  const auto blocks = blocks_of(problem.spec);
  const int dim = problem.n_nonlinear();

  std::vector<double> natural(dim, 0.0);
  nlopt::result code = nlopt::SUCCESS;
  bool boundary = false;
  if (dim > 0) {
    std::vector<double> start = options.warm_start
                                    ? pack_nonlinear(problem.spec, *options.warm_start)
                                    : start_values(problem);
    std::vector<double> z0(dim, 0.0);
    if (!to_unconstrained(blocks, start, z0)) std::fill(z0.begin(), z0.end(), 0.0);
    auto run = optimise(problem, blocks, z0, options, ws);
    fit.starts = 1;
    fit.evaluations = run.evaluations;
    // Restart rule: a fit ending on the boundary or failing gets a second start from the
    // neutral point (every partial autocorrelation zero), and the better optimum is kept.
    const bool at_boundary = !run.z.empty() && max_abs_pacf(run.z) > options.boundary_pacf;
    const bool failed = run.z.empty() || !std::isfinite(run.loglik) || run.code < 0;
    const bool neutral_start = std::all_of(z0.begin(), z0.end(), [](double v) { return v == 0.0; });
    if ((at_boundary || failed) && !neutral_start) {
      auto second = optimise(problem, blocks, std::vector<double>(dim, 0.0), options, ws);
      fit.starts = 2;
      fit.evaluations += second.evaluations;
      if (second.loglik > run.loglik) run = std::move(second);
    }
    if (run.z.empty() || !std::isfinite(run.loglik)) {
      fit.status = FitStatus::numerical_failure;
      fit.message = "the likelihood could not be evaluated at any point tried";
      if (auto why = collinear_inputs(problem, kNearCollinearTolerance); !why.empty())
        fit.message += "; " + why;
      fit.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
      return fit;
    }
    to_natural(blocks, run.z, natural);
    code = run.code;
    boundary = max_abs_pacf(run.z) > options.boundary_pacf;
  } else {
    fit.evaluations = 1;
  }

  const auto value = profile_loglik(problem, natural, ws);
  if (!value.ok) {
    fit.status = FitStatus::numerical_failure;
    fit.message = "the GLS step failed: regressors are collinear or the noise variance is zero";
    if (auto why = collinear_inputs(problem, kNearCollinearTolerance); !why.empty())
      fit.message += "; " + why;
    fit.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    return fit;
  }
  fit.loglik = value.loglik;
  fit.sigma2 = value.sigma2;
  std::vector<double> linear(value.linear.data(), value.linear.data() + value.linear.size());
  fit.params = unpack(problem.spec, natural, linear, value.sigma2);
  fit.aic = aic(fit.loglik, fit.n_params);
  fit.aicc = aicc(fit.loglik, fit.n_params, fit.n_obs);
  fit.bic = bic(fit.loglik, fit.n_params, fit.n_obs);

  if (boundary) {
    fit.status = FitStatus::boundary;
    fit.message = fmt::format(
        "the optimum lies on the edge of the admissible region (a partial autocorrelation "
        "beyond {}): a unit root or a non-invertible MA; the estimate is usable with care",
        options.boundary_pacf);
  } else if (code == nlopt::MAXEVAL_REACHED || code == nlopt::MAXTIME_REACHED) {
    fit.status = FitStatus::no_convergence;
    fit.message = fmt::format(
        "the optimiser stopped at its budget of {} evaluations before "
        "converging; the best point found is reported",
        fit.evaluations);
  } else {
    fit.status = FitStatus::ok;
    fit.message = dim > 0 ? fmt::format("converged after {} likelihood evaluations ({} start{})",
                                        fit.evaluations, fit.starts, fit.starts > 1 ? "s" : "")
                          : "closed form: no nonlinear parameters";
  }

  // Estimates, covariance from the curvature of the profile log-likelihood.
  const auto nl_names = nonlinear_names(problem.spec);
  const auto l_names = linear_names(problem.spec);
  std::vector<double> all(natural);
  all.insert(all.end(), linear.begin(), linear.end());
  fit.covariance.resize(0, 0);
  std::vector<double> se(all.size(), std::numeric_limits<double>::quiet_NaN());
  if (options.standard_errors && !all.empty()) {
    if (profile_covariance(problem, natural, value, ws, fit.covariance)) {
      for (size_t i = 0; i < all.size(); ++i) se[i] = std::sqrt(fit.covariance(i, i));
    } else {
      fit.covariance.resize(0, 0);
      fit.diagnostics.warnings.emplace_back(
          "hessian_not_definite: the log-likelihood is flat or not concave at the optimum; "
          "standard errors are not available");
    }
  }
  for (size_t i = 0; i < all.size(); ++i)
    fit.estimates.push_back(
        {i < nl_names.size() ? nl_names[i] : l_names[i - nl_names.size()], all[i], se[i]});
  if (options.diagnostics) compute_diagnostics(problem, options, fit, ws);
  fit.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return fit;
}

}  // namespace lagsieve
