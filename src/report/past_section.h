#pragma once
// The report's account of the past (fit.json "past", see model/past.h): actual against fitted
// over the whole history with event dates marked, residuals over time inside +-2 sigma bands
// with a note on the largest, the inputs' contributions stacked (which driver moved the target
// when), and the residuals' quantiles against the normal. Also lends the forecast fan the fitted
// values of its last stretch of history and the event marks.
#include <functional>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <vector>

#include "report/html.h"
#include "report/svg.h"

namespace lagsieve {

// An event input of the model: its name and the time stamp (or 1-based row) it starts at.
struct PastEvent {
  std::string name;
  std::string at;
};

// The report assembler's figure maker: puts a chart on the page and into charts/<stem>.svg.
using FigureMaker = std::function<HtmlFigure(const std::string& svg, const std::string& stem,
                                             const std::string& caption)>;

// The section, or nothing when fit.json has no "past" (files written before it existed).
// `fit_file` names the file in messages about a malformed field; `stem` is appended to every
// chart's file stem ("" for a single series, "_<series>" otherwise).
std::optional<HtmlSection> past_section(const nlohmann::json& fit, const std::string& fit_file,
                                        const std::vector<PastEvent>& events,
                                        const std::string& heading_suffix, const std::string& stem,
                                        const FigureMaker& figure);

// Marks of the events whose start falls among `time` (positions from `x`, same length).
std::vector<XMark> event_marks(const std::vector<double>& x, const std::vector<std::string>& time,
                               const std::vector<PastEvent>& events);

// The fan's history stretch (stamps `history_time`, may be empty) gets the fitted values of the
// same rows from fit.json "past" (matched by stamp, else the last rows; none without a past),
// and every event that starts inside the history stretch or the forecast (`forecast_time`) a
// mark.
void add_past_to_fan(FanChartData& fan, const std::vector<std::string>& history_time,
                     const std::vector<std::string>& forecast_time, const nlohmann::json* fit,
                     const std::vector<PastEvent>& events);

}  // namespace lagsieve
