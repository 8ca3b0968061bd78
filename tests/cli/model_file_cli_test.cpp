// `forecast` against damaged model files: a file written by `fit --save`, edited in one field,
// must be refused with exit 2, the file name and the field path (before these checks several
// crashed with a segfault or exit 3, or forecast NaN).
#include <gtest/gtest.h>

#include <unistd.h>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using lagsieve::testing::slurp;
using nlohmann::json;
const auto run = lagsieve::testing::run_lagsieve;

// One folder per process: CTest runs the tests of this file in parallel processes.
const fs::path kDir =
    fs::temp_directory_path() / ("lagsieve_cli_model_file_" + std::to_string(::getpid()));

// 120 daily rows: heat driven by temperature one day later; temperature is forecast by its own
// model (so the file holds an input model), noise ARMA(1, 1).
void write_fixture() {
  fs::remove_all(kDir);
  fs::create_directories(kDir);
  std::ofstream csv(kDir / "data.csv");
  csv << "t,heat,temp\n";
  double temp = 0.0, noise = 0.0;
  for (int t = 0; t < 120; ++t) {
    const double prev = temp;
    temp = 0.7 * temp + std::sin(1.7 * t) + 0.5 * std::cos(0.37 * t * t);
    noise = 0.5 * noise + std::sin(2.9 * t + 0.3 * t * t);
    csv << t + 1 << "," << 100.0 - 3.0 * prev + noise << "," << temp << "\n";
  }
  std::ofstream(kDir / "cfg.yaml") << R"(data: {file: data.csv, time: t}
target: {column: heat}
inputs:
  - column: temp
    delay: 1
    denominator: 1
    future: forecast
noise: {ar: 1, ma: 1}
output: {dir: out}
)";
}

class ModelFileCli : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    write_fixture();
    const auto r = run(kDir, "fit cfg.yaml --save model.json");
    ASSERT_EQ(r.code, 0) << r.err;
    base_ = json::parse(slurp(kDir / "model.json"));
  }
  static void TearDownTestSuite() { fs::remove_all(kDir); }
  // Writes `doc` (or `text`) as bad.json and runs `forecast` on it.
  static lagsieve::testing::CommandResult forecast_text(const std::string& text) {
    std::ofstream(kDir / "bad.json") << text;
    return run(kDir, "forecast bad.json --data data.csv --horizon 4");
  }
  static void expect_refused(const std::function<void(json&)>& edit, const std::string& field) {
    json doc = base_;
    edit(doc);
    const auto r = forecast_text(doc.dump(2));
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_NE(r.err.find("lagsieve: error: bad.json: model file field '" + field + "'"),
              std::string::npos)
        << "expected field " << field << "\nstderr: " << r.err;
  }
  static json base_;
};

json ModelFileCli::base_;

TEST_F(ModelFileCli, TheSavedFileForecasts) {
  const auto r = run(kDir, "forecast model.json --data data.csv --horizon 4");
  EXPECT_EQ(r.code, 0) << r.err;
  ASSERT_EQ(base_["input_models"].size(), 1u);
}

TEST_F(ModelFileCli, NonStationaryOwnInputModel) {
  for (const double phi : {2.0, -3.0, 135.0})
    expect_refused(
        [phi](json& d) {
          d["input_models"][0]["p"] = 1;
          d["input_models"][0]["phi"] = {phi};
        },
        "input_models[0].phi");
}

TEST_F(ModelFileCli, NoiseAndTransferPolynomialsAndVariances) {
  expect_refused([](json& d) { d["params"]["phi"] = {1.5}; }, "params.phi");
  expect_refused([](json& d) { d["params"]["inputs"][0]["delta"] = {3.0}; },
                 "params.inputs[0].delta");
  expect_refused([](json& d) { d["params"]["sigma2"] = -1.0; }, "params.sigma2");
}

TEST_F(ModelFileCli, OrdersTypesAndRanges) {
  expect_refused([](json& d) { d["spec"]["inputs"][0]["delay"] = -1; }, "spec.inputs[0].delay");
  expect_refused([](json& d) { d["spec"]["noise"]["p"] = -1; }, "spec.noise.p");
  expect_refused([](json& d) { d["spec"]["inputs"][0]["event"] = 0; }, "spec.inputs[0].event");
  expect_refused([](json& d) { d["covariance"]["names"] = 3; }, "covariance.names");
}

TEST_F(ModelFileCli, NumbersBeyondDouble) {
  auto text = base_.dump(2);
  const auto at = text.find("\"delay\": 1");
  ASSERT_NE(at, std::string::npos);
  text.replace(at, 10, "\"delay\": 1e999");
  auto r = forecast_text(text);
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("bad.json: model file field 'spec.inputs[0].delay' is 1e999"),
            std::string::npos)
      << r.err;
  text = base_.dump();
  const auto s = text.find("\"sigma2\":");
  text.insert(s + 9, "1e400,\"x\":");
  r = forecast_text(text);
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("bad.json: model file field 'input_models[0].sigma2' is 1e400"),
            std::string::npos)
      << r.err;
}

TEST_F(ModelFileCli, DirectoryAsModelFile) {
  fs::create_directories(kDir / "a_folder");
  const auto r = run(kDir, "forecast a_folder --data data.csv --horizon 4");
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("a_folder: is a folder, not a model file"), std::string::npos) << r.err;
}

}  // namespace
