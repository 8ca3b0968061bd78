#pragma once
// The exact Gaussian log-likelihood of a transfer-function model.
//
// For fixed nonlinear parameters (every delta, phi, theta, Phi, Theta) the model is a linear
// regression with ARMA errors: w_t = c + sum_i sum_j omega_{i,j} y_{i,t-b_i-j} + n_t, where
// y_i = u_i / delta_i(B) is filtered from zero pre-sample values. With an estimated filter start
// (FilterStart::estimated) each input with r > 0 adds r more columns: the unknown history before
// the data changes the output omega_i(B) B^b y_i by a solution of delta_i(B) g = 0 over the
// sample (the shifted homogeneous solutions of every omega lag lie in one r-dimensional space,
// since t - b - s >= 0 inside the sample), spanned by the solutions g_k equal to 1 at sample row
// k and 0 at the other first r rows (k < r). Their coefficients, the start states, are linear
// like the omegas; the basis stays well defined as delta -> 0, where it becomes pulses at the
// first rows. The ARMA filter whitens the target and every regressor column in one pass; the
// constant, every omega and every start state are then concentrated out by generalised least
// squares and sigma^2 by its ML estimate, so the optimiser searches only the nonlinear
// parameters (variable projection).
#include <Eigen/Core>
#include <span>
#include <string>
#include <vector>

#include "core/series.h"
#include "core/spec.h"
#include "model/arma_filter.h"
#include "model/params.h"
#include "screen/indicator.h"

namespace lagsieve {

// The data of one fit, already transformed and differenced, and the sample inside the
// likelihood. Built once, then shared read-only by every evaluation (and thread).
struct LikelihoodProblem {
  ModelSpec spec;
  std::vector<double> w;               // differenced, transformed target (N values)
  std::vector<std::vector<double>> u;  // differenced inputs of spec.inputs, in spec order
  // What each input of spec.inputs is (an event, an indicator column or a plain column), for the
  // diagnostics' choice of prewhitening; empty: every input a plain column.
  std::vector<InputKind> input_kinds;
  int start = 0;                       // first index of w inside the likelihood
  // 1 where w is missing (NaN: a missing target value, or a difference that involves one);
  // empty when none is. The Kalman filter predicts through these rows without an update, so
  // the likelihood is the exact one of the observed values, and the GLS step skips the rows.
  std::vector<unsigned char> missing;
  int n_rows() const { return static_cast<int>(w.size()) - start; }  // rows of the sample
  int n_obs() const;  // observed rows of the sample: the n of sigma^2 and the criteria
  bool is_missing(int index) const { return !missing.empty() && missing[index] != 0; }
  int n_nonlinear() const;  // deltas, then phi, theta, Phi, Theta
  // Constant (if any), the omegas of each input, then the start states of each input.
  int n_linear() const;
  int n_params() const { return n_nonlinear() + n_linear() + 1; }  // + sigma^2
};

// Smallest start making every lag of `spec` available: max over inputs of b + s.
int minimum_start(const ModelSpec& spec);

// Builds the problem from loaded data: transform, difference, pick the inputs of `spec`.
// `start` < 0 means minimum_start(spec). Throws InputError when the sample is too short.
LikelihoodProblem make_problem(const SeriesData& data, const ModelSpec& spec, int start = -1);

// Names of the nonlinear and linear parameters, in the order of the vectors below.
std::vector<std::string> nonlinear_names(const ModelSpec& spec);
std::vector<std::string> linear_names(const ModelSpec& spec);

// Packing between ModelParams and (nonlinear, linear) vectors in natural coordinates.
std::vector<double> pack_nonlinear(const ModelSpec& spec, const ModelParams& p);
std::vector<double> pack_linear(const ModelSpec& spec, const ModelParams& p);
ModelParams unpack(const ModelSpec& spec, std::span<const double> nonlinear,
                   std::span<const double> linear, double sigma2);

struct LikelihoodWorkspace {
  ArmaFilterWorkspace filter;
  RowMatrix columns;                          // n x (1 + n_linear): target, then regressors
  std::vector<std::vector<double>> filtered;  // u_i / delta_i(B) of each input
  std::vector<std::vector<double>> starts;    // start-state columns over the sample
  std::vector<const double*> sources;         // first value of each regressor column in `filtered`
};

// Profile log-likelihood: linear parameters by GLS, sigma^2 by ML. Invalid parameters
// (non-stationary, non-invertible handled by the caller's transform; here: a failed filter or a
// singular GLS) give ok = false.
struct ProfileValue {
  bool ok = false;
  double loglik = 0.0;
  // What the optimiser maximises over the nonlinear parameters: loglik (Estimation::ml), or the
  // restricted log-likelihood with the k linear parameters integrated out under a flat prior
  // (Estimation::restricted): -1/2 [(n - k) log(2 pi s2) + (n - k) + log|Sigma| +
  // log|X' Sigma^-1 X|], s2 = ssr / (n - k) (Harville 1974; for ARMA errors, Cooper & Thompson
  // 1977, Tunnicliffe Wilson 1989), up to a constant.
  double objective = 0.0;
  double sigma2 = 0.0;
  Eigen::VectorXd linear;              // GLS estimates
  Eigen::MatrixXd linear_information;  // X' Sigma^-1 X in units of sigma^2 (for diagnostics)
};
ProfileValue profile_loglik(const LikelihoodProblem& problem, std::span<const double> nonlinear,
                            LikelihoodWorkspace& ws);

// Log-likelihood at fully given parameters (linear ones included); sigma^2 is concentrated out
// as R's arima does, so sigma2 in `p` is ignored and `sigma2_out` receives its ML value.
double loglik_at(const LikelihoodProblem& problem, const ModelParams& p, LikelihoodWorkspace& ws,
                 double* sigma2_out = nullptr);

// Noise of the model at given parameters: n_t = w_t - c - sum_i x_{i,t}, over the whole
// differenced sample (index 0..N-1; the start states apply from `start` on, values before it
// use the zero start).
std::vector<double> model_noise(const LikelihoodProblem& problem, const ModelParams& p);

// Standardised innovations (residuals, variance sigma^2) of the model over the likelihood
// sample, at observed rows only (n_obs() values, in time order).
std::vector<double> model_residuals(const LikelihoodProblem& problem, const ModelParams& p,
                                    LikelihoodWorkspace& ws);

}  // namespace lagsieve
