#pragma once
// The terminal tables of `lagsieve forecast`: plain text, numbers right-aligned with one number
// of decimals per table, steps numbered from 1.
//
// One scenario: per level the interval with the inputs as treated (forecast where no future
// values were given) beside the interval with every input known, and the share of the widest
// interval's width that forecasting the inputs adds (1 - width known / width forecast).
// Several scenarios: the baseline (inputs forecast) and each scenario side by side, each
// scenario's median with its difference from the baseline's.
#include <string>
#include <utility>
#include <vector>

#include "forecast/forecast.h"

namespace lagsieve {

// Decimals that show about five significant digits of the largest |value| (0..6).
int table_decimals(const std::vector<double>& values);

std::string forecast_table(const ForecastResult& r);

struct NamedForecast {
  std::string name;
  ForecastResult result;
};
// `baseline` null: no baseline (it could not be made); then scenarios only, without differences.
std::string scenario_table(const ForecastResult* baseline,
                           const std::vector<NamedForecast>& scenarios);

}  // namespace lagsieve
