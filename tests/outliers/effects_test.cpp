// Closed-form checks of the pieces of detection: effect shapes, pi-weights against psi-weights,
// the critical value rule, the ambiguity rule, the robust scale and the config section.
#include <gtest/gtest.h>

#include <cmath>

#include "core/error.h"
#include "io/config.h"
#include "model/polynomial.h"
#include "outliers/detect.h"
#include "outliers/json.h"

namespace lagsieve {
namespace {

TEST(OutlierEffects, ShapesOfEachType) {
  OutlierEffect e;
  e.row = 2;
  e.type = OutlierType::additive;
  EXPECT_EQ(effect_values(e, 5), (std::vector<double>{0, 0, 1, 0, 0}));
  e.type = OutlierType::level_shift;
  EXPECT_EQ(effect_values(e, 5), (std::vector<double>{0, 0, 1, 1, 1}));
  e.type = OutlierType::temporary;
  e.decay = 0.5;
  EXPECT_EQ(effect_values(e, 5), (std::vector<double>{0, 0, 1, 0.5, 0.25}));
  EXPECT_EQ(effect_name(OutlierType::level_shift, {"a", "b", "2024-03-01"}, 2), "LS@2024-03-01");
  EXPECT_EQ(effect_name(OutlierType::additive, {}, 7), "AO@7");
}

TEST(OutlierEffects, InnovationalIsPsiWeightsThroughTheIntegration) {
  OutlierEffect e;
  e.type = OutlierType::innovational;
  e.row = 3;
  e.ar = {0.6};
  e.ma = {0.3};
  e.differencing = {1, 0, 1};
  const auto v = effect_values(e, 20);
  const auto psi = psi_weights(e.ar, e.ma, 17);
  for (int j = 0; j < 17; ++j) {
    const double diff = v[3 + j] - (j == 0 ? 0.0 : v[2 + j]);
    EXPECT_NEAR(diff, psi[j], 1e-12) << j;
  }
}

TEST(OutlierEffects, PiWeightsInvertThePsiWeightsIncludingDifferencing) {
  ModelSpec spec;
  spec.noise = {1, 1, 0, 1, 4};
  spec.differencing = {1, 1, 4};
  ModelParams p = zero_params(spec);
  p.phi = {0.5};
  p.theta = {0.4};
  p.seasonal_theta = {-0.3};
  const int count = 40;
  const auto pi = noise_pi_weights(spec, p, count);
  // psi of the full model: an innovational effect's values are exactly those weights.
  OutlierEffect io;
  io.type = OutlierType::innovational;
  io.ar = expand_ar(p.phi, p.seasonal_phi, 4);
  io.ma = expand_ma(p.theta, p.seasonal_theta, 4);
  io.differencing = spec.differencing;
  const auto psi = effect_values(io, count);
  for (int j = 0; j < count; ++j) {
    double c = 0.0;
    for (int k = 0; k <= j; ++k) c += pi[k] * psi[j - k];
    EXPECT_NEAR(c, j == 0 ? 1.0 : 0.0, 1e-10) << j;
  }
}

TEST(OutlierEffects, CriticalValueRule) {
  // R: qnorm(1 - 0.025 / 300), qnorm(1 - 0.025 / 600), qnorm(1 - 0.025 / 1500).
  EXPECT_NEAR(default_critical_value(100, 3), 3.7648236495339269, 1e-9);
  EXPECT_NEAR(default_critical_value(200, 3), 3.9346058615604633, 1e-9);
  EXPECT_NEAR(default_critical_value(500, 3), 4.1494099843479697, 1e-9);
  EXPECT_DOUBLE_EQ(default_critical_value(5, 1), 3.0);
}

TEST(OutlierEffects, LastObservationIsAmbiguousInteriorIsNot) {
  const std::vector<double> pi{1.0, -0.5};  // AR(1) noise, phi = 0.5
  const std::vector<OutlierType> all{OutlierType::additive, OutlierType::level_shift,
                                     OutlierType::temporary};
  auto pad = pi;
  pad.resize(200, 0.0);
  EXPECT_EQ(ambiguous_types(OutlierType::level_shift, all, 0.7, pad, 1, 0.9).size(), 2u);
  EXPECT_TRUE(ambiguous_types(OutlierType::level_shift, all, 0.7, pad, 150, 0.9).empty());
  EXPECT_TRUE(ambiguous_types(OutlierType::additive, all, 0.7, pad, 150, 0.9).empty());
}

TEST(OutlierEffects, RobustScaleIgnoresOutliersAndIsConsistent) {
  std::vector<double> e;
  for (int i = 0; i < 2001; ++i) e.push_back(std::erf((i + 0.5) / 2001.0 * 2 - 1));
  // A smooth spread: the scale is finite, positive and unmoved by two gross outliers.
  const double base = robust_scale(e);
  e.push_back(1e6);
  e.push_back(-1e6);
  EXPECT_GT(base, 0.0);
  EXPECT_NEAR(robust_scale(e), base, 0.01 * base);
}

TEST(OutlierEffects, LargestStatisticFindsAPlantedPulse) {
  std::vector<double> r(100, 0.0);
  for (int i = 0; i < 100; ++i) r[i] = ((i * 37) % 11 - 5) * 0.2;  // deterministic wiggle
  r[40] += 10.0;
  std::vector<double> pi(100, 0.0);
  pi[0] = 1.0;
  const std::vector<OutlierType> types{OutlierType::additive, OutlierType::level_shift};
  std::vector<std::vector<double>> sig;
  for (auto t : types) sig.push_back(residual_signature(t, 0.7, pi, 100));
  const auto c = largest_statistic(r, types, sig, std::vector<bool>(100, false));
  EXPECT_EQ(c.type, OutlierType::additive);
  EXPECT_EQ(c.index, 40);
  EXPECT_NEAR(c.size, r[40], 1e-12);  // pi = 1: the residual itself
}

TEST(OutlierConfig, SectionParsedValidatedAndOffByDefault) {
  const std::string base = "data: {file: x.csv}\ntarget: {column: y}\n";
  EXPECT_FALSE(parse_config(base, "c.yaml").outliers.enabled);
  const auto on = parse_config(base +
                                   "outliers: {detect: [level_shift], critical: 4.5, max: 3, "
                                   "decay: 0.8}\n",
                               "c.yaml");
  EXPECT_TRUE(on.outliers.enabled);
  EXPECT_EQ(on.outliers.detect, std::vector<OutlierType>{OutlierType::level_shift});
  EXPECT_DOUBLE_EQ(on.outliers.critical, 4.5);
  EXPECT_EQ(on.outliers.max, 3);
  EXPECT_DOUBLE_EQ(on.outliers.decay, 0.8);
  EXPECT_DOUBLE_EQ(parse_config(base + "outliers: {critical: auto}\n", "c.yaml").outliers.critical,
                   0.0);
  auto message = [&](const std::string& section) {
    try {
      parse_config(base + section, "c.yaml");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string();
  };
  EXPECT_NE(message("outliers: {detcet: [additive]}\n").find("detect"), std::string::npos);
  EXPECT_NE(message("outliers: {detect: [level_shfit]}\n").find("level_shift"), std::string::npos);
  EXPECT_NE(message("outliers: {decay: 1.5}\n").find("outliers.decay"), std::string::npos);
  EXPECT_NE(message("outliers: {critical: 1}\n").find("outliers.critical"), std::string::npos);
  EXPECT_NE(message("outliers: {max: 0}\n").find("outliers.max"), std::string::npos);
}

TEST(OutlierJson, EffectRoundTrip) {
  OutlierEffect e;
  e.type = OutlierType::innovational;
  e.row = 12;
  e.time = "2024-01-13";
  e.name = "IO@2024-01-13";
  e.ar = {0.5};
  e.ma = {0.2, -0.1};
  e.differencing = {1, 0, 1};
  e.size = 3.0;
  e.std_error = 0.5;
  e.statistic = 6.0;
  e.ambiguous_with = {OutlierType::additive};
  const auto back = effect_from_json(effect_to_json(e), "here");
  EXPECT_EQ(back.name, e.name);
  EXPECT_EQ(back.type, e.type);
  EXPECT_EQ(back.row, e.row);
  EXPECT_EQ(back.ar, e.ar);
  EXPECT_EQ(back.ma, e.ma);
  EXPECT_EQ(back.differencing, e.differencing);
  EXPECT_EQ(back.ambiguous_with, e.ambiguous_with);
  auto bad = effect_to_json(e);
  bad["type"] = "spike";
  EXPECT_THROW(effect_from_json(bad, "here"), InputError);
}

}  // namespace
}  // namespace lagsieve
