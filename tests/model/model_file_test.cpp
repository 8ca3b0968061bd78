// The model file: a round trip keeps every number; another version, a missing field or a
// non-finite number is refused with a message naming the field.
#include <gtest/gtest.h>

#include "core/error.h"
#include "forecast/model_file.h"

namespace lagsieve {
namespace {

FittedModel sample_model() {
  FittedModel m;
  m.spec.inputs = {{"temp", {1, 1, 1}}};
  m.spec.noise = {1, 1, 0, 0, 1};
  m.params = zero_params(m.spec);
  m.params.constant = 0.1;
  m.params.inputs[0] = {{-5.0, 1.25}, {0.6}};
  m.params.phi = {0.7};
  m.params.theta = {0.3};
  m.params.sigma2 = 64.0 / 3.0;
  InputUse use;
  use.name = "temp";
  use.future = FutureMode::forecast;
  m.inputs = {use};
  InputModel own;
  own.input = "temp";
  own.p = 1;
  own.phi = {0.8};
  own.sigma2 = 4.0;
  m.input_models = {own};
  m.param_names = {"temp.delta1"};
  m.covariance = Eigen::MatrixXd::Constant(1, 1, 0.01);
  m.training.rows = 100;
  m.training.target_column = "heat";
  return m;
}

std::string refusal(const nlohmann::json& doc) {
  try {
    fitted_model_from_json(doc, "model.json");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(ModelFile, RoundTripKeepsEveryNumber) {
  const auto m = sample_model();
  const auto back = fitted_model_from_json(to_json(m), "model.json");
  EXPECT_EQ(back.spec, m.spec);
  EXPECT_EQ(back.params.inputs[0].omega, m.params.inputs[0].omega);
  EXPECT_EQ(back.params.inputs[0].delta, m.params.inputs[0].delta);
  EXPECT_EQ(back.params.sigma2, m.params.sigma2);
  EXPECT_EQ(back.input_models[0].phi, m.input_models[0].phi);
  EXPECT_EQ(back.inputs[0].future, FutureMode::forecast);
  EXPECT_EQ(back.covariance(0, 0), 0.01);
}

TEST(ModelFile, RefusesOtherVersionsMissingFieldsAndNonFiniteNumbers) {
  auto doc = to_json(sample_model());
  auto other = doc;
  other["version"] = 99;
  EXPECT_NE(refusal(other).find("version 99 is not supported"), std::string::npos) << refusal(other);
  auto missing = doc;
  missing["params"].erase("sigma2");
  EXPECT_NE(refusal(missing).find("'params.sigma2' is missing"), std::string::npos) << refusal(missing);
  auto infinite = doc;
  infinite["params"]["phi"][0] = nullptr;  // JSON has no infinity; a writer would emit null
  EXPECT_NE(refusal(infinite).find("'params.phi[0]' must be a finite number"), std::string::npos)
      << refusal(infinite);
  auto foreign = doc;
  foreign["format"] = "something-else";
  EXPECT_NE(refusal(foreign).find("not a lagsieve model file"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
