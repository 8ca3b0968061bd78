#include "screen/indicator.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace lagsieve {

IndicatorInfo classify_indicator(const std::vector<double>& x) {
  IndicatorInfo info;
  if (x.size() < 2) return info;
  const double a = x.front();
  double b = a;
  for (double v : x) {
    if (!std::isfinite(v)) return info;
    if (v != a) {
      if (b == a)
        b = v;
      else if (v != b)
        return info;  // a third value
    }
  }
  if (b == a) return info;  // constant
  size_t count_b = 0;
  for (double v : x) count_b += v == b ? 1 : 0;
  // Majority value as base; for a tie the first value.
  const double base = 2 * count_b > x.size() ? b : a;
  const double other = base == a ? b : a;
  int runs = 0, longest = 0, current = 0;
  for (size_t t = 0; t < x.size(); ++t) {
    if (t > 0 && x[t] != x[t - 1]) info.change_rows.push_back(static_cast<int>(t));
    if (x[t] == other) {
      if (current == 0) ++runs;
      longest = std::max(longest, ++current);
    } else {
      current = 0;
    }
  }
  info.base = base;
  info.other = other;
  if (info.change_rows.size() == 1) {
    info.shape = IndicatorShape::step;
    info.base = x.front();  // a step goes from its first value to the other
    info.other = x.back();
  } else if (longest == 1) {
    info.shape = IndicatorShape::pulse;
  } else if (runs <= 2) {
    info.shape = IndicatorShape::shift;
  } else {
    info.change_rows.clear();  // a two-valued driver that switches often: a continuous input
  }
  return info;
}

std::string_view to_string(IndicatorShape shape) {
  switch (shape) {
    case IndicatorShape::none:
      return "none";
    case IndicatorShape::step:
      return "step";
    case IndicatorShape::pulse:
      return "pulse";
    case IndicatorShape::shift:
      return "shift";
  }
  return "unknown";
}

IndicatorShape indicator_shape_from(std::string_view text) {
  for (auto s : {IndicatorShape::step, IndicatorShape::pulse, IndicatorShape::shift})
    if (to_string(s) == text) return s;
  return IndicatorShape::none;
}

bool is_single_step(const std::vector<double>& x) {
  int changes = 0;
  for (size_t t = 1; t < x.size(); ++t) changes += x[t] != x[t - 1] ? 1 : 0;
  return changes == 1;
}

std::string describe_treatment(const InputKind& kind, bool prewhitened, int ar_order) {
  if (kind.is_event) return "event, not prewhitened";
  if (kind.indicator != IndicatorShape::none)
    return fmt::format("indicator column ({}), not prewhitened", to_string(kind.indicator));
  return prewhitened ? fmt::format("column, prewhitened by AR({})", ar_order) : "column";
}

}  // namespace lagsieve
