// A fit on a small fuzzed series: the first bytes choose the model (AR and MA orders, one input
// with a delay and a denominator, the constant), the rest are the target and input values. The
// fit must end with a status (never an exception other than a refusal) and, when usable, its
// model must forecast a few steps.
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <vector>

#include "forecast/forecast.h"
#include "fuzz_support.h"
#include "model/fit.h"
#include "model/likelihood.h"

namespace {

constexpr int kMaxRows = 40;

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 4) return 0;
  const std::uint8_t shape = data[0], inputs = data[1];
  lagsieve::LikelihoodProblem problem;
  problem.spec.noise.p = shape & 1;
  problem.spec.noise.q = (shape >> 1) & 1;
  problem.spec.constant = (shape >> 2) & 1;
  const bool with_input = inputs & 1;
  if (with_input) problem.spec.inputs = {{"x", {(inputs >> 1) & 1, 0, (inputs >> 2) & 1}}};
  // Values: 2 bytes each (target, then input) as a signed 16-bit integer scaled by 1/100; a byte
  // of 0x7f 0xff reads as a huge spike, so outliers are covered.
  const std::size_t per_row = with_input ? 4 : 2;
  const int rows = static_cast<int>(std::min<std::size_t>((size - 2) / per_row, kMaxRows));
  std::vector<double> y, x;
  for (int t = 0; t < rows; ++t) {
    const std::uint8_t* at = data + 2 + static_cast<std::size_t>(t) * per_row;
    std::int16_t v;
    std::memcpy(&v, at, 2);
    y.push_back(v / 100.0);
    if (with_input) {
      std::memcpy(&v, at + 2, 2);
      x.push_back(v / 100.0);
    }
  }
  problem.w = y;
  if (with_input) problem.u = {x};
  problem.start = lagsieve::minimum_start(problem.spec);
  if (problem.n_obs() < problem.n_params() + 2) return 0;
  lagsieve::fuzz::refusals_only([&] {
    lagsieve::FitOptions options;
    options.max_evaluations = 80;
    const auto fit = lagsieve::fit_model(problem, options);
    if (!fit.usable()) return;
    lagsieve::FittedModel model;
    model.spec = fit.spec;
    model.params = fit.params;
    model.start = fit.start;
    if (with_input) {
      lagsieve::InputUse use;
      use.name = "x";
      model.inputs = {use};
    }
    lagsieve::SeriesData history;
    history.target_name = "y";
    history.target = y;
    std::vector<lagsieve::InputFuture> futures;
    if (with_input) {
      history.input_names = {"x"};
      history.inputs = {x};
      futures.push_back({"x", {x[0], x[1], x[2]}});
    }
    lagsieve::ForecastOptions fo;
    fo.horizon = 3;
    lagsieve::forecast(model, history, futures, fo);
  });
  return 0;
}
