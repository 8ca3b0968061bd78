// Target transforms and differencing: closed-form values and exact round trips.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "core/error.h"
#include "core/random.h"
#include "data/transform.h"

namespace lagsieve {
namespace {

TEST(Transform, ClosedFormValues) {
  EXPECT_DOUBLE_EQ(apply_transform(std::exp(2.0), {TransformKind::log, 1.0}), 2.0);
  EXPECT_DOUBLE_EQ(apply_transform(4.0, {TransformKind::boxcox, 0.5}), 2.0);   // (2 - 1) / 0.5
  EXPECT_DOUBLE_EQ(apply_transform(3.0, {TransformKind::boxcox, 1.0}), 2.0);   // y - 1
  EXPECT_DOUBLE_EQ(apply_transform(4.0, {TransformKind::boxcox, -1.0}), 0.75); // 1 - 1/y
  EXPECT_DOUBLE_EQ(apply_transform(5.0, {TransformKind::boxcox, 0.0}), std::log(5.0));
  EXPECT_DOUBLE_EQ(apply_transform(-7.5, {TransformKind::none, 1.0}), -7.5);
}

TEST(Transform, InverseOfTransformIsIdentity) {
  Random rng(20240101);
  std::vector<double> y(500);
  for (auto& v : y) v = std::exp(6.0 * rng.uniform() - 2.0);  // 0.14 .. 55, several decades
  const std::vector<TargetTransform> transforms{
      {TransformKind::none, 1.0},     {TransformKind::log, 1.0},      {TransformKind::boxcox, -1.0},
      {TransformKind::boxcox, -0.5},  {TransformKind::boxcox, 0.0},   {TransformKind::boxcox, 0.25},
      {TransformKind::boxcox, 0.5},   {TransformKind::boxcox, 1.0},   {TransformKind::boxcox, 2.0}};
  for (const auto& t : transforms) {
    const auto z = apply_transform(y, t);
    for (size_t i = 0; i < y.size(); ++i)
      ASSERT_NEAR(invert_transform(z[i], t), y[i], 1e-12 * y[i])
          << "kind " << static_cast<int>(t.kind) << " lambda " << t.lambda;
  }
}

TEST(Transform, NonPositiveValueIsAnInputError) {
  const std::vector<double> y{1.0, 0.0, 2.0};
  try {
    apply_transform(y, {TransformKind::log, 1.0});
    FAIL() << "expected an InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "target value 0 at row 2 is not positive, so the log transform is undefined; use "
              "`transform: none` or shift the series");
  }
}

TEST(Differencing, LagPolynomialClosedForm) {
  // (1 - B)(1 - B^4) = 1 - B - B^4 + B^5, i.e. c = (1, 0, 0, 1, -1).
  EXPECT_EQ(differencing_lags({1, 1, 4}), (std::vector<double>{1, 0, 0, 1, -1}));
  // (1 - B)^2 = 1 - 2B + B^2.
  EXPECT_EQ(differencing_lags({2, 0, 12}), (std::vector<double>{2, -1}));
  EXPECT_TRUE(differencing_lags({0, 0, 7}).empty());
  EXPECT_EQ((Differencing{1, 1, 12}).lost(), 13);
}

TEST(Differencing, QuadraticHasConstantSeasonalDifference) {
  // x_t = t^2: (1 - B) x_t = 2t - 1, then (1 - B^S) gives 2S for every t.
  std::vector<double> x(40);
  for (size_t t = 0; t < x.size(); ++t) x[t] = static_cast<double>(t * t);
  const Differencing diff{1, 1, 7};
  const auto w = difference(x, diff);
  ASSERT_EQ(w.size(), x.size() - 8);
  for (double v : w) EXPECT_EQ(v, 14.0);
  // (1 - B)^2 t^2 = 2.
  for (double v : difference(x, {2, 0, 1})) EXPECT_EQ(v, 2.0);
}

TEST(Differencing, UndifferenceInvertsDifference) {
  Random rng(7);
  for (int d = 0; d <= 2; ++d) {
    for (int seasonal = 0; seasonal <= 1; ++seasonal) {
      for (int period : {4, 7, 12}) {
        const Differencing diff{d, seasonal, period};
        std::vector<double> x(150);
        double level = 100.0;
        for (auto& v : x) v = (level += rng.normal());  // a random walk around 100
        const auto w = difference(x, diff);
        const size_t lost = static_cast<size_t>(diff.lost());
        const auto back = undifference(std::span(x).first(lost), w, diff);
        ASSERT_EQ(back.size(), x.size());
        for (size_t t = 0; t < x.size(); ++t)
          ASSERT_NEAR(back[t], x[t], 1e-12 * std::abs(x[t]))
              << "d=" << d << " D=" << seasonal << " S=" << period << " t=" << t;
      }
    }
  }
}

TEST(Differencing, TransformThenDifferenceRoundTrip) {
  // The order used for forecasts: transform, difference; back: undifference, invert.
  Random rng(11);
  std::vector<double> y(120);
  for (size_t t = 0; t < y.size(); ++t)
    y[t] = 50.0 + 10.0 * std::sin(static_cast<double>(t) / 3.0) + rng.uniform();
  const TargetTransform tr{TransformKind::boxcox, 0.3};
  const Differencing diff{1, 1, 12};
  const auto z = apply_transform(y, tr);
  const auto w = difference(z, diff);
  const auto z_back = undifference(std::span(z).first(13), w, diff);
  for (size_t t = 0; t < y.size(); ++t)
    ASSERT_NEAR(invert_transform(z_back[t], tr), y[t], 1e-12 * y[t]);
}

}  // namespace
}  // namespace lagsieve
