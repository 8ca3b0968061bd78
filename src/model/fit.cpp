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

// A start that ends this far (log-likelihood units) below the best ended at another optimum;
// smaller gaps are the coarse tolerance of the extra starts.
constexpr double kDistinctOptimum = 1e-2;

constexpr double kBound = 7.0;  // |z| <= 7 keeps |partial autocorrelation| <= 0.999998

// An extra start has entered the basin of the best optimum found so far when its point lies
// within kBasinRadius of it in every unconstrained coordinate (a partial autocorrelation moves
// by at most 0.1 there) with a log-likelihood at most kBasinGap below: two distinct optima that
// close would differ by less than the optimiser's coarse tolerance can tell. It stops there.
constexpr double kBasinRadius = 0.1;
constexpr double kBasinGap = 0.1;
// An extra start first runs a probe of kProbePerParameter * d + 1 evaluations (BOBYQA's 2d + 1
// interpolation points and d steps); one still more than kProbeMargin below the best is
// abandoned. On the 108-candidate reference grid every better optimum found by an extra start
// was within 1 of the best after its probe.
constexpr int kProbePerParameter = 3;
constexpr double kProbeMargin = 3.0;

struct Objective {
  const LikelihoodProblem* problem;
  const std::vector<Block>* blocks;
  LikelihoodWorkspace* ws;
  std::vector<double> natural;
  int evaluations = 0;
  double best = -std::numeric_limits<double>::infinity();
  std::vector<double> best_z;
  // An extra start stops once it enters the neighbourhood of the best optimum found so far
  // (`basin_z`, log-likelihood `basin_loglik`): from there it can only climb to the same point.
  const std::vector<double>* basin_z = nullptr;
  double basin_loglik = 0.0;
  bool reached_basin = false;
};

double objective(unsigned n, const double* z, double* /*grad*/, void* data) {
  auto* obj = static_cast<Objective*>(data);
  ++obj->evaluations;
  to_natural(*obj->blocks, std::span<const double>(z, n), obj->natural);
  const auto value = profile_loglik(*obj->problem, obj->natural, *obj->ws);
  if (!value.ok) return 1e12;
  if (value.objective > obj->best) {
    obj->best = value.objective;
    obj->best_z.assign(z, z + n);
  }
  if (obj->basin_z && value.objective >= obj->basin_loglik - kBasinGap) {
    double distance = 0.0;
    for (unsigned i = 0; i < n; ++i)
      distance = std::max(distance, std::abs(z[i] - (*obj->basin_z)[i]));
    if (distance <= kBasinRadius) {
      obj->reached_basin = true;
      throw nlopt::forced_stop();
    }
  }
  return -value.objective;
}

struct OptimiserRun {
  std::vector<double> z;
  double loglik = -std::numeric_limits<double>::infinity();
  int evaluations = 0;
  nlopt::result code = nlopt::FAILURE;
  bool same_basin = false;  // stopped on entering the neighbourhood of a known optimum
  bool abandoned = false;   // stopped after its probe budget, still far below the best
};

// Evaluations one optimiser run may spend (FitOptions::max_evaluations, 0 = by dimension).
int evaluation_budget(const FitOptions& options, int dim) {
  return options.max_evaluations > 0 ? options.max_evaluations : 300 + 150 * dim;
}

OptimiserRun optimise(const LikelihoodProblem& problem, const std::vector<Block>& blocks,
                      std::vector<double> z0, const FitOptions& options, LikelihoodWorkspace& ws,
                      const OptimiserRun* basin = nullptr) {
  const auto dim = static_cast<unsigned>(z0.size());
  Objective obj{
      &problem, &blocks, &ws, std::vector<double>(dim), 0, -std::numeric_limits<double>::infinity(),
      z0};
  if (basin && !basin->z.empty() && std::isfinite(basin->loglik)) {
    obj.basin_z = &basin->z;
    obj.basin_loglik = basin->loglik;
  }
  for (auto& v : z0) v = std::clamp(v, -kBound + 1e-9, kBound - 1e-9);
  nlopt::opt opt(nlopt::LN_BOBYQA, dim);
  opt.set_lower_bounds(std::vector<double>(dim, -kBound));
  opt.set_upper_bounds(std::vector<double>(dim, kBound));
  opt.set_min_objective(objective, &obj);
  opt.set_ftol_rel(options.relative_tolerance);
  opt.set_xtol_rel(1e-8);
  opt.set_maxeval(evaluation_budget(options, static_cast<int>(dim)));
  opt.set_initial_step(std::vector<double>(dim, 0.15));
  OptimiserRun run;
  double value = 0.0;
  std::vector<double> z = z0;
  try {
    run.code = opt.optimize(z, value);
  } catch (const nlopt::roundoff_limited&) {
    run.code = nlopt::ROUNDOFF_LIMITED;
  } catch (const nlopt::forced_stop&) {
    run.code = nlopt::FORCED_STOP;
  } catch (const std::exception&) {
    run.code = nlopt::FAILURE;
  }
  run.z = obj.best_z;
  run.loglik = obj.best;
  run.evaluations = obj.evaluations;
  run.same_basin = obj.reached_basin;
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
// C^-1 = sigma^2 (X' Sigma^-1 X)^-1 is the GLS covariance at fixed theta.
//
// Steps: a pilot pass measures each diagonal curvature at a small step, then every step is set
// to kStepInSe of that parameter's conditional standard error 1 / sqrt(S_ii), so each second
// difference moves the log-likelihood by about kStepInSe^2 / 2 whatever the scale of the data
// (a fixed step in the coordinates is either lost in rounding where the curvature is small or
// too coarse where it is large). Diagonal and J are central differences; a cross term uses the
// points (+i, +j) and (-i, -j) with the diagonal ones, also O(h^2):
//   S_ij = -[f(+i+j) + f(-i-j) - f(+i) - f(-i) - f(+j) - f(-j) + 2 f0] / (2 h_i h_j).
// Cost: 1 + 4d + d(d - 1) profile evaluations for d nonlinear parameters, against
// 1 + 2D + 2D(D - 1) for a central Hessian over all D = d + linear parameters. A step that
// leaves the admissible region is halved (up to 20 times). Returns false when the curvature is
// not definite or a point cannot be evaluated.
constexpr double kStepInSe = 0.03;

//
// `newton_step` (if non-null) receives S^-1 g, g the central-difference gradient from the same
// points: the step to the maximum of the quadratic, which the caller uses to polish an optimum
// that the optimiser left a little short.
bool profile_covariance(const LikelihoodProblem& problem, std::span<const double> theta0,
                        const ProfileValue& at_optimum, LikelihoodWorkspace& ws,
                        Eigen::MatrixXd& covariance, Eigen::VectorXd* newton_step = nullptr,
                        Eigen::VectorXd* steps = nullptr,
                        const Eigen::VectorXd* given_steps = nullptr) {
  const int d = static_cast<int>(theta0.size());
  const auto k = at_optimum.linear.size();
  Eigen::LDLT<Eigen::MatrixXd> gls(at_optimum.linear_information);
  // The restricted objective estimates sigma^2 by ssr / (n - k), and so its GLS covariance.
  const double n = problem.n_obs();
  const double sigma2 =
      problem.spec.estimation == Estimation::restricted && n > static_cast<double>(k)
          ? at_optimum.sigma2 * n / (n - static_cast<double>(k))
          : at_optimum.sigma2;
  const Eigen::MatrixXd c_inv =
      k > 0 ? Eigen::MatrixXd(sigma2 * gls.solve(Eigen::MatrixXd::Identity(k, k)))
            : Eigen::MatrixXd(0, 0);
  if (d == 0) {
    covariance = c_inv;
    return c_inv.allFinite();
  }
  std::vector<double> x(theta0.begin(), theta0.end());
  const double f0 = at_optimum.objective;
  // The profile at theta0 + a e_i + b e_j (j < 0: none).
  auto at = [&](int i, double a, int j, double b) {
    x[i] = theta0[i] + a;
    if (j >= 0) x[j] = theta0[j] + b;
    auto v = profile_loglik(problem, x, ws);
    x[i] = theta0[i];
    if (j >= 0) x[j] = theta0[j];
    return v;
  };
  // Central second difference along i at step h (halved until both points are admissible).
  struct Diagonal {
    ProfileValue plus, minus;
    double h = 0.0;
    bool ok = false;
  };
  auto diagonal = [&](int i, double h) {
    Diagonal out;
    for (int tries = 0; tries < 20 && !out.ok; ++tries, h *= 0.5) {
      out.plus = at(i, h, -1, 0.0);
      out.minus = at(i, -h, -1, 0.0);
      out.h = h;
      out.ok = out.plus.ok && out.minus.ok;
    }
    return out;
  };
  std::vector<Diagonal> diag(d);
  Eigen::MatrixXd s(d, d);
  Eigen::MatrixXd jac(k, d);
  Eigen::VectorXd gradient(d);
  for (int i = 0; i < d; ++i) {
    double h = 0.0;
    if (given_steps) {  // a second pass next to the first: its steps fit here too
      h = (*given_steps)(i);
    } else {
      auto pilot = diagonal(i, 1e-4 * std::max(std::abs(theta0[i]), 0.05));
      if (!pilot.ok) return false;
      const double curvature =
          -(pilot.plus.objective - 2.0 * f0 + pilot.minus.objective) / (pilot.h * pilot.h);
      h = curvature > 0.0 && std::isfinite(curvature)
              ? std::min(kStepInSe / std::sqrt(curvature), 0.1)
              : pilot.h;
    }
    diag[i] = diagonal(i, h);
    if (!diag[i].ok) return false;
    const double hi = diag[i].h;
    s(i, i) = -(diag[i].plus.objective - 2.0 * f0 + diag[i].minus.objective) / (hi * hi);
    gradient(i) = (diag[i].plus.objective - diag[i].minus.objective) / (2.0 * hi);
    if (k > 0) jac.col(i) = (diag[i].plus.linear - diag[i].minus.linear) / (2.0 * hi);
  }
  for (int i = 0; i < d; ++i)
    for (int j = 0; j < i; ++j) {
      const double hi = diag[i].h, hj = diag[j].h;
      const auto pp = at(i, hi, j, hj);
      const auto mm = at(i, -hi, j, -hj);
      if (!pp.ok || !mm.ok) return false;
      s(i, j) = s(j, i) =
          -(pp.objective + mm.objective - diag[i].plus.objective - diag[i].minus.objective -
            diag[j].plus.objective - diag[j].minus.objective + 2.0 * f0) /
          (2.0 * hi * hj);
    }
  Eigen::LDLT<Eigen::MatrixXd> ldlt(s);
  if (!s.allFinite() || ldlt.info() != Eigen::Success || !ldlt.isPositive() ||
      ldlt.vectorD().minCoeff() <= 0.0)
    return false;
  const Eigen::MatrixXd s_inv = ldlt.solve(Eigen::MatrixXd::Identity(d, d));
  if (newton_step) *newton_step = s_inv * gradient;
  if (steps) {
    steps->resize(d);
    for (int i = 0; i < d; ++i) (*steps)(i) = diag[i].h;
  }
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
        diag.warnings.push_back({"near_cancellation",
                                 fmt::format("near_cancellation: {} numerator and denominator "
                                             "share a root (distance {:.3g}); a lower order fits "
                                             "the same",
                                             name, dist),
                                 {{"distance", dist}},
                                 {{"input", name}}});
    }
    delta_offset += static_cast<int>(ip.delta.size());
    omega_offset += static_cast<int>(ip.omega.size());
  }

  // Residuals against each input (prewhitened unless an event or an indicator column) over the
  // likelihood sample (rows start..N-1 of the differenced input pair with the residuals row by row).
  for (size_t i = 0; options.residual_input_check && i < spec.inputs.size(); ++i) {
    const auto& term = spec.inputs[i];
    // At observed rows only, as the residuals are (missing rows joined: approximate there).
    std::vector<double> u;
    for (int t = problem.start; t < static_cast<int>(problem.u[i].size()); ++t)
      if (!problem.is_missing(t)) u.push_back(problem.u[i][t]);
    const InputKind kind = i < problem.input_kinds.size() ? problem.input_kinds[i] : InputKind{};
    auto check = residual_input_correlation(
        term.name, fit.residuals, u, term.order.numerator + term.order.denominator + 1, kind);
    if (!check) continue;
    if (check->p_value < ResidualInputOptions{}.warn_level)
      diag.warnings.push_back(residual_input_warning(*check));
    diag.residual_input.push_back(std::move(*check));
  }

  add_roots(diag, "phi", p.phi, -1.0);
  add_roots(diag, "theta", p.theta, +1.0);
  add_roots(diag, "Phi", p.seasonal_phi, -1.0);  // names as in spec.h
  add_roots(diag, "Theta", p.seasonal_theta, +1.0);
  double dist = 0.0;
  if (!p.phi.empty() && !p.theta.empty() && near_common_root(p.phi, -1.0, p.theta, 1.0, 0.1, &dist))
    diag.warnings.push_back(
        {"near_cancellation",
         fmt::format("near_cancellation: AR and MA share a root (distance {:.3g}); a lower order "
                     "fits the same",
                     dist),
         {{"distance", dist}},
         {{"polynomials", "ar_ma"}}});
}

std::string starts_note(const FitResult& fit) {
  if (fit.starts <= 1) return "1 start";
  const std::string stopped =
      fit.abandoned_starts == 0
          ? std::string()
          : fmt::format("; {} stopped after a short probe, far below the best",
                        fit.abandoned_starts);
  if (fit.lower_optima == 0)
    return fmt::format("{} starts, all {}reaching the same optimum{}", fit.starts,
                       fit.abandoned_starts == 0 ? "" : "others ", stopped);
  return fmt::format("{} starts that disagreed: {} ended at a lower optimum{}; the best is kept",
                     fit.starts, fit.lower_optima, stopped);
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
    const bool neutral_start = std::all_of(z0.begin(), z0.end(), [](double v) { return v == 0.0; });
    std::vector<double> other_optima;  // log-likelihoods reached from the other starts
    // Extra starts run at a coarse tolerance and budget (most end in the basin already found,
    // and the last digits are where an optimiser spends its evaluations); one that ends above
    // the best so far is then polished at the full tolerance from where it stopped. Their budget
    // is a third of a full start's (100 + 50 per parameter by default), so a smaller
    // max_evaluations caps them too. Each first runs a short probe: one still far below the
    // best after it is abandoned, and any extra start stops as soon as it enters the best
    // optimum's neighbourhood (kBasinRadius), which confirms that optimum instead of finding
    // it again to the last digit.
    FitOptions coarse = options;
    coarse.relative_tolerance = std::max(options.relative_tolerance, 1e-6);
    coarse.max_evaluations = std::max(1, evaluation_budget(options, dim) / 3);
    const int probe_budget = kProbePerParameter * dim + 1;
    auto explore = [&](const std::vector<double>& z_start) {
      OptimiserRun trial;
      if (probe_budget < coarse.max_evaluations) {
        FitOptions probe = coarse;
        probe.max_evaluations = probe_budget;
        trial = optimise(problem, blocks, z_start, probe, ws, &run);
        if (!trial.same_basin && trial.code == nlopt::MAXEVAL_REACHED) {
          if (!(trial.loglik >= run.loglik - kProbeMargin)) {
            trial.abandoned = true;
            return trial;
          }
          FitOptions rest = coarse;
          rest.max_evaluations = coarse.max_evaluations - trial.evaluations;
          auto more = optimise(problem, blocks, trial.z, rest, ws, &run);
          more.evaluations += trial.evaluations;
          if (more.loglik >= trial.loglik) trial = std::move(more);
        }
      } else {
        trial = optimise(problem, blocks, z_start, coarse, ws, &run);
      }
      if (!trial.same_basin && !trial.z.empty() && std::isfinite(trial.loglik) &&
          trial.loglik > run.loglik + 1e-6) {
        auto polished = optimise(problem, blocks, trial.z, options, ws);
        polished.evaluations += trial.evaluations;
        if (polished.loglik >= trial.loglik) return polished;
      }
      return trial;
    };
    auto keep_better = [&](OptimiserRun second) {
      ++fit.starts;
      fit.evaluations += second.evaluations;
      if (second.abandoned) {
        ++fit.abandoned_starts;
        if (second.loglik > run.loglik) run = std::move(second);
        return;
      }
      if (second.same_basin)  // it reached the best optimum's neighbourhood: agreement
        other_optima.push_back(run.loglik);
      else if (!second.z.empty() && std::isfinite(second.loglik))
        other_optima.push_back(std::min(second.loglik, run.loglik));
      if (second.loglik > run.loglik) run = std::move(second);
    };
    // Multi-start: with two or more ARMA coefficients the likelihood often has several local
    // maxima (an AR root cancelling against an MA root, MA roots on the wrong side of the real
    // axis), and the regression start can lead to the lower one. Such models also start from
    // the neutral point (every partial autocorrelation zero) and from the start with every MA
    // root mirrored (theta_j -> (-1)^j theta_j, i.e. the roots negated); the best optimum is
    // kept and the message says whether the starts disagreed.
    const auto& ns = problem.spec.noise;
    const bool several_starts =
        options.multi_start && ns.p + ns.q + ns.seasonal_p + ns.seasonal_q >= 2;
    if (several_starts) {
      if (!neutral_start) keep_better(explore(std::vector<double>(dim, 0.0)));
      if (ns.q + ns.seasonal_q > 0) {
        std::vector<double> mirrored = start;
        const int ma_offset = dim - (ns.p + ns.q + ns.seasonal_p + ns.seasonal_q) + ns.p;
        for (int j = 0; j < ns.q; ++j)
          if (j % 2 == 0) mirrored[ma_offset + j] = -mirrored[ma_offset + j];
        const int sma_offset = ma_offset + ns.q + ns.seasonal_p;
        for (int j = 0; j < ns.seasonal_q; ++j)
          if (j % 2 == 0) mirrored[sma_offset + j] = -mirrored[sma_offset + j];
        std::vector<double> z_mirrored(dim, 0.0);
        if (mirrored != start && to_unconstrained(blocks, mirrored, z_mirrored))
          keep_better(explore(z_mirrored));
      }
      // The optimum of each nested neighbour (one AR or one MA term fewer), padded with a zero
      // coefficient: a bigger ARMA can always reach what a nested one does, and its own starts
      // may all fall into a lower basin (as an ARMA(2,2) whose better optimum has the AR roots
      // of the ARMA(2,1) fit). Only for p + q >= 3, where this happens and the nested fits are
      // a fraction of the cost.
      if (ns.p + ns.q >= 3) {
        FitOptions nested_options = options;
        nested_options.multi_start = false;
        nested_options.standard_errors = false;
        nested_options.diagnostics = false;
        nested_options.warm_start.reset();
        for (int drop = 0; drop < 2; ++drop) {
          LikelihoodProblem nested = problem;
          (drop == 0 ? nested.spec.noise.q : nested.spec.noise.p) -= 1;
          if (nested.spec.noise.p < 0 || nested.spec.noise.q < 0) continue;
          const auto sub = fit_model(nested, nested_options);
          fit.evaluations += sub.evaluations;
          if (!sub.usable()) continue;
          ModelParams padded = sub.params;
          padded.phi.resize(ns.p, 0.0);
          padded.theta.resize(ns.q, 0.0);
          std::vector<double> z_nested(dim, 0.0);
          if (to_unconstrained(blocks, pack_nonlinear(problem.spec, padded), z_nested))
            keep_better(explore(z_nested));
        }
      }
    } else {
      // Restart rule: a fit ending on the boundary or failing gets a second start from the
      // neutral point, and the better optimum is kept.
      const bool at_boundary = !run.z.empty() && max_abs_pacf(run.z) > options.boundary_pacf;
      const bool failed = run.z.empty() || !std::isfinite(run.loglik) || run.code < 0;
      if ((at_boundary || failed) && !neutral_start)
        keep_better(optimise(problem, blocks, std::vector<double>(dim, 0.0), options, ws));
    }
    for (double other : other_optima)
      if (other < run.loglik - kDistinctOptimum) ++fit.lower_optima;
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

  auto value = profile_loglik(problem, natural, ws);
  if (!value.ok) {
    fit.status = FitStatus::numerical_failure;
    fit.message = "the GLS step failed: regressors are collinear or the noise variance is zero";
    if (auto why = collinear_inputs(problem, kNearCollinearTolerance); !why.empty())
      fit.message += "; " + why;
    fit.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    return fit;
  }

  // Covariance from the curvature of the profile log-likelihood. The optimiser stops when the
  // log-likelihood changes by less than its tolerance, which can leave the point a little short
  // of the maximum (1e-7 in log-likelihood moves standard errors in the fourth digit, and then
  // they would depend on where the optimiser started); one Newton step from the same finite
  // differences polishes it, and the curvature is measured again where it improved.
  fit.covariance.resize(0, 0);
  bool covariance_ok = false;
  if (options.standard_errors && dim + problem.n_linear() > 0) {
    Eigen::VectorXd step, h;
    covariance_ok = profile_covariance(problem, natural, value, ws, fit.covariance, &step, &h);
    if (covariance_ok && dim > 0 && !boundary) {
      std::vector<double> polished(natural);
      for (int i = 0; i < dim; ++i) polished[i] += step(i);
      const auto better = profile_loglik(problem, polished, ws);
      ++fit.evaluations;
      std::vector<double> z(dim);
      if (better.ok && better.objective > value.objective + 1e-12 &&
          to_unconstrained(blocks, polished, z) && max_abs_pacf(z) <= options.boundary_pacf) {
        // The curvature is measured again at the polished point (keeping it from the first
        // point moves standard errors by about 1e-4 with where the optimiser stopped), with the
        // first pass's steps: the polish moves far less than a step, so no second pilot.
        Eigen::MatrixXd cov;
        if (profile_covariance(problem, polished, better, ws, cov, nullptr, nullptr, &h)) {
          natural = polished;
          value = better;
          fit.covariance = cov;
        }
      }
    }
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
    fit.message = dim > 0 ? fmt::format("converged after {} likelihood evaluations ({})",
                                        fit.evaluations, starts_note(fit))
                          : "closed form: no nonlinear parameters";
  }

  // Estimates with their standard errors.
  const auto nl_names = nonlinear_names(problem.spec);
  const auto l_names = linear_names(problem.spec);
  std::vector<double> all(natural);
  all.insert(all.end(), linear.begin(), linear.end());
  std::vector<double> se(all.size(), std::numeric_limits<double>::quiet_NaN());
  if (covariance_ok) {
    for (size_t i = 0; i < all.size(); ++i) se[i] = std::sqrt(fit.covariance(i, i));
  } else if (options.standard_errors && !all.empty()) {
    fit.covariance.resize(0, 0);
    fit.diagnostics.warnings.push_back(
        {"hessian_not_definite",
         "hessian_not_definite: the log-likelihood is flat or not concave at the optimum; "
         "standard errors are not available",
         {},
         {}});
  }
  for (size_t i = 0; i < all.size(); ++i)
    fit.estimates.push_back(
        {i < nl_names.size() ? nl_names[i] : l_names[i - nl_names.size()], all[i], se[i]});
  if (options.diagnostics) compute_diagnostics(problem, options, fit, ws);
  fit.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return fit;
}

}  // namespace lagsieve
