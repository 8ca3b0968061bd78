#pragma once
// One detected effect (additive outlier, level shift, temporary change, innovational outlier)
// and the input column it becomes. The values are defined on the original scale of the target
// (after its transform, before differencing), like a config event, so the fit differences them
// with the target and the forecaster regenerates them past the data as their type implies.
#include <string>
#include <string_view>
#include <vector>

#include "core/config.h"
#include "core/spec.h"

namespace lagsieve {

struct OutlierEffect {
  OutlierType type = OutlierType::additive;
  int row = 0;         // 0-based data row where the effect starts
  std::string time;    // its time stamp ("" without a time column)
  std::string name;    // input name: type abbreviation @ time stamp (or row), e.g. "LS@1899"
  double decay = 0.7;  // temporary: delta of delta^(t - row)
  // innovational: the noise model at detection, as the expanded polynomials (expand_ar / expand_ma
  // of model/polynomial.h) and the differencing, so the effect is psi(B) applied to a pulse.
  std::vector<double> ar, ma;
  Differencing differencing;
  // From the joint fit: size (omega, on the transformed scale), its standard error and ratio.
  double size = 0.0;
  double std_error = 0.0;
  double statistic = 0.0;
  // Other types whose response over the rest of the data is nearly the same (see
  // ambiguous_types in detect.h); empty when the type is clear.
  std::vector<OutlierType> ambiguous_with;
};

// "AO", "LS", "TC", "IO".
std::string_view outlier_abbreviation(OutlierType type);

// The input name of an effect: abbreviation @ time stamp, or @ row index without time stamps.
std::string effect_name(OutlierType type, const std::vector<std::string>& time, int row);

// Values over `rows` rows: additive 1 at the row; level shift 1 from the row on; temporary
// decay^(t - row) from the row on; innovational psi_j of the noise model (including the
// integration of the differencing) at t = row + j. Zero before the row.
std::vector<double> effect_values(const OutlierEffect& effect, int rows);

}  // namespace lagsieve
