#pragma once
// Exact maximum-likelihood fit of one transfer-function model.
//
// The optimiser (NLopt BOBYQA, derivative-free) sees only the nonlinear parameters, each
// polynomial mapped to unconstrained reals through partial autocorrelations (Jones 1980;
// Monahan 1984), so every delta is stable, every AR stationary and every MA invertible by
// construction. The constant and every omega are concentrated out by GLS (see likelihood.h).
#include <Eigen/Core>
#include <complex>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/series.h"
#include "core/spec.h"
#include "core/warning.h"
#include "model/likelihood.h"
#include "model/params.h"
#include "model/residual_input.h"

namespace lagsieve {

// How a fit ended. ok, boundary and no_convergence carry a usable (best found) point;
// numerical_failure does not; rejected is set by callers whose diagnostics refuse the model.
enum class FitStatus { ok, no_convergence, boundary, numerical_failure, rejected };
std::string_view to_string(FitStatus s);

struct FitOptions {
  // Per start; 0: 300 + 150 * (number of nonlinear parameters). Extra starts get a third.
  int max_evaluations = 0;
  double relative_tolerance = 1e-10;  // stop when the log-likelihood changes less (relative)
  double boundary_pacf = 0.995;       // |partial autocorrelation| beyond: on the boundary
  bool standard_errors = true;        // profile-likelihood curvature (about d^2/2 evaluations)
  bool diagnostics = true;            // residuals, Ljung-Box, roots, gains, residual-input ccf
  // With diagnostics: the residual-input cross-correlation of every input. A search's candidate
  // fits turn it off (they read only Ljung-Box and warnings; the chosen model is refitted with it).
  bool residual_input_check = true;
  std::optional<ModelParams> warm_start;  // start here instead of the regression start values
  // With two or more ARMA coefficients, also start from the neutral point and from the start
  // with its MA roots mirrored, keeping the best optimum (see FitResult::starts).
  bool multi_start = true;
};

struct ParamEstimate {
  std::string name;
  double value = 0.0;
  double std_error = 0.0;  // NaN when the Hessian is not usable
};

struct LjungBoxResult {
  int lag = 0;
  int df = 0;  // lag minus the number of ARMA parameters
  double statistic = 0.0;
  double p_value = 0.0;
};

struct InputGain {
  std::string input;
  double gain = 0.0;       // omega(1) / delta(1): long-run effect of a unit step
  double std_error = 0.0;  // delta method
};

struct PolynomialRoots {
  std::string polynomial;  // e.g. "phi", "theta", "temp.delta", "temp.omega"
  std::vector<std::complex<double>> roots;
  double min_modulus = 0.0;
};

struct FitDiagnostics {
  // Residual autocorrelation r(1..L), L = min(24, n / 4) (at least the largest Ljung-Box lag),
  // with the approximate band 2 / sqrt(n); empty for fewer than 9 residuals.
  std::vector<double> residual_acf;
  double residual_acf_band = 0.0;
  std::vector<LjungBoxResult> ljung_box;
  std::vector<InputGain> gains;
  std::vector<PolynomialRoots> roots;
  // Per input (spec order; an input is left out where the check is undefined, e.g. constant
  // over the sample): residuals against the prewhitened input, see model/residual_input.h.
  std::vector<ResidualInputCorrelation> residual_input;
  std::vector<Warning> warnings;  // codes with numbers (core/warning.h), e.g. near_cancellation
};

struct FitResult {
  ModelSpec spec;
  FitStatus status = FitStatus::numerical_failure;
  std::string message;  // a sentence, with numbers
  ModelParams params;
  std::vector<ParamEstimate> estimates;  // nonlinear then linear parameters (sigma^2 not here)
  Eigen::MatrixXd covariance;            // of `estimates`, natural coordinates
  double loglik = 0.0;
  double sigma2 = 0.0;
  double aic = 0.0, aicc = 0.0, bic = 0.0;
  int n_obs = 0;                  // observations inside the likelihood
  int n_params = 0;               // every estimated parameter, sigma^2 included
  int start = 0;                  // first differenced index inside the likelihood
  std::vector<double> residuals;  // standardised innovations, variance sigma^2
  FitDiagnostics diagnostics;
  int evaluations = 0;
  int starts = 0;        // optimiser starts used (multi-start, or a restart after a boundary)
  int lower_optima = 0;  // starts that ended more than 0.01 below the best (kept) optimum
  // Extra starts stopped after a short probe because they were still far below the best.
  int abandoned_starts = 0;
  double seconds = 0.0;

  bool usable() const { return status != FitStatus::numerical_failure; }
};

FitResult fit_model(const LikelihoodProblem& problem, const FitOptions& options = {});

// Information criteria from a log-likelihood; k counts every estimated parameter.
double aic(double loglik, int k);
double aicc(double loglik, int k, int n);
double bic(double loglik, int k, int n);

// Regression start values for the nonlinear parameters (natural coordinates): deltas from a
// distributed-lag regression, ARMA terms by Hannan & Rissanen (1982).
std::vector<double> start_values(const LikelihoodProblem& problem);

}  // namespace lagsieve
