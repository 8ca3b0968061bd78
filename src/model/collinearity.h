#pragma once
// Inputs that cannot have separate effects: the first regressor column (constant first, then each
// input's lags b..b+s in spec order) that is a linear combination of the columns before it, up to
// a relative residual of `tolerance`, named with the columns it is made of.
#include <string>

#include "model/likelihood.h"

namespace lagsieve {

// make_problem refuses a model at this tolerance (exact collinearity up to rounding).
inline constexpr double kCollinearTolerance = 1e-9;
// A fit that fails numerically looks again at this looser one, to name near-collinear inputs.
inline constexpr double kNearCollinearTolerance = 1e-6;

// "" when every column adds something new; otherwise the message naming the inputs.
std::string collinear_inputs(const LikelihoodProblem& problem, double tolerance);

}  // namespace lagsieve
