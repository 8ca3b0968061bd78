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
  m.params.inputs[0] = {{-5.0, 1.25}, {0.6}, {0.375}};  // an estimated filter start
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
  EXPECT_EQ(back.spec.filter_start, FilterStart::estimated);
  EXPECT_EQ(back.params.inputs[0].state, m.params.inputs[0].state);
  auto restricted = m;
  restricted.spec.estimation = Estimation::restricted;
  EXPECT_EQ(fitted_model_from_json(to_json(restricted), "model.json").spec.estimation,
            Estimation::restricted);
}

TEST(ModelFile, FilesWithoutAFilterStartLoadAsAZeroStart) {
  // Written before the start states existed: those models were fitted from a zero start.
  auto doc = to_json(sample_model());
  doc["spec"].erase("filter_start");
  doc["params"]["inputs"][0].erase("state");
  const auto back = fitted_model_from_json(doc, "model.json");
  EXPECT_EQ(back.spec.filter_start, FilterStart::zero);
  EXPECT_TRUE(back.params.inputs[0].state.empty());
  EXPECT_EQ(back.spec.estimation, Estimation::ml);  // no key: fitted by ML
  doc = to_json(sample_model());
  doc["params"]["inputs"][0]["state"] = {0.1, 0.2};
  EXPECT_NE(refusal(doc).find("params.inputs[0].state"), std::string::npos) << refusal(doc);
}

TEST(ModelFile, RefusesOtherVersionsMissingFieldsAndNonFiniteNumbers) {
  auto doc = to_json(sample_model());
  auto other = doc;
  other["version"] = 99;
  EXPECT_NE(refusal(other).find("version 99 is not supported"), std::string::npos)
      << refusal(other);
  auto missing = doc;
  missing["params"].erase("sigma2");
  EXPECT_NE(refusal(missing).find("'params.sigma2' is missing"), std::string::npos)
      << refusal(missing);
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

namespace lagsieve {
namespace {

// Each case edits one field of a valid model file; the refusal must name the field path.
struct Defect {
  const char* name;
  void (*edit)(nlohmann::json&);
  const char* expected;
};

const Defect kDefects[] = {
    {"InputModelPhi2", [](nlohmann::json& d) { d["input_models"][0]["phi"] = {2.0}; },
     "'input_models[0].phi' is not stationary"},
    {"InputModelPhiMinus3", [](nlohmann::json& d) { d["input_models"][0]["phi"] = {-3.0}; },
     "'input_models[0].phi' is not stationary"},
    {"InputModelPhi135", [](nlohmann::json& d) { d["input_models"][0]["phi"] = {135.0}; },
     "'input_models[0].phi' is not stationary"},
    {"NoisePhiUnitRoot", [](nlohmann::json& d) { d["params"]["phi"] = {1.0}; },
     "'params.phi' is not stationary"},
    {"NoiseThetaOutside", [](nlohmann::json& d) { d["params"]["theta"] = {2.5}; },
     "'params.theta' is not invertible"},
    {"DeltaThree", [](nlohmann::json& d) { d["params"]["inputs"][0]["delta"] = {3.0}; },
     "'params.inputs[0].delta' is not stable"},
    {"SigmaNegative", [](nlohmann::json& d) { d["params"]["sigma2"] = -1.0; },
     "'params.sigma2' is -1; a variance must be a positive number"},
    {"InputSigmaZero", [](nlohmann::json& d) { d["input_models"][0]["sigma2"] = 0.0; },
     "'input_models[0].sigma2' is 0"},
    {"DelayNegative", [](nlohmann::json& d) { d["spec"]["inputs"][0]["delay"] = -1; },
     "'spec.inputs[0].delay' is -1; it must be between 0 and 500"},
    {"NoisePNegative", [](nlohmann::json& d) { d["spec"]["noise"]["p"] = -1; },
     "'spec.noise.p' is -1; it must be between 0 and 24"},
    {"IntegerBeyondInt", [](nlohmann::json& d) { d["spec"]["noise"]["q"] = 99999999999LL; },
     "'spec.noise.q' must be a whole number"},
    {"EventFlagNumber", [](nlohmann::json& d) { d["spec"]["inputs"][0]["event"] = 1; },
     "'spec.inputs[0].event' must be true or false, not the number 1"},
    {"InputsNotAList", [](nlohmann::json& d) { d["spec"]["inputs"] = nlohmann::json::object(); },
     "'spec.inputs' must be a list"},
    {"PhiAString", [](nlohmann::json& d) { d["params"]["phi"] = "0.7"; },
     "'params.phi' must be a list, not a string"},
    {"NamesNumbers",
     [](nlohmann::json& d) {
       d["covariance"]["names"] = {1, 2};
     },
     "'covariance.names[0]' must be a string"},
    {"CovarianceRowShort",
     [](nlohmann::json& d) { d["covariance"]["matrix"][0] = nlohmann::json::array(); },
     "'covariance.matrix[0]' must be a list of 1 numbers"},
    {"CovarianceNegativeVariance",
     [](nlohmann::json& d) { d["covariance"]["matrix"][0][0] = -0.5; },
     "'covariance.matrix[0][0]' is -0.5"},
    {"PhiTooMany",
     [](nlohmann::json& d) {
       d["params"]["phi"] = {0.1, 0.1};
     },
     "'params.phi' has 2 coefficients where spec.noise.p gives 1"},
    {"OmegaTooFew", [](nlohmann::json& d) { d["params"]["inputs"][0]["omega"] = {1.0}; },
     "'params.inputs[0].omega' has 1 coefficient where spec.inputs[0].numerator + 1 gives 2"},
    {"InputModelUnknownInput", [](nlohmann::json& d) { d["input_models"][0]["input"] = "rain"; },
     "'input_models[0].input' 'rain' is not an input"},
    {"SeasonalWithoutPeriod", [](nlohmann::json& d) { d["spec"]["noise"]["seasonal_p"] = 1; },
     "'spec.noise.period' is 1; it must be between 2 and 1000"},
    {"VersionAString", [](nlohmann::json& d) { d["version"] = "1"; },
     "'version' must be a whole number"},
    {"SpecAList", [](nlohmann::json& d) { d["spec"] = nlohmann::json::array(); },
     "'spec' must be an object"},
    {"StatusNumber", [](nlohmann::json& d) { d["fit"]["status"] = 0; },
     "'fit.status' must be a string"},
    {"ChosenByAicString", [](nlohmann::json& d) { d["input_models"][0]["chosen_by_aic"] = "yes"; },
     "'input_models[0].chosen_by_aic' must be true or false, not a string (\"yes\")"},
};

class ModelFileDefect : public ::testing::TestWithParam<Defect> {};

TEST_P(ModelFileDefect, RefusedNamingTheFieldPath) {
  auto doc = to_json(sample_model());
  GetParam().edit(doc);
  const auto message = refusal(doc);
  EXPECT_NE(message.find(std::string("model.json: model file field ") + GetParam().expected),
            std::string::npos)
      << message;
}

INSTANTIATE_TEST_SUITE_P(Table, ModelFileDefect, ::testing::ValuesIn(kDefects),
                         [](const auto& p) { return std::string(p.param.name); });

TEST(ModelFile, SampleIsValid) { EXPECT_EQ(refusal(to_json(sample_model())), ""); }

TEST(ModelFile, UnitMaRootOfABoundaryFitLoads) {
  auto doc = to_json(sample_model());
  doc["params"]["theta"] = {1.0};  // fits can end on the invertibility boundary
  EXPECT_EQ(refusal(doc), "");
}

std::string text_refusal(const std::string& text) {
  try {
    parse_model_text(text, "model.json");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(ModelFile, NumberBeyondDoubleIsNamedByItsPath) {
  const auto text = to_json(sample_model()).dump(2);
  const auto at = text.find("\"sigma2\": ");  // the first is input_models[0].sigma2
  ASSERT_NE(at, std::string::npos);
  auto edited = text;
  edited.insert(at + 10, "1e999, \"was\": ");
  EXPECT_NE(text_refusal(edited).find(
                "model file field 'input_models[0].sigma2' is 1e999, beyond the range"),
            std::string::npos)
      << text_refusal(edited);
  auto edited2 = text;
  const auto d = edited2.find("\"delay\": 1");
  ASSERT_NE(d, std::string::npos);
  edited2.replace(d, 10, "\"delay\": -1e400");
  EXPECT_NE(text_refusal(edited2).find("'spec.inputs[0].delay' is -1e400"), std::string::npos)
      << text_refusal(edited2);
  EXPECT_NE(text_refusal("{\"format\": ").find("model.json: not valid JSON"), std::string::npos);
  EXPECT_EQ(text_refusal(text), "");
}

}  // namespace
}  // namespace lagsieve

namespace lagsieve {
namespace {

// Model files written before the parameters took the names of core/spec.h (ar1, ma1, sar1,
// sma1) still load, with today's names (phi1, theta1, Phi1, Theta1).
TEST(ModelFile, OldParameterNamesLoadAsTodays) {
  auto doc = to_json(sample_model());
  doc["covariance"]["names"] = {"ar1", "ma1", "sar1", "sma12", "temp.omega0"};
  doc["covariance"]["matrix"] = nlohmann::json::array();
  for (int i = 0; i < 5; ++i) {
    std::vector<double> row(5, 0.0);
    row[static_cast<size_t>(i)] = 0.01;
    doc["covariance"]["matrix"].push_back(row);
  }
  const FittedModel m = fitted_model_from_json(doc, "old.json");
  EXPECT_EQ(m.param_names,
            (std::vector<std::string>{"phi1", "theta1", "Phi1", "Theta12", "temp.omega0"}));
  // A model file written by the previous release, as it was (fuzz corpus seed).
  const FittedModel old = load_model(std::string(LAGSIEVE_SOURCE_DIR) +
                                     "/fuzz/corpus/fuzz_model_file/input_model.json");
  EXPECT_EQ(old.param_names,
            (std::vector<std::string>{"temp.delta1", "phi1", "theta1", "constant", "temp.omega0"}));
  EXPECT_EQ(current_parameter_name("marginal"), "marginal");
  EXPECT_EQ(current_parameter_name("ar"), "ar");
}

}  // namespace
}  // namespace lagsieve
