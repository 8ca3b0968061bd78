#pragma once
// Target transforms and differencing, each with an exact inverse.
#include <span>
#include <vector>

#include "core/spec.h"

namespace lagsieve {

// log or Box-Cox (y^lambda - 1) / lambda; throws InputError naming `what` for y <= 0.
std::vector<double> apply_transform(std::span<const double> y, const TargetTransform& t,
                                    const char* what = "target");
double apply_transform(double y, const TargetTransform& t);
double invert_transform(double z, const TargetTransform& t);

// Coefficients of (1 - B)^d (1 - B^S)^D = 1 - sum_k c_k B^k, returned as c_1..c_L (L = lost()).
std::vector<double> differencing_lags(const Differencing& diff);

// w_t = (1 - B)^d (1 - B^S)^D x_t for t = L..n-1; the result has n - L values.
std::vector<double> difference(std::span<const double> x, const Differencing& diff);

// Inverse of `difference`: rebuilds x from its first L values and the differenced series.
std::vector<double> undifference(std::span<const double> head, std::span<const double> w,
                                 const Differencing& diff);

}  // namespace lagsieve
