#pragma once
// The report's section on detected effects (outlier detection in a search): the history with
// each effect marked at its row, a table of the effects (type, time stamp, size, s.e.,
// statistic) and the ambiguity note for effects near the end of the data. Built from the
// `outliers` entry of fit.json (search_outliers_json), so it stands apart from the other sections.
#include <nlohmann/json.hpp>
#include <optional>
#include <string>

#include "report/html.h"

namespace lagsieve {

struct EffectsSection {
  HtmlSection section;    // heading, intro, table and notes; the chart goes first (see below)
  std::string chart_svg;  // the history with the effects marked
  std::string chart_caption;
};

// Empty when fit.json has no `outliers` entry. `suffix` follows the heading (the series when a
// run has several).
std::optional<EffectsSection> effects_section(const nlohmann::json& fit, const std::string& suffix);

// Palette index (svg.h) of an effect type's marker: level shift vermillion, additive orange,
// temporary reddish purple, innovational bluish green.
int effect_colour(const std::string& type);

}  // namespace lagsieve
