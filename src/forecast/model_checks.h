#pragma once
// Checks of a model file's content beyond its JSON types: ranges of the orders, sizes that agree
// with the orders, stationary AR and stable denominator polynomials, invertible MA polynomials,
// positive variances. A model that passes can be forecast without NaN or a crash.
#include <string>

#include "forecast/fitted_model.h"

namespace lagsieve {

// Largest seasonal period a model file may hold: the state of the seasonal ARMA terms grows with
// period x (P or Q), and beyond this the forecast's matrices no longer fit in memory.
inline constexpr int kMaxModelPeriod = 1000;

// A unit MA root is allowed (a fit may end on the invertibility boundary and still forecasts
// well); roots inside the unit circle by more than this are refused.
inline constexpr double kMaRootTolerance = 1e-6;

// Throws InputError "<source>: model file field '<path>' ..." at the first field that fails.
void check_fitted_model(const FittedModel& model, const std::string& source);
// The orders and input uses only (spec and inputs): run before the orders size any vector.
void check_model_spec(const FittedModel& model, const std::string& source);

}  // namespace lagsieve
