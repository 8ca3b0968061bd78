#pragma once
// The re-validation part of the report, for a reader: the verdict and its reasons first, then one
// section per question the re-validation asks (is the deployed model still accurate; did its
// parameters drift; do the new rows' residuals look like the model's; is there a better model),
// each with a sentence that gives the numbers and a table with plain labels and units, and a
// chart of the new rows' actual values against the deployed model's one-step forecasts.
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "report/html.h"

namespace lagsieve {

// Sections from revalidation.json (`file` names it in messages). Throws InputError naming the
// file and the field when the verdict is missing or a field has the wrong type.
std::vector<HtmlSection> revalidation_sections(const nlohmann::json& doc, const std::string& file);

// The new-period chart as a standalone <svg> ("" when the file has no new_period block): the
// last stretch of history as a thin line, then per scored row the interval of each level as a
// capsule (widest lightest), the forecast as an open diamond and the actual value as a dot,
// vermillion when it falls outside the widest interval.
std::string new_period_chart_svg(const nlohmann::json& doc, const std::string& target_label);

}  // namespace lagsieve
