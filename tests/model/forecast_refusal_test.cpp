// A model whose AR polynomials are not stationary never reaches forecast() from a model file
// (check_fitted_model refuses it), but forecast() itself must refuse one built in code with a
// message instead of reading past an empty state (a segfault before).
#include <gtest/gtest.h>

#include <cmath>

#include "core/error.h"
#include "forecast/forecast.h"

namespace lagsieve {
namespace {

FittedModel model_with(std::vector<double> input_phi, std::vector<double> noise_phi) {
  FittedModel m;
  m.spec.inputs = {{"temp", {1, 0, 1}}};
  m.spec.noise = {1, 0, 0, 0, 1};
  m.params = zero_params(m.spec);
  m.params.constant = 1.0;
  m.params.inputs[0] = {{-2.0}, {0.5}};
  m.params.phi = std::move(noise_phi);
  m.params.sigma2 = 1.0;
  InputUse use;
  use.name = "temp";
  use.future = FutureMode::forecast;
  m.inputs = {use};
  InputModel own;
  own.input = "temp";
  own.p = 1;
  own.phi = std::move(input_phi);
  own.sigma2 = 1.0;
  m.input_models = {own};
  return m;
}

SeriesData history() {
  SeriesData h;
  h.target_name = "y";
  h.input_names = {"temp"};
  h.inputs.resize(1);
  for (int t = 0; t < 40; ++t) {
    h.target.push_back(10.0 + std::sin(0.3 * t));
    h.inputs[0].push_back(std::cos(0.2 * t));
  }
  return h;
}

std::string refusal(const FittedModel& m) {
  ForecastOptions options;
  options.horizon = 6;
  try {
    forecast(m, history(), {}, options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(ForecastRefusal, NonStationaryOwnInputModelIsAMessageNotACrash) {
  for (const double phi : {2.0, -3.0, 135.0}) {
    const auto message = refusal(model_with({phi}, {0.5}));
    EXPECT_NE(message.find("the own model of input 'temp' has a non-stationary AR polynomial"),
              std::string::npos)
        << "phi = " << phi << ": " << message;
  }
}

TEST(ForecastRefusal, NonStationaryNoiseModelIsAMessage) {
  EXPECT_NE(refusal(model_with({0.5}, {1.5})).find("the noise model has a non-stationary AR"),
            std::string::npos);
}

TEST(ForecastRefusal, StationaryModelForecasts) {
  EXPECT_EQ(refusal(model_with({0.5}, {0.5})), "");
}

}  // namespace
}  // namespace lagsieve
