#pragma once
// Detected effects as JSON: the fit output (`fit --json`, fit.json) and the model file share it.
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "outliers/detect.h"
#include "outliers/effects.h"

namespace lagsieve {

// {name, type, row, time, size, std_error, statistic, ambiguous_with[, decay][, ar, ma,
// differencing]}.
nlohmann::json effect_to_json(const OutlierEffect& effect);

// The inverse; throws InputError naming `where` and the field when it is missing or wrong.
OutlierEffect effect_from_json(const nlohmann::json& j, const std::string& where);

// The detection summary: {critical, critical_rule, rounds, ambiguity_rule, effects, dropped}.
nlohmann::json outliers_to_json(const OutlierFit& result);

// The rule of the default critical value, for output.
inline constexpr const char* kCriticalRule =
    "auto: Phi^-1(1 - 0.025 / (n m)), the Bonferroni bound at 5 % over the n observations and m "
    "types tested, at least 3";

}  // namespace lagsieve
