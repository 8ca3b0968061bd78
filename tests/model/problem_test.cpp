// make_problem refuses what a fit cannot estimate, with a message that names the input and says
// what to do: too few observations for the lags asked, a constant input, inputs that are linear
// combinations of one another (or of the constant).
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "core/error.h"
#include "model/likelihood.h"

namespace lagsieve {
namespace {

// 80 rows: a target and three inputs that are not collinear (two sines of different periods and
// a trend); the tests add derived columns.
SeriesData base_data() {
  SeriesData d;
  d.target_name = "y";
  for (int t = 0; t < 80; ++t) d.target.push_back(std::sin(0.3 * t) + 0.01 * t * t);
  d.input_names = {"a", "b", "c"};
  d.inputs.resize(3);
  for (int t = 0; t < 80; ++t) {
    d.inputs[0].push_back(std::sin(0.5 * t));
    d.inputs[1].push_back(std::cos(0.21 * t));
    d.inputs[2].push_back(0.1 * t);
  }
  return d;
}

void add_input(SeriesData& d, const std::string& name, std::vector<double> values) {
  d.input_names.push_back(name);
  d.inputs.push_back(std::move(values));
}

ModelSpec spec_with(const std::vector<std::string>& inputs, bool constant) {
  ModelSpec spec;
  for (const auto& name : inputs) spec.inputs.push_back({name, {0, 0, 0}});
  spec.noise.p = 1;
  spec.constant = constant;
  return spec;
}

std::string message_of(const SeriesData& d, const ModelSpec& spec) {
  try {
    make_problem(d, spec);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(Problem, SeparableInputsAreAccepted) {
  const auto d = base_data();
  EXPECT_NO_THROW(make_problem(d, spec_with({"a", "b", "c"}, true)));
  // The same input at another delay is a different column: not collinear.
  auto spec = spec_with({"a"}, true);
  spec.inputs[0].order.delay = 3;
  EXPECT_NO_THROW(make_problem(d, spec));
}

TEST(Problem, CollinearInputsAreNamed) {
  auto d = base_data();
  std::vector<double> mix(80);
  for (int t = 0; t < 80; ++t) mix[t] = 2.0 * d.inputs[0][t] - 0.5 * d.inputs[2][t];
  add_input(d, "mix", mix);
  const auto msg = message_of(d, spec_with({"a", "b", "c", "mix"}, true));
  EXPECT_NE(msg.find("input 'mix' is (nearly) a linear combination of input 'a', input 'c' over"),
            std::string::npos)
      << msg;
  EXPECT_NE(msg.find("leave one of them out"), std::string::npos) << msg;
}

TEST(Problem, CollinearityIsJudgedOnTheLaggedColumns) {
  auto d = base_data();
  std::vector<double> mix(80), a_lag1(80, 0.0);
  for (int t = 0; t < 80; ++t) mix[t] = 2.0 * d.inputs[0][t] - 0.5 * d.inputs[2][t];
  for (int t = 1; t < 80; ++t) a_lag1[t] = d.inputs[0][t - 1];
  add_input(d, "mix", mix);
  add_input(d, "a_lag1", a_lag1);
  // mix two steps late is not a combination of a and c now.
  auto spec = spec_with({"a", "c", "mix"}, true);
  spec.inputs[2].order.delay = 2;
  EXPECT_EQ(message_of(d, spec), "");
  // a at delay 1 is the column a_lag1 at delay 0.
  spec = spec_with({"a", "a_lag1"}, true);
  spec.inputs[0].order.delay = 1;
  const auto msg = message_of(d, spec);
  EXPECT_NE(msg.find("input 'a_lag1' is (nearly) a linear combination of input 'a' at lag 1 over"),
            std::string::npos)
      << msg;
}

TEST(Problem, AnInputThatIsTheConstantShiftedIsNamedWithTheConstant) {
  auto d = base_data();
  std::vector<double> shifted(80);
  for (int t = 0; t < 80; ++t) shifted[t] = 3.0 * d.inputs[1][t] + 7.0;
  add_input(d, "b_scaled", shifted);
  // With a constant, b_scaled = 3 b + 7 is a combination of the constant and b.
  auto msg = message_of(d, spec_with({"b", "b_scaled"}, true));
  EXPECT_NE(msg.find("input 'b_scaled' is (nearly) a linear combination of the constant, input "
                     "'b' over"),
            std::string::npos)
      << msg;
  // Without a constant the two columns are separable (7 is not 3 b).
  EXPECT_EQ(message_of(d, spec_with({"b", "b_scaled"}, false)), "");
}

TEST(Problem, ConstantInputIsNamed) {
  auto d = base_data();
  add_input(d, "flat", std::vector<double>(80, 4.0));
  const auto msg = message_of(d, spec_with({"a", "flat"}, true));
  EXPECT_NE(msg.find("input 'flat' is constant over the estimation sample"), std::string::npos)
      << msg;
}

TEST(Problem, AZeroInputWithoutAConstantIsNamed) {
  // An input that is zero but for its last row is not constant over the estimation sample, yet
  // one step late it is zero at every row: a column with nothing before it to be a combination
  // of (without a constant) once crashed the collinearity check.
  auto d = base_data();
  std::vector<double> pulse(80, 0.0);
  pulse.back() = 5.0;
  add_input(d, "pulse", pulse);
  for (const bool constant : {false, true}) {
    auto spec = spec_with({"pulse"}, constant);
    spec.inputs[0].order.delay = 1;
    const auto msg = message_of(d, spec);
    EXPECT_NE(msg.find("input 'pulse' at lag 1 is zero at every row of the estimation sample"),
              std::string::npos)
        << msg;
    EXPECT_NE(msg.find("leave it out, use another delay or check the column"), std::string::npos)
        << msg;
  }
}

TEST(Problem, AnInputTooLargeToComputeWithIsNamed) {
  // Values near 1e200 square to beyond the largest double: the check cannot measure the column
  // and says so instead of reading the overflow as collinearity.
  auto d = base_data();
  std::vector<double> huge(80);
  for (int t = 0; t < 80; ++t) huge[t] = 1e200 * (1.0 + d.inputs[0][t]);
  add_input(d, "huge", huge);
  const auto msg = message_of(d, spec_with({"huge"}, true));
  EXPECT_NE(msg.find("input 'huge' has values too large to compute with"), std::string::npos)
      << msg;
  EXPECT_NE(msg.find("rescale the column"), std::string::npos) << msg;
}

TEST(Problem, LagsBeyondTheSeriesAreRefused) {
  const auto d = base_data();
  auto spec = spec_with({"a"}, true);
  spec.inputs[0].order.delay = 76;
  const auto msg = message_of(d, spec);
  EXPECT_NE(msg.find("series 'y': only 4 observations remain"), std::string::npos) << msg;
  EXPECT_NE(msg.find("Use smaller orders or delays, or more data"), std::string::npos) << msg;
}

}  // namespace
}  // namespace lagsieve
