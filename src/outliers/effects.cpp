#include "outliers/effects.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/names.h"

namespace lagsieve {

std::string_view outlier_abbreviation(OutlierType type) {
  switch (type) {
    case OutlierType::additive:
      return "AO";
    case OutlierType::level_shift:
      return "LS";
    case OutlierType::temporary:
      return "TC";
    case OutlierType::innovational:
      return "IO";
  }
  return "?";
}

std::string effect_name(OutlierType type, const std::vector<std::string>& time, int row) {
  const bool stamped = row >= 0 && row < static_cast<int>(time.size()) && !time[row].empty();
  return fmt::format("{}@{}", outlier_abbreviation(type),
                     stamped ? time[row] : fmt::format("{}", row));
}

std::vector<double> effect_values(const OutlierEffect& e, int rows) {
  std::vector<double> v(static_cast<size_t>(std::max(rows, 0)), 0.0);
  if (e.row < 0 || e.row >= rows) return v;
  const int m = rows - e.row;
  double* x = v.data() + e.row;
  switch (e.type) {
    case OutlierType::additive:
      x[0] = 1.0;
      break;
    case OutlierType::level_shift:
      std::fill(x, x + m, 1.0);
      break;
    case OutlierType::temporary: {
      double value = 1.0;
      for (int j = 0; j < m; ++j, value *= e.decay) x[j] = value;
      break;
    }
    case OutlierType::innovational: {
      // psi-weights of theta(B) / phi(B) from a pulse, then the integration 1 / (1 - B)^d and
      // 1 / (1 - B^S)^D: differencing these values gives back the ARMA psi-weights exactly.
      for (int j = 0; j < m; ++j) {
        double value = j == 0 ? 1.0 : 0.0;
        if (j >= 1 && j <= static_cast<int>(e.ma.size())) value += e.ma[j - 1];
        for (int k = 1; k <= std::min(j, static_cast<int>(e.ar.size())); ++k)
          value += e.ar[k - 1] * x[j - k];
        x[j] = value;
      }
      for (int d = 0; d < e.differencing.regular; ++d)
        for (int j = 1; j < m; ++j) x[j] += x[j - 1];
      const int s = e.differencing.period;
      for (int d = 0; d < e.differencing.seasonal; ++d)
        for (int j = s; j < m; ++j) x[j] += x[j - s];
      break;
    }
  }
  return v;
}

}  // namespace lagsieve
