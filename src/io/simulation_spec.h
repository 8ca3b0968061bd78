#pragma once
// The YAML file of `lagsieve simulate`: a transfer-function model with known structure, read into
// a SimulationSpec (model/simulate.h), and the CSV the command writes from the simulated series.
//
//   target: heat_mwh            # name of the simulated series (default y)
//   n: 1096                     # rows (default 500)
//   seed: 7                     # default 1
//   start_date: 2022-01-01      # optional; without it the time column holds 1..n
//   frequency: daily            # daily | weekly (with start_date)
//   time_column: date           # CSV header of the time column (default: date, or t)
//   decimals: 3                 # digits after the point in the CSV (default 4)
//   burn_in: 300                # discarded start (default 300)
//   constant: 400
//   noise: {ar: [0.7], ma: [0.3], seasonal_ar: [], seasonal_ma: [], period: 7, sigma: 8}
//   integrate: {regular: 0, seasonal: 0, period: 7}
//   inputs:
//     - {name: temp, delay: 1, omega: [-5], delta: [0.6], mean: 9, ar: 0.8, sd: 2,
//        cycle: {amplitude: 8, period: 365.25, peak: 196}}
//     - {name: tariff, event: step, at: 2023-10-01, delay: 0, omega: [-15]}
//
// Only this layer's headers and plain structs of the model layer are used here, so the parser
// needs no model code at link time; the model's own checks (stationarity, stability) run in
// simulate().
#include <filesystem>
#include <string>
#include <string_view>

#include "core/series.h"
#include "model/simulate.h"

namespace lagsieve {

struct SimulationFile {
  SimulationSpec spec;
  std::string time_column;  // CSV header of the time column ("date" with dates, "t" without)
  int decimals = 4;         // digits after the decimal point in the CSV
};

// Parses YAML text as the content of `source` (used in messages). Every problem is an InputError
// "<source>:<line>: <key path>: <what is wrong>"; unknown keys suggest the closest valid one.
SimulationFile parse_simulation_spec(std::string_view yaml_text, const std::string& source);

// Reads and parses a file; a missing or unreadable file is an InputError naming the path.
SimulationFile load_simulation_spec(const std::filesystem::path& file);

// The CSV text of a simulated data set: the time column, the target, then the column inputs in
// spec order. Event inputs are left out: a run config regenerates them from `event:` entries.
std::string simulated_csv(const SimulationFile& file, const SeriesData& data);

}  // namespace lagsieve
