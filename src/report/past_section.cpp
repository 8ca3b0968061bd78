#include "report/past_section.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <numeric>

#include "core/error.h"
#include "evaluation/distributions.h"
#include "report/time_axis.h"

namespace lagsieve {
namespace {

using json = nlohmann::json;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr int kWide = 960;
// Colours of the stacked inputs: the palette without the roles of svg.h (model, band, event).
constexpr int kInputColours[] = {0, 5, 2, 6, 7};

// fit.json "past", read with messages that name the file and field.
struct Past {
  std::string scale, label;
  std::vector<std::string> time;
  std::vector<double> x;  // 1-based data rows
  std::vector<double> actual, fitted, residual, sd, noise;
  std::vector<std::pair<std::string, std::vector<double>>> inputs;
  double sigma = kNaN;
};

[[noreturn]] void fail(const std::string& file, const std::string& field, const std::string& what) {
  throw InputError(fmt::format("{}: field 'past.{}' {}; re-run the search or fit to rewrite it",
                               file, field, what));
}

std::vector<double> numbers(const json& past, const std::string& key, size_t n,
                            const std::string& file) {
  if (!past.contains(key) || !past[key].is_array()) fail(file, key, "is missing or not an array");
  const json& a = past[key];
  if (a.size() != n) fail(file, key, fmt::format("has {} values for {} rows", a.size(), n));
  std::vector<double> out;
  for (size_t i = 0; i < a.size(); ++i) {
    if (a[i].is_null())
      out.push_back(kNaN);
    else if (a[i].is_number())
      out.push_back(a[i].get<double>());
    else
      fail(file, fmt::format("{}[{}]", key, i), "is not a number");
  }
  return out;
}

Past read_past(const json& fit, const std::string& file) {
  const json& p = fit["past"];
  if (!p.is_object()) fail(file, "", "is not an object");
  Past past;
  past.scale = p.value("scale", std::string("target"));
  past.label = fit.value("label", std::string());
  if (!p.contains("row") || !p["row"].is_array()) fail(file, "row", "is missing or not an array");
  const size_t n = p["row"].size();
  past.x = numbers(p, "row", n, file);
  if (p.contains("time") && p["time"].is_array()) {
    if (p["time"].size() != n) fail(file, "time", "does not match past.row in length");
    for (const auto& t : p["time"]) past.time.push_back(t.is_string() ? t.get<std::string>() : "");
  } else {
    past.time.assign(n, "");
  }
  past.actual = numbers(p, "actual", n, file);
  past.fitted = numbers(p, "fitted", n, file);
  past.residual = numbers(p, "residual", n, file);
  past.sd = numbers(p, "residual_sd", n, file);
  past.noise = numbers(p, "noise", n, file);
  if (p.contains("contributions") && p["contributions"].is_array())
    for (size_t i = 0; i < p["contributions"].size(); ++i) {
      const json& c = p["contributions"][i];
      if (!c.is_object() || !c.contains("input") || !c["input"].is_string())
        fail(file, fmt::format("contributions[{}].input", i), "is missing or not text");
      past.inputs.emplace_back(c["input"].get<std::string>(),
                               numbers(c, "values", n, file + " (past.contributions)"));
    }
  if (p.contains("sigma") && p["sigma"].is_number()) past.sigma = p["sigma"].get<double>();
  return past;
}

bool stamped(const std::vector<std::string>& time) {
  return !time.empty() &&
         std::none_of(time.begin(), time.end(), [](const std::string& t) { return t.empty(); });
}

// Calendar ticks in the stamps' own form (report/time_axis.h) across the plot of a wide chart.
std::vector<AxisTick> stamp_ticks(const std::vector<double>& x,
                                  const std::vector<std::string>& time) {
  return time_axis_ticks(x, time, kWide - 90.0);
}

std::string where(const Past& p, size_t i) {
  return p.time[i].empty() ? fmt::format("row {:.0f}", p.x[i]) : p.time[i];
}

std::string num(double v) { return std::isfinite(v) ? fmt::format("{:.4g}", v) : "\u2014"; }

std::string scale_title(const Past& p, const std::string& what) {
  return p.scale == "target" ? what : fmt::format("{} ({})", what, p.scale);
}

HtmlFigure fitted_chart(const Past& p, const std::vector<XMark>& marks, const std::string& stem,
                        const FigureMaker& figure) {
  LineChart c;
  c.frame.title =
      "Fitted values (one step ahead) follow the actuals where the model explains the "
      "history; dotted marks are event dates";
  c.frame.subtitle = p.label;
  c.frame.y_title = scale_title(p, "Target");
  c.frame.width = kWide;
  c.frame.height = 400;
  c.x_ticks = stamp_ticks(p.x, p.time);
  if (c.x_ticks.empty()) c.frame.x_title = "Row";
  c.marks = marks;
  c.series.push_back({"Actual", p.x, p.actual, -1, true, LineStyle::solid, false});
  c.series.push_back(
      {"Fitted (one step)", p.x, p.fitted, kModelColour, false, LineStyle::solid, false});
  return figure(line_chart_svg(c), "past_fitted" + stem,
                "Fitted value: the model's prediction of each row from the rows before it "
                "(past.csv holds the numbers).");
}

struct Largest {
  size_t index = 0;
  double z = 0.0;
  int outside = 0, counted = 0;
};

Largest largest_residual(const Past& p) {
  Largest l;
  for (size_t i = 0; i < p.residual.size(); ++i) {
    if (!std::isfinite(p.residual[i]) || !(p.sd[i] > 0)) continue;
    const double z = p.residual[i] / p.sd[i];
    ++l.counted;
    l.outside += std::abs(z) > 2.0 ? 1 : 0;
    if (std::abs(z) > std::abs(l.z)) {
      l.z = z;
      l.index = i;
    }
  }
  return l;
}

HtmlFigure residual_chart(const Past& p, const Largest& big, const std::string& stem,
                          const FigureMaker& figure) {
  LineChart c;
  c.frame.title =
      "Residuals over time: about one in twenty should fall outside the \u00b12\u03c3 "
      "band; clusters or runs point to what the model misses";
  c.frame.subtitle = p.label;
  c.frame.y_title = scale_title(p, "Residual");
  c.frame.width = kWide;
  c.frame.height = 340;
  c.x_ticks = stamp_ticks(p.x, p.time);
  c.frame.x_title = c.x_ticks.empty() ? "Row" : "Time";
  std::vector<double> lo, hi, outside;
  for (size_t i = 0; i < p.x.size(); ++i) {
    lo.push_back(-2.0 * p.sd[i]);
    hi.push_back(2.0 * p.sd[i]);
    const bool out = std::isfinite(p.residual[i]) && std::abs(p.residual[i]) > 2.0 * p.sd[i];
    outside.push_back(out ? p.residual[i] : kNaN);
  }
  c.bands.push_back({"\u00b12\u03c3 (the model's residual sd)", p.x, lo, hi, kBandColour, 0.28,
                     BandStyle::filled, false});
  c.series.push_back({"Residual", p.x, p.residual, -1, true, LineStyle::solid, false});
  c.series.push_back(
      {"Outside \u00b12\u03c3", p.x, outside, kModelColour, false, LineStyle::solid, true, false});
  c.include_zero = true;
  if (big.counted > 0)
    c.marks.push_back(
        {p.x[big.index], fmt::format("largest: {}", where(p, big.index)), kEventColour});
  return figure(line_chart_svg(c), "past_residuals" + stem,
                "The band widens at the start, where the model has little history to predict "
                "from (its sd is sqrt(sigma\u00b2 F_t)).");
}

HtmlFigure contribution_chart(const Past& p, const std::vector<XMark>& marks,
                              const std::string& stem, const FigureMaker& figure) {
  LineChart c;
  c.frame.title =
      "Which input moved the target when: contributions stacked above zero add to "
      "the fitted value, below zero take away";
  c.frame.subtitle = p.label;
  c.frame.y_title = scale_title(p, "Contribution");
  c.frame.width = kWide;
  c.frame.height = 380;
  c.x_ticks = stamp_ticks(p.x, p.time);
  c.frame.x_title = c.x_ticks.empty() ? "Row" : "Time";
  c.marks = marks;
  c.include_zero = true;
  const size_t n = p.x.size();
  std::vector<double> up(n, 0.0), down(n, 0.0), total(n, 0.0);
  for (size_t k = 0; k < p.inputs.size(); ++k) {
    const auto& [name, v] = p.inputs[k];
    Band b{name,
           p.x,
           std::vector<double>(n),
           std::vector<double>(n),
           kInputColours[k % std::size(kInputColours)],
           0.7,
           BandStyle::filled,
           false};
    for (size_t i = 0; i < n; ++i) {
      const double x = std::isfinite(v[i]) ? v[i] : 0.0;
      double& edge = x >= 0 ? up[i] : down[i];
      b.lower[i] = x >= 0 ? edge : edge + x;
      b.upper[i] = x >= 0 ? edge + x : edge;
      edge += x;
      total[i] += x;
    }
    c.bands.push_back(std::move(b));
  }
  if (p.inputs.size() > 1)
    c.series.push_back({"Inputs together", p.x, total, -1, true, LineStyle::solid, false});
  return figure(line_chart_svg(c), "past_contributions" + stem,
                "Each input's contribution is its filtered value \u03c9(B)B^b/\u03b4(B)\u00b7x on "
                "the target's scale. The noise part (the constant and the predicted noise) is not "
                "stacked; past.csv has it, and inputs plus noise add up to the fitted value.");
}

HtmlFigure quantile_chart(const Past& p, const std::string& stem, const FigureMaker& figure) {
  std::vector<double> z;
  for (size_t i = 0; i < p.residual.size(); ++i)
    if (std::isfinite(p.residual[i]) && p.sd[i] > 0) z.push_back(p.residual[i] / p.sd[i]);
  std::sort(z.begin(), z.end());
  std::vector<double> q;
  const double n = static_cast<double>(z.size());
  for (size_t i = 0; i < z.size(); ++i)  // Blom's plotting positions
    q.push_back(normal_quantile((static_cast<double>(i) + 1.0 - 0.375) / (n + 0.25)));
  LineChart c;
  c.frame.title =
      "Residual quantiles against the normal: points off the line at the ends mean "
      "heavier tails than the intervals assume";
  c.frame.subtitle = fmt::format("{} standardised residuals (residual / its sd)", z.size());
  c.frame.x_title = "Normal quantile";
  c.frame.y_title = "Standardised residual";
  c.frame.width = 560;
  c.frame.height = 420;
  if (!q.empty()) {
    const double lo = std::min(q.front(), z.front()), hi = std::max(q.back(), z.back());
    c.series.push_back({"Normal", {lo, hi}, {lo, hi}, -1, true, LineStyle::dashed, false});
  }
  c.series.push_back({"Residuals", q, z, kModelColour, false, LineStyle::solid, true, false});
  return figure(line_chart_svg(c), "past_residual_quantiles" + stem,
                "Blom's plotting positions; the dashed line is a standard normal.");
}

HtmlTable largest_table(const Past& p) {
  std::vector<size_t> order;
  for (size_t i = 0; i < p.residual.size(); ++i)
    if (std::isfinite(p.residual[i]) && p.sd[i] > 0) order.push_back(i);
  std::sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    const double za = std::abs(p.residual[a] / p.sd[a]), zb = std::abs(p.residual[b] / p.sd[b]);
    return za != zb ? za > zb : a < b;
  });
  order.resize(std::min<size_t>(order.size(), 5));
  HtmlTable t;
  t.caption = "Largest residuals";
  t.columns = {{"When", "", NumberFormat::automatic, 0},
               {"Actual", "", NumberFormat::automatic, 3},
               {"Fitted", "", NumberFormat::automatic, 3},
               {"Residual", "", NumberFormat::automatic, 3},
               {"In sd", "\u03c3", NumberFormat::fixed, 2}};
  for (size_t i : order)
    t.rows.push_back(
        {where(p, i), p.actual[i], p.fitted[i], p.residual[i], p.residual[i] / p.sd[i]});
  t.note =
      "In sd: the residual divided by the model's sd for that row; beyond 3 is rare under a "
      "normal model (about 3 in 1,000).";
  return t;
}

}  // namespace

std::vector<XMark> event_marks(const std::vector<double>& x, const std::vector<std::string>& time,
                               const std::vector<PastEvent>& events) {
  std::vector<XMark> marks;
  for (const auto& e : events) {
    for (size_t i = 0; i < x.size() && i < time.size(); ++i)
      if (!time[i].empty() && time[i] == e.at) {
        marks.push_back({x[i], e.name, kEventColour});
        break;
      }
  }
  return marks;
}

std::optional<HtmlSection> past_section(const json& fit, const std::string& fit_file,
                                        const std::vector<PastEvent>& events,
                                        const std::string& heading_suffix, const std::string& stem,
                                        const FigureMaker& figure) {
  if (!fit.is_object() || !fit.contains("past")) return std::nullopt;
  const Past p = read_past(fit, fit_file);
  HtmlSection s;
  s.heading = "The past, explained" + heading_suffix;
  s.intro = fmt::format(
      "How the chosen model explains the history it was fitted on: its one-step predictions, what they "
      "missed, and which inputs moved the target when. Values are on the scale of the {}.",
      p.scale == "target" ? std::string("target") : p.scale);
  // Events given as 1-based rows (no time column) are matched on the row number.
  std::vector<std::string> keys = p.time;
  if (!stamped(p.time))
    for (size_t i = 0; i < keys.size(); ++i) keys[i] = fmt::format("{:.0f}", p.x[i]);
  const auto marks = event_marks(p.x, keys, events);
  s.blocks.push_back(fitted_chart(p, marks, stem, figure));
  const Largest big = largest_residual(p);
  if (big.counted > 0)
    s.blocks.push_back(HtmlParagraph{fmt::format(
        "The largest residual is {} at {} (actual {}, fitted {}), {:.1f} times its sd. {} of {} "
        "residuals ({:.1f}%) lie outside \u00b12\u03c3, against about 4.6% for normal residuals.",
        num(p.residual[big.index]), where(p, big.index), num(p.actual[big.index]),
        num(p.fitted[big.index]), std::abs(big.z), big.outside, big.counted,
        100.0 * big.outside / big.counted)});
  s.blocks.push_back(residual_chart(p, big, stem, figure));
  if (!p.inputs.empty()) s.blocks.push_back(contribution_chart(p, marks, stem, figure));
  s.blocks.push_back(HtmlFigureRow{{quantile_chart(p, stem, figure)}});
  s.blocks.push_back(largest_table(p));
  return s;
}

void add_past_to_fan(FanChartData& fan, const std::vector<std::string>& history_time,
                     const std::vector<std::string>& forecast_time, const json* fit,
                     const std::vector<PastEvent>& events) {
  std::vector<double> x = fan.history_x;
  x.insert(x.end(), fan.forecast_x.begin(), fan.forecast_x.end());
  std::vector<std::string> stamps = history_time;
  stamps.resize(fan.history_x.size());
  stamps.insert(stamps.end(), forecast_time.begin(), forecast_time.end());
  fan.marks = event_marks(x, stamps, events);
  if (fit == nullptr || !fit->is_object() || !fit->contains("past")) return;
  const json& past = (*fit)["past"];
  if (!past.is_object() || !past.contains("fitted") || !past["fitted"].is_array()) return;
  const json& fitted = past["fitted"];
  const size_t n = fitted.size();
  const auto value = [&](size_t i) {
    return fitted[i].is_number() ? fitted[i].get<double>() : kNaN;
  };
  std::map<std::string, size_t> by_stamp;
  if (past.contains("time") && past["time"].is_array() && past["time"].size() == n)
    for (size_t i = 0; i < n; ++i)
      if (past["time"][i].is_string()) by_stamp[past["time"][i].get<std::string>()] = i;
  const size_t nh = fan.history_x.size();
  const bool by_time = stamped(history_time) && history_time.size() == nh && !by_stamp.empty();
  for (size_t k = 0; k < nh; ++k) {
    double v = kNaN;
    if (by_time) {
      const auto it = by_stamp.find(history_time[k]);
      if (it != by_stamp.end()) v = value(it->second);
    } else if (nh - k <= n) {
      v = value(n - (nh - k));
    }
    fan.fitted_x.push_back(fan.history_x[k]);
    fan.fitted.push_back(v);
  }
  if (std::none_of(fan.fitted.begin(), fan.fitted.end(),
                   [](double v) { return std::isfinite(v); })) {
    fan.fitted_x.clear();
    fan.fitted.clear();
  }
}

}  // namespace lagsieve
