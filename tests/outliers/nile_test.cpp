// R's Nile series (annual flow at Aswan, 1871-1970): published analyses place a level shift in
// 1898-1899, when the first Aswan dam came into use (Cobb 1978, Biometrika 65; Balke 1993,
// J. Business & Economic Statistics 11). Detection must find it on its own from the CSV as R
// exports it, and the joint fit must match R's arima with the step as a regressor
// (tests/reference/outliers/make_nile.R).
#include <fmt/format.h>
#include <gtest/gtest.h>

#include "data/load.h"
#include "fixture.h"
#include "forecast/fitted_model.h"
#include "forecast/forecast.h"
#include "forecast/model_file.h"
#include "io/config.h"
#include "model/spec_from_config.h"
#include "outliers/detect.h"

namespace lagsieve {
namespace {

RunConfig nile_config(const std::string& outliers) {
  const std::string yaml = fmt::format(
      "data: {{file: {}, time: year}}\ntarget: {{column: flow}}\nnoise: {{ar: 1, ma: 0}}\n{}",
      testing::reference_path("outliers/nile.csv"), outliers);
  return parse_config(yaml, "nile.yaml");
}

TEST(OutlierNile, LevelShiftFoundAutomaticallyAndMatchesArimaWithStep) {
  const auto config = nile_config(
      "outliers: {detect: [additive, level_shift, temporary], "
      "critical: auto, max: 10}\n");
  ASSERT_TRUE(config.outliers.enabled);
  const auto data = load_series(config).front();
  const auto result =
      fit_with_outliers(data, single_spec(config), outlier_options(config.outliers));
  ASSERT_EQ(result.effects.size(), 1u);
  const auto& e = result.effects.front();
  EXPECT_EQ(e.type, OutlierType::level_shift);
  EXPECT_EQ(e.time, "1899");
  EXPECT_EQ(e.name, "LS@1899");
  EXPECT_TRUE(e.ambiguous_with.empty());
  EXPECT_NEAR(result.critical, 3.7648236495339269, 1e-9);  // R qnorm(1 - 0.025 / 300)

  const auto ref = testing::load_fixture("outliers/nile_level_shift.json");
  EXPECT_NEAR(e.size, ref["step"].get<double>(), 1e-3 * std::abs(ref["step"].get<double>()));
  EXPECT_NEAR(e.std_error, ref["step_se"].get<double>(), 0.02 * ref["step_se"].get<double>());
  EXPECT_GE(result.fit.loglik, ref["loglik"].get<double>() - 1e-4);
  EXPECT_NEAR(result.fit.params.phi[0], ref["ar1"].get<double>(), 1e-3);
  EXPECT_NEAR(result.fit.params.constant, ref["intercept"].get<double>(),
              1e-4 * ref["intercept"].get<double>());
  // The effect's residual-input check is left out (it sits where the residuals were largest).
  EXPECT_TRUE(result.fit.diagnostics.residual_input.empty());
}

TEST(OutlierNile, ModelFileForecastsALevelShiftAsPersistingAndAnOutlierAsNot) {
  const auto config = nile_config("outliers: {}\n");
  const auto data = load_series(config).front();
  const auto spec = single_spec(config);
  const auto detected = fit_with_outliers(data, spec, outlier_options(config.outliers));
  ASSERT_EQ(detected.effects.size(), 1u);
  // Through the model file text, as `fit --save` then `forecast` would.
  const auto model = fitted_model_from_json(
      to_json(make_fitted_model(detected.fit, config, detected.data, detected.effects)), "m");
  ASSERT_TRUE(model.inputs.back().effect.has_value());
  EXPECT_EQ(model.inputs.back().at, "1899");
  ForecastOptions fo;
  fo.horizon = 40;
  const auto f = forecast(model, data, {}, fo);
  // Far ahead the AR(1) part has died out: the new level c + omega persists.
  EXPECT_NEAR(f.level.back(), detected.fit.params.constant + detected.effects[0].size, 1e-6);

  // An additive outlier in 1913 (the low flood) adds nothing past its year.
  OutlierEffect ao;
  ao.type = OutlierType::additive;
  ao.row = 1913 - 1871;
  ao.time = "1913";
  ao.name = "AO@1913";
  const auto with_ao = fit_with_effects(data, spec, {ao}, FitOptions{});
  const auto ao_model = fitted_model_from_json(
      to_json(make_fitted_model(with_ao.fit, config, with_ao.data, with_ao.effects)), "m");
  const auto g = forecast(ao_model, data, {}, fo);
  EXPECT_NEAR(g.level.back(), with_ao.fit.params.constant, 1e-6);
  // The model file written before detection existed (no `detected` field) still loads.
  auto plain =
      to_json(make_fitted_model(fit_with_effects(data, spec, {}, FitOptions{}).fit, config, data));
  EXPECT_NO_THROW(fitted_model_from_json(plain, "old"));
}

}  // namespace
}  // namespace lagsieve
