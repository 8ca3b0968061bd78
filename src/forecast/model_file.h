#pragma once
// The model file: a versioned, human-readable JSON document holding everything needed to
// forecast with no other file, and the JSON summaries of a fit.
#include <filesystem>
#include <nlohmann/json.hpp>

#include "forecast/fitted_model.h"
#include "model/fit.h"

namespace lagsieve {

inline constexpr const char* kModelFormat = "lagsieve-model";
inline constexpr int kModelFormatVersion = 1;

nlohmann::json to_json(const FittedModel& model);
// Throws InputError naming `source` and the field path for another format or version, a missing
// field, a wrong JSON type, a non-finite number, and any content check_fitted_model refuses.
FittedModel fitted_model_from_json(const nlohmann::json& doc, const std::string& source);

// Parses the text of a model file (`source` names it in messages): invalid JSON, a number beyond
// double (named by its field path) and every failure of fitted_model_from_json and
// check_fitted_model (forecast/model_checks.h) are InputErrors.
FittedModel parse_model_text(const std::string& text, const std::string& source);

// Written to a temporary name and renamed.
void save_model(const std::filesystem::path& path, const FittedModel& model);
FittedModel load_model(const std::filesystem::path& path);

// One JSON object describing a fit (the `fit --json` output and the search's rows).
nlohmann::json fit_to_json(const FitResult& fit);

}  // namespace lagsieve
