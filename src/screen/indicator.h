#pragma once
// Deterministic inputs and how every output describes an input's treatment before it is
// cross-correlated (the screen against the target, the fit's diagnostics against the residuals).
//
// A data column (not an event of the config) with exactly two distinct values whose minority
// value forms at most two runs, or only single-row runs, is indicator-like: a step (one change of
// value), a pulse (single-row runs) or a temporary shift. Like an event it is deterministic, so
// it is not prewhitened: an AR model fitted to a step or a pulse whitens away the very change the
// target responds to. Every other column is prewhitened by its own AR model.
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve {

// How an indicator-like data column looks (see the rule above); kind none: not indicator-like.
enum class IndicatorShape { none, step, pulse, shift };
std::string_view to_string(IndicatorShape shape);
// The spelling back; none for any other text (e.g. the field of a file from a later version).
IndicatorShape indicator_shape_from(std::string_view text);

struct IndicatorInfo {
  IndicatorShape shape = IndicatorShape::none;
  double base = 0.0, other = 0.0;  // the majority (first, for a step) and the minority value
  std::vector<int> change_rows;    // 0-based rows where the value changes (before differencing)
};

// Classifies a raw (undifferenced) data column by the rule above.
IndicatorInfo classify_indicator(const std::vector<double>& column);

// True when x changes value exactly once: a step that stays.
bool is_single_step(const std::vector<double>& x);

// What an input is, for the choice of prewhitening.
struct InputKind {
  bool is_event = false;                            // an event of the config
  IndicatorShape indicator = IndicatorShape::none;  // a data column recognised as an indicator
  bool deterministic() const { return is_event || indicator != IndicatorShape::none; }
};

// The one wording of an input's treatment, used by the screen, the fit's text summary and
// warnings, and the report: "column, prewhitened by AR(2)", "event, not prewhitened",
// "indicator column (step), not prewhitened"; "column" for a column that was not prewhitened
// (constant after differencing).
std::string describe_treatment(const InputKind& kind, bool prewhitened, int ar_order);

}  // namespace lagsieve
