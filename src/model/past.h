#pragma once
// What a fitted model says about the history it was fitted on: one-step predictions (fitted
// values), their errors (residuals) and the part of each fitted value that each input explains.
//
// Everything is on the model's scale of the target (after its transform, before differencing).
// At a row t of the likelihood sample, with v_t the one-step prediction error of the noise
// (the raw Kalman innovation, variance sigma^2 F_t):
//
//   fitted_t   = actual_t - v_t             (the prediction of actual_t from rows before t)
//   residual_t = actual_t - fitted_t = v_t
//   input_i,t  = [omega_i(B) B^{b_i} / delta_i(B)] x_{i,t}, x_i the undifferenced input (the
//                start-up rule of transfer_response: zero before the first row)
//   noise_t    = fitted_t - sum_i input_i,t (the constant, the integrated part of a
//                differenced model and the predicted ARMA noise)
//
// so the input columns plus noise add up to fitted by construction. The differencing
// polynomial is monic, which is why the prediction error of the target equals that of w_t.
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "core/series.h"
#include "core/spec.h"
#include "model/params.h"

namespace lagsieve {

struct InputContribution {
  std::string input;
  std::vector<double> values;  // one per row of PastFit
};

struct PastFit {
  std::string scale;                      // "target", "log(target)" or "Box-Cox(target, lambda)"
  std::vector<int> rows;                  // data rows (0-based) of the likelihood sample
  std::vector<std::string> time;          // their time stamps ("" without a time column)
  std::vector<double> actual;             // NaN where the target is missing
  std::vector<double> fitted;             // NaN where the target is missing
  std::vector<double> residual;           // actual - fitted (NaN where missing)
  std::vector<double> residual_sd;        // sqrt(sigma^2 F_t): the model's sd of each residual
  std::vector<InputContribution> inputs;  // spec order
  std::vector<double> noise;              // fitted - sum of the input contributions
  double sigma = 0.0;                     // sqrt(sigma^2): the steady-state residual sd
};

// The past of a fit whose likelihood sample starts at differenced index `start` (FitResult's).
// `data` is the data the model was fitted on (with any detected-effect columns). Throws
// InputError as make_problem does when the data do not fit the spec.
PastFit explain_past(const SeriesData& data, const ModelSpec& spec, const ModelParams& params,
                     int start);

// {"scale", "note", "time", "row" (1-based), "actual", "fitted", "residual", "residual_sd",
//  "contributions": [{"input", "values"}], "noise", "sigma"}; non-finite values are null.
nlohmann::json past_to_json(const PastFit& past);

// past.csv: time (or row without a time column), actual, fitted, residual, one column per input
// contribution (named by the input), noise. Numbers round-trip (shortest exact form); missing
// cells are empty.
std::string past_csv(const PastFit& past);

}  // namespace lagsieve
