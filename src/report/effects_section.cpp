#include "report/effects_section.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "report/svg.h"
#include "report/time_axis.h"

namespace lagsieve {

namespace {

using nlohmann::json;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double number(const json& j, const char* key) {
  return j.contains(key) && j[key].is_number() ? j[key].get<double>() : kNaN;
}
std::string text(const json& j, const char* key) {
  return j.contains(key) && j[key].is_string() ? j[key].get<std::string>() : std::string();
}
std::string words(std::string s) {
  std::replace(s.begin(), s.end(), '_', ' ');
  return s;
}

const char* const kTypes[] = {"level_shift", "additive", "temporary", "innovational"};

}  // namespace

int effect_colour(const std::string& type) {
  if (type == "level_shift") return 1;
  if (type == "additive") return 3;
  if (type == "temporary") return 4;
  return 2;
}

std::optional<EffectsSection> effects_section(const json& fit, const std::string& suffix) {
  if (!fit.is_object() || !fit.contains("outliers") || !fit["outliers"].is_object())
    return std::nullopt;
  const json& o = fit["outliers"];
  const json effects =
      o.contains("effects") && o["effects"].is_array() ? o["effects"] : json::array();
  EffectsSection out;
  HtmlSection& s = out.section;
  s.heading = "Detected effects" + suffix;
  const double critical = number(o, "critical");
  s.intro = fmt::format(
      "Events the data did not announce, found by outlier detection on {} at a critical |t| of "
      "{:.2f} and fitted with every shortlisted candidate as event inputs; sizes, standard errors "
      "and statistics are from the chosen model's fit, on the modelled scale of the target.",
      text(o, "detected_on").empty() ? "the best candidate by the criterion" : text(o, "detected_on"), critical);
  if (effects.empty()) {
    s.blocks.push_back(HtmlParagraph{
        text(o, "note").empty()
            ? fmt::format("None: no statistic exceeded the critical value {:.2f}.", critical)
            : "None: " + text(o, "note") + "."});
    return out;
  }

  // The history with one marker series per type present (NaN off the effects' rows).
  std::vector<double> values;
  std::vector<std::string> time;
  if (o.contains("history") && o["history"].is_object()) {
    const json& h = o["history"];
    if (h.contains("values") && h["values"].is_array())
      for (const auto& v : h["values"]) values.push_back(v.is_number() ? v.get<double>() : kNaN);
    if (h.contains("time") && h["time"].is_array())
      for (const auto& t : h["time"]) time.push_back(t.is_string() ? t.get<std::string>() : "");
  }
  if (!values.empty()) {
    LineChart chart;
    chart.frame.title = "Detected effects marked on the history";
    chart.frame.subtitle = fmt::format("{} effect{}, shared by the shortlisted candidates",
                                       effects.size(), effects.size() == 1 ? "" : "s");
    chart.frame.x_title = time.empty() || time.front().empty() ? "Row" : "Time";
    chart.frame.y_title = "Target";
    chart.frame.width = 960;
    const int n = static_cast<int>(values.size());
    LineSeries history;
    history.name = "history";
    history.ink = true;
    for (int t = 0; t < n; ++t) history.x.push_back(t + 1);
    history.y = values;
    chart.series.push_back(history);
    // A level shift also shows as the mean of the history between consecutive shifts (dashed),
    // and every effect as a faint strip in its colour over the data range.
    double lo = kNaN, hi = kNaN;
    for (double v : values)
      if (std::isfinite(v)) {
        lo = std::isfinite(lo) ? std::min(lo, v) : v;
        hi = std::isfinite(hi) ? std::max(hi, v) : v;
      }
    std::vector<int> shifts{0};
    for (const auto& e : effects) {
      const int row = e.contains("row") && e["row"].is_number_integer() ? e["row"].get<int>() : -1;
      if (row < 0 || row >= n) continue;
      if (text(e, "type") == "level_shift") shifts.push_back(row);
      Band strip;
      strip.name = text(e, "name");
      strip.x = {row + 0.5, row + 1.5};
      strip.lower = {lo, lo};
      strip.upper = {hi, hi};
      strip.colour = effect_colour(text(e, "type"));
      strip.opacity = 0.18;
      chart.bands.push_back(std::move(strip));
    }
    if (shifts.size() > 1) {
      std::sort(shifts.begin(), shifts.end());
      shifts.push_back(n);
      LineSeries level;
      level.name = "mean between level shifts";
      level.colour = effect_colour("level_shift");
      level.style = LineStyle::dashed;
      for (size_t k = 0; k + 1 < shifts.size(); ++k) {
        double sum = 0.0;
        int count = 0;
        for (int t = shifts[k]; t < shifts[k + 1]; ++t)
          if (std::isfinite(values[t])) sum += values[t], ++count;
        const double mean = count > 0 ? sum / count : kNaN;
        for (int t = shifts[k]; t < shifts[k + 1]; ++t) {
          level.x.push_back(t + 1);
          level.y.push_back(mean);
        }
        level.x.push_back(kNaN);  // a gap at the shift
        level.y.push_back(kNaN);
      }
      chart.series.push_back(std::move(level));
    }
    for (const char* type : kTypes) {
      LineSeries m;
      m.name = words(type);
      m.colour = effect_colour(type);
      m.markers = true;
      m.x = history.x;
      m.y.assign(values.size(), kNaN);
      bool any = false;
      for (const auto& e : effects) {
        const int row =
            e.contains("row") && e["row"].is_number_integer() ? e["row"].get<int>() : -1;
        if (text(e, "type") != type || row < 0 || row >= n) continue;
        m.y[row] = values[row];
        any = true;
      }
      if (any) chart.series.push_back(std::move(m));
    }
    if (static_cast<int>(time.size()) == n) {
      std::vector<double> rows(static_cast<size_t>(n));
      for (int t = 0; t < n; ++t) rows[t] = t + 1.0;
      chart.x_ticks = time_axis_ticks(rows, time, chart.frame.width - 90.0);
    }
    out.chart_svg = line_chart_svg(chart);
    out.chart_caption =
        "Each detected effect is marked at the first row it affects, in its type's colour.";
  }

  HtmlTable t;
  t.caption = "Detected effects, in time order";
  auto column = [](const char* name) { return TableColumn{name, "", NumberFormat::automatic, 3}; };
  t.columns = {column("Effect"),        column("Type"),
               column("Time"),          column("Size"),
               column("s.e."),          TableColumn{"t", "", NumberFormat::fixed, 2},
               column("Ambiguous with")};
  std::vector<std::string> ambiguous;
  for (const auto& e : effects) {
    std::string others;
    if (e.contains("ambiguous_with") && e["ambiguous_with"].is_array())
      for (const auto& a : e["ambiguous_with"])
        if (a.is_string()) others += (others.empty() ? "" : ", ") + words(a.get<std::string>());
    const std::string when = text(e, "time").empty()
                                 ? (e.contains("row") ? fmt::format("row {}", e["row"].dump()) : "")
                                 : text(e, "time");
    t.rows.push_back({text(e, "name"), words(text(e, "type")), when, number(e, "size"),
                      number(e, "std_error"), number(e, "statistic"), others});
    if (!others.empty())
      ambiguous.push_back(
          fmt::format("{} ({} or {})", text(e, "name"), words(text(e, "type")), others));
  }
  if (o.contains("dropped") && o["dropped"].is_array() && !o["dropped"].empty())
    t.note = fmt::format(
        "{} more found in the first pass fell below the critical value in the "
        "joint fit and were dropped.",
        o["dropped"].size());
  s.blocks.push_back(std::move(t));
  if (!ambiguous.empty()) {
    std::string list;
    for (const auto& a : ambiguous) list += (list.empty() ? "" : "; ") + a;
    s.blocks.push_back(HtmlNotice{
        Tone::warning, "Type not settled by the data",
        fmt::format("{}: too close to the end of the data to tell the types apart, so the forecast "
                    "depends on a guess (a level shift persists, an additive outlier does not). "
                    "Rule: {}. Data after it will settle the question; re-validation checks the "
                    "new rows for effects.",
                    list, text(o, "ambiguity_rule"))});
  }
  std::string rules;
  if (!text(o, "shared_set_rule").empty()) rules += "Search: " + text(o, "shared_set_rule") + ". ";
  if (!text(o, "backtest_rule").empty()) rules += "Backtest: " + text(o, "backtest_rule") + ". ";
  if (!text(o, "critical_rule").empty())
    rules += "Critical value: " + text(o, "critical_rule") + ".";
  if (!rules.empty()) s.blocks.push_back(HtmlParagraph{rules});
  return out;
}

}  // namespace lagsieve
