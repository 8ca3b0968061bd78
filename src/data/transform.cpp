#include "data/transform.h"

#include <cmath>
#include <fmt/format.h>

#include "core/error.h"

namespace lagsieve {

double apply_transform(double y, const TargetTransform& t) {
  switch (t.kind) {
    case TransformKind::none:
      return y;
    case TransformKind::log:
      return std::log(y);
    case TransformKind::boxcox:
      return t.lambda == 0.0 ? std::log(y) : (std::pow(y, t.lambda) - 1.0) / t.lambda;
  }
  return y;
}

double invert_transform(double z, const TargetTransform& t) {
  switch (t.kind) {
    case TransformKind::none:
      return z;
    case TransformKind::log:
      return std::exp(z);
    case TransformKind::boxcox:
      return t.lambda == 0.0 ? std::exp(z) : std::pow(t.lambda * z + 1.0, 1.0 / t.lambda);
  }
  return z;
}

std::vector<double> apply_transform(std::span<const double> y, const TargetTransform& t,
                                    const char* what) {
  std::vector<double> out(y.size());
  for (size_t i = 0; i < y.size(); ++i) {
    if (t.kind != TransformKind::none && !(y[i] > 0.0) && !std::isnan(y[i]))  // NaN: missing
      throw InputError(fmt::format(
          "{} value {} at row {} is not positive, so the {} transform is undefined; use "
          "`transform: none` or shift the series",
          what, y[i], i + 1, t.kind == TransformKind::log ? "log" : "Box-Cox"));
    out[i] = apply_transform(y[i], t);
  }
  return out;
}

std::vector<double> differencing_lags(const Differencing& diff) {
  // Multiply out (1 - B)^d (1 - B^S)^D as a polynomial with leading 1.
  std::vector<double> poly{1.0};
  auto multiply = [&poly](int lag) {
    std::vector<double> next(poly.size() + lag, 0.0);
    for (size_t i = 0; i < poly.size(); ++i) {
      next[i] += poly[i];
      next[i + lag] -= poly[i];
    }
    poly = std::move(next);
  };
  for (int i = 0; i < diff.regular; ++i) multiply(1);
  for (int i = 0; i < diff.seasonal; ++i) multiply(diff.period);
  std::vector<double> c(poly.size() - 1);
  for (size_t k = 1; k < poly.size(); ++k) c[k - 1] = -poly[k];
  return c;
}

std::vector<double> difference(std::span<const double> x, const Differencing& diff) {
  const auto c = differencing_lags(diff);
  const size_t lost = c.size();
  if (x.size() <= lost) return {};
  std::vector<double> w(x.size() - lost);
  // Extended precision: the lag sums cancel heavily (terms ~ |x|, result ~ |step|), and any
  // rounding here is integrated d + D times again by undifference.
  for (size_t t = lost; t < x.size(); ++t) {
    long double v = x[t];
    // Zero coefficients skipped: a missing value (NaN) reaches only the differences it is in.
    for (size_t k = 0; k < lost; ++k)
      if (c[k] != 0.0) v -= static_cast<long double>(c[k]) * x[t - k - 1];
    w[t - lost] = static_cast<double>(v);
  }
  return w;
}

std::vector<double> undifference(std::span<const double> head, std::span<const double> w,
                                 const Differencing& diff) {
  const auto c = differencing_lags(diff);
  std::vector<double> x(head.begin(), head.end());
  x.reserve(head.size() + w.size());
  for (double wt : w) {
    long double v = wt;
    const size_t t = x.size();
    for (size_t k = 0; k < c.size(); ++k) v += static_cast<long double>(c[k]) * x[t - k - 1];
    x.push_back(static_cast<double>(v));
  }
  return x;
}

}  // namespace lagsieve
