#include "forecast/forecast_table.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace lagsieve {
namespace {

std::string fixed(double v, int decimals) {
  return std::isfinite(v) ? fmt::format("{:.{}f}", v, decimals) : std::string("\u2014");
}

std::string interval(double lo, double hi, int decimals, size_t width) {
  const std::string a = fixed(lo, decimals), b = fixed(hi, decimals);
  return fmt::format("{:>{}} \u2013 {:>{}}", a, width, b, width);
}

std::string percent(double share) {
  return std::isfinite(share) ? fmt::format("{:.1f}%", 100.0 * share) : std::string("\u2014");
}

std::string level_name(double level) { return fmt::format("{:g}%", 100.0 * level); }

// Width of the widest number of `values` at `decimals`.
size_t number_width(const std::vector<std::vector<double>>& sets, int decimals) {
  size_t w = 1;
  for (const auto& set : sets)
    for (double v : set) w = std::max(w, fixed(v, decimals).size());
  return w;
}

double width_share(const ForecastResult& r, size_t h) {
  const size_t outer = r.levels.size() - 1;
  const double w = r.upper[outer][h] - r.lower[outer][h];
  const double wk = r.upper_known[outer][h] - r.lower_known[outer][h];
  return w > 0 ? 1.0 - wk / w : NAN;
}

std::vector<std::vector<double>> all_numbers(const ForecastResult& r) {
  std::vector<std::vector<double>> sets{r.median};
  for (size_t l = 0; l < r.levels.size(); ++l) {
    sets.push_back(r.lower[l]);
    sets.push_back(r.upper[l]);
    sets.push_back(r.lower_known[l]);
    sets.push_back(r.upper_known[l]);
  }
  return sets;
}

size_t time_width(const ForecastResult& r) {
  size_t w = 4;
  for (const auto& t : r.time) w = std::max(w, t.size());
  return w;
}

// Display width of UTF-8 text (the dash and the arrows are one column each).
size_t columns(const std::string& s) {
  size_t n = 0;
  for (unsigned char c : s) n += (c & 0xC0) != 0x80 ? 1 : 0;
  return n;
}

std::string pad_left(const std::string& s, size_t width) {
  const size_t c = columns(s);
  return c >= width ? s : std::string(width - c, ' ') + s;
}

}  // namespace

int table_decimals(const std::vector<double>& values) {
  double biggest = 0.0;
  for (double v : values)
    if (std::isfinite(v)) biggest = std::max(biggest, std::abs(v));
  if (biggest == 0.0) return 2;
  const int digits = static_cast<int>(std::floor(std::log10(biggest))) + 1;  // before the point
  return std::clamp(5 - digits, 0, 6);
}

std::string forecast_table(const ForecastResult& r) {
  const auto sets = all_numbers(r);
  std::vector<double> flat;
  for (const auto& s : sets) flat.insert(flat.end(), s.begin(), s.end());
  const int dec = table_decimals(flat);
  const size_t nw = number_width(sets, dec);
  const size_t iw = 2 * nw + 3;  // "lo – hi"
  const size_t tw = time_width(r);
  const bool any_share =
      std::any_of(r.share_inputs.begin(), r.share_inputs.end(), [](double s) { return s > 0; });
  std::string out;
  // Header: level groups, then the two intervals under each.
  out += fmt::format("  {:>4}  {:<{}}  {:>{}}", "", "", tw, "", nw);
  for (double level : r.levels)
    out += "   " + pad_left(fmt::format("{} interval, inputs:", level_name(level)), iw) +
           fmt::format("   {:>{}}", "", iw);
  out += "\n";
  out += fmt::format("  {:>4}  {:<{}}  {:>{}}", "step", "time", tw, "median", nw);
  for (size_t l = 0; l < r.levels.size(); ++l)
    out += "   " + pad_left("forecast", iw) + "   " + pad_left("known", iw);
  out += fmt::format("   {:>11}   {:>11}\n", "from inputs", "from params");
  for (size_t h = 0; h < r.median.size(); ++h) {
    out += fmt::format("  {:>4}  {:<{}}  {:>{}}", h + 1, h < r.time.size() ? r.time[h] : "", tw,
                       fixed(r.median[h], dec), nw);
    for (size_t l = 0; l < r.levels.size(); ++l)
      out += "   " + interval(r.lower[l][h], r.upper[l][h], dec, nw) + "   " +
             interval(r.lower_known[l][h], r.upper_known[l][h], dec, nw);
    out += fmt::format("   {:>11}   {:>11}\n", any_share ? percent(width_share(r, h)) : "0.0%",
                       percent(r.share_parameters[h]));
  }
  out += fmt::format(
      "  from inputs: share of the {} interval's width that forecasting the inputs adds "
      "(1 - width known / width forecast); from params: share of the forecast variance from "
      "estimating the parameters\n",
      level_name(r.levels.back()));
  return out;
}

std::string scenario_table(const ForecastResult* baseline,
                           const std::vector<NamedForecast>& scenarios) {
  std::vector<std::vector<double>> sets;
  const ForecastResult& first = baseline ? *baseline : scenarios.front().result;
  const size_t outer = first.levels.size() - 1;
  const auto add = [&](const ForecastResult& r) {
    sets.push_back(r.median);
    sets.push_back(r.lower[outer]);
    sets.push_back(r.upper[outer]);
  };
  if (baseline) add(*baseline);
  for (const auto& s : scenarios) add(s.result);
  std::vector<double> flat;
  for (const auto& s : sets) flat.insert(flat.end(), s.begin(), s.end());
  const int dec = table_decimals(flat);
  size_t nw = number_width(sets, dec) + 1;  // room for the sign of a difference
  const size_t iw = 2 * nw + 3;
  const size_t tw = time_width(first);
  const std::string level = level_name(first.levels[outer]);
  std::string out;
  std::string top = fmt::format("  {:>4}  {:<{}}", "", "", tw);
  std::string head = fmt::format("  {:>4}  {:<{}}", "step", "time", tw);
  const auto group = [&](const std::string& name, bool with_difference) {
    const size_t span = nw + 3 + iw + (with_difference ? nw + 3 : 0);
    std::string title = name.size() + 2 >= span ? name : "\u2500 " + name + " ";
    while (columns(title) < span) title += "\u2500";
    top += "   " + title;
    head += "   " + pad_left("median", nw) +
            (with_difference ? "   " + pad_left("vs base", nw) : "") + "   " +
            pad_left(level + " interval", iw);
  };
  if (baseline) group("baseline (inputs forecast)", false);
  for (const auto& s : scenarios) group(s.name, baseline != nullptr);
  out += top + "\n" + head + "\n";
  for (size_t h = 0; h < first.median.size(); ++h) {
    out += fmt::format("  {:>4}  {:<{}}", h + 1, h < first.time.size() ? first.time[h] : "", tw);
    if (baseline)
      out += "   " + pad_left(fixed(baseline->median[h], dec), nw) + "   " +
             interval(baseline->lower[outer][h], baseline->upper[outer][h], dec, nw);
    for (const auto& s : scenarios) {
      const auto& r = s.result;
      out += "   " + pad_left(fixed(r.median[h], dec), nw);
      if (baseline) {
        const double d = r.median[h] - baseline->median[h];
        out += "   " + pad_left(std::isfinite(d) ? fmt::format("{:+.{}f}", d, dec) : "\u2014", nw);
      }
      out += "   " + interval(r.lower[outer][h], r.upper[outer][h], dec, nw);
    }
    out += "\n";
  }
  out += baseline
             ? "  vs base: the scenario's median minus the baseline's (every input forecast by "
               "its own model)\n"
             : "  no baseline: an input the model takes as known has no values beyond the "
               "history and no model of its own\n";
  return out;
}

}  // namespace lagsieve
