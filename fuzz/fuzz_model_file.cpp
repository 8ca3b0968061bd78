// The model-file reader: fuzzed text parsed as a model file. A file that is accepted must also
// forecast a few steps from a short history without a crash, and the forecast must be finite:
// the load-time checks promise exactly that.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "forecast/forecast.h"
#include "forecast/model_file.h"
#include "fuzz_support.h"

namespace {

// Coefficients and variances of ordinary size: a forecast from them must be finite (a file may
// legally hold 1e300, whose forecast overflows; that is not what this checks).
bool moderate(const lagsieve::FittedModel& m) {
  const auto ok = [](double v) { return std::abs(v) <= 1e6; };
  const auto all = [&](const std::vector<double>& v) {
    for (double x : v)
      if (!ok(x)) return false;
    return true;
  };
  const auto& p = m.params;
  bool fine = ok(p.constant) && ok(p.sigma2) && all(p.phi) && all(p.theta) && all(p.seasonal_phi) &&
              all(p.seasonal_theta);
  for (const auto& ip : p.inputs) fine = fine && all(ip.omega) && all(ip.delta);
  for (const auto& im : m.input_models)
    fine = fine && ok(im.mean) && ok(im.sigma2) && all(im.phi) && all(im.theta);
  return fine;
}

// 80 rows with every input of the model as a smooth positive column (events too, so a model
// with an event needs no time stamps), and 3 future values of each.
void forecast_a_little(const lagsieve::FittedModel& model) {
  lagsieve::SeriesData history;
  history.target_name = "y";
  for (int t = 0; t < 80; ++t) history.target.push_back(50.0 + 5.0 * std::sin(0.4 * t) + 0.01 * t);
  std::vector<lagsieve::InputFuture> futures;
  for (const auto& term : model.spec.inputs) {
    history.input_names.push_back(term.name);
    std::vector<double> column;
    for (int t = 0; t < 83; ++t) column.push_back(10.0 + std::cos(0.3 * t + 1.0));
    history.inputs.emplace_back(column.begin(), column.begin() + 80);
    futures.push_back({term.name, std::vector<double>(column.begin() + 80, column.end())});
  }
  lagsieve::ForecastOptions options;
  options.horizon = 3;
  const auto f = lagsieve::forecast(model, history, futures, options);
  if (!moderate(model)) return;
  for (size_t s = 0; s < f.level.size(); ++s)
    if (!std::isfinite(f.level[s]) || !std::isfinite(f.se[s]) || f.se[s] < 0.0) {
      std::fprintf(stderr, "fuzz: an accepted model forecast %g (se %g) at step %zu\n", f.level[s],
                   f.se[s], s + 1);
      std::abort();
    }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  lagsieve::fuzz::refusals_only([&] {
    const auto model = lagsieve::parse_model_text(text, "fuzz.json");
    // Large but valid orders (delay 500, period 1000) are legal yet slow to forecast; the
    // property is checked on the models a fuzzer reaches quickly.
    if (model.spec.noise.period * (model.spec.noise.seasonal_p + model.spec.noise.seasonal_q) > 60)
      return;
    for (const auto& t : model.spec.inputs)
      if (t.order.delay + t.order.numerator > 60) return;
    forecast_a_little(model);
  });
  return 0;
}
