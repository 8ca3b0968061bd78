// A fit on a small fuzzed series: the first two bytes choose the model and which parts of the fit
// run, the rest are the target and input values. The fit must end with a status (never an
// exception other than a refusal) and, when usable, its model must forecast a few steps.
//
// Cost per input is what limits this target (every input is an exact-ML fit under ASan +
// UBSan), so the series is short, each optimiser start has a small budget, and the expensive
// parts a fit can skip (standard errors, diagnostics, extra starts) run only where a bit asks
// for them: every path is still reached, on a share of the inputs.
//
//   byte 0  bit 0: an AR term     bit 1: an MA term      bit 2: a constant   bit 3: a second AR
//   term byte 1  bit 0: one input      bit 1: delay 1         bit 2: a denominator  bit 3: a
//   numerator lag
//           bit 4: standard errors  bit 5: diagnostics   bit 6: extra starts
//           bit 7: the residual-input check (with diagnostics)
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <vector>

#include "forecast/forecast.h"
#include "fuzz_support.h"
#include "model/fit.h"
#include "model/likelihood.h"

namespace {

constexpr int kMaxRows = 24;
constexpr int kEvaluationsPerStart = 30;

bool bit(std::uint8_t byte, int i) { return (byte >> i) & 1; }

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 4) return 0;
  const std::uint8_t shape = data[0], parts = data[1];
  lagsieve::LikelihoodProblem problem;
  problem.spec.noise.p = int(bit(shape, 0)) + int(bit(shape, 3));
  problem.spec.noise.q = bit(shape, 1);
  problem.spec.constant = bit(shape, 2);
  const bool with_input = bit(parts, 0);
  if (with_input) problem.spec.inputs = {{"x", {bit(parts, 1), bit(parts, 3), bit(parts, 2)}}};
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
    options.max_evaluations = kEvaluationsPerStart;
    options.standard_errors = bit(parts, 4);
    options.diagnostics = bit(parts, 5);
    options.multi_start = bit(parts, 6);
    options.residual_input_check = bit(parts, 7);
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
