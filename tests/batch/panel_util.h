#pragma once
// A seeded long-format panel for the batch tests: series "zone_000", ... with their own start
// dates and lengths, the target `demand` driven by `temp` with a (b, r, s) that varies by series,
// and `rain`, which has no effect. Written as CSV text (one row per zone and day).
#include <string>
#include <vector>

#include <fmt/format.h>

#include "core/spec.h"
#include "model/simulate.h"

namespace lagsieve::testing {

struct PanelTruth {
  std::string key;
  InputOrder temp;  // b, s, r of temp
};

// The truth of series i: b = i % 4, s = (i / 4) % 2, r = (i / 8) % 2.
inline PanelTruth panel_truth(int i) {
  return {fmt::format("zone_{:03d}", i), {i % 4, (i / 4) % 2, (i / 8) % 2}};
}

inline SeriesData panel_series(int i, int rows) {
  const PanelTruth truth = panel_truth(i);
  SimulationSpec sim;
  sim.n = rows;
  sim.seed = 9000 + static_cast<std::uint64_t>(i);
  sim.noise = {1, 0, 0, 0, 1};
  sim.phi = {0.5};
  sim.constant = 10.0;
  sim.sigma = 1.0;
  // Each series starts on its own day, so the series cover different time ranges.
  sim.start_date = fmt::format("2021-{:02d}-{:02d}", 1 + i % 12, 1 + i % 28);
  SimulatedInput temp;
  temp.name = "temp";
  temp.order = truth.temp;
  temp.params.omega =
      truth.temp.numerator == 1 ? std::vector<double>{2.0, 1.2} : std::vector<double>{2.0};
  if (truth.temp.denominator == 1) temp.params.delta = {0.5};
  temp.sd = 1.0;
  SimulatedInput rain;
  rain.name = "rain";
  rain.params.omega = {0.0};
  rain.sd = 1.0;
  sim.inputs = {temp, rain};
  return simulate(sim);
}

// Rows of series 0..count-1 in long format, series after series (header included).
inline std::string panel_csv(int count, int rows) {
  std::string out = "zone,date,demand,temp,rain\n";
  for (int i = 0; i < count; ++i) {
    const SeriesData s = panel_series(i, rows);
    for (int t = 0; t < s.rows(); ++t)
      out += fmt::format("{},{},{:.10g},{:.10g},{:.10g}\n", panel_truth(i).key, s.time[t],
                         s.target[t], s.inputs[0][t], s.inputs[1][t]);
  }
  return out;
}

// The search grid of the panel tests: temp b 0..3, s 0..1, r 0..1; rain optional at lag 0;
// AR(0..1) noise with a constant (64 candidates per series).
inline std::string panel_config(const std::string& data_file, const std::string& extra = "") {
  return fmt::format(R"(data:
  file: {}
  time: date
  series_key: zone
target:
  column: demand
inputs:
  - column: temp
    delay: [0, 3]
    numerator: [0, 1]
    denominator: [0, 1]
  - column: rain
    optional: true
noise:
  ar: [0, 1]
  constant: true
search:
  criterion: bic
{})",
                     data_file, extra);
}

}  // namespace lagsieve::testing
