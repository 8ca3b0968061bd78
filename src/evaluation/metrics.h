#pragma once
// Forecast accuracy of a rolling-origin backtest (Tashman 2000), per horizon and overall:
//   MAE, RMSE;
//   MASE (Hyndman & Koehler 2006, IJF 22): |error| divided by the in-sample mean absolute error
//     of the one-step naive forecast (or the seasonal naive with period m) on the TRAINING part
//     of that origin, averaged; each record carries its own origin's scale (see mase_scale);
//   empirical coverage of each nominal interval level: share of actuals inside [lower, upper];
//   interval score (Gneiting & Raftery 2007, JASA 102, eq. 43) of the central (1 - alpha)
//     interval:  (u - l) + (2/alpha)(l - y) 1{y < l} + (2/alpha)(y - u) 1{y > u};  lower is better.
// Records in, an AccuracyTable out; nothing here knows about models or fitting.
#include <span>
#include <string>
#include <vector>

namespace lagsieve {

// One forecast of one backtest: made at `origin` (row index of the last observation used),
// `horizon` steps ahead.
struct ForecastRecord {
  int origin = 0;
  int horizon = 1;                 // 1..K
  double forecast = 0.0;
  double actual = 0.0;
  std::vector<double> lower;       // one bound per ForecastRecords::levels entry, same order
  std::vector<double> upper;
  double scale = 0.0;              // MASE denominator of this origin's training window (> 0)
};

struct ForecastRecords {
  std::vector<double> levels;      // nominal central coverage, e.g. {0.8, 0.95}; each in (0, 1)
  std::vector<ForecastRecord> records;
};

// Metrics of one group of records (one horizon, or all of them). Per-level vectors follow
// ForecastRecords::levels. MASE is NaN when some record of the group has no positive scale
// (a constant training window): the scaled error is undefined there, and a NaN is safer
// than a silently smaller average.
struct AccuracyRow {
  int horizon = 0;                 // 0 = all horizons pooled
  int count = 0;                   // records in the group
  double mae = 0.0;
  double rmse = 0.0;
  double mase = 0.0;
  std::vector<double> coverage;        // share of actuals inside the interval, 0..1
  std::vector<double> interval_score;  // mean interval score, in units of the series
};

struct AccuracyTable {
  std::vector<double> levels;
  std::vector<AccuracyRow> by_horizon;  // ascending horizon, only horizons that have records
  AccuracyRow overall;                  // every record pooled (horizon = 0)
};

// In-sample mean absolute error of the naive forecast y_t = y_{t-period} on `training`:
// sum_{t=period}^{n-1} |y_t - y_{t-period}| / (n - period). period = 1 is the one-step naive
// scale, period = m the seasonal one. Throws InputError when period < 1 or the window has no more
// than `period` values. May return 0 (constant window); callers keep it and MASE becomes NaN.
double mase_scale(std::span<const double> training, int period = 1);

// Interval score of one central interval [lower, upper] with nominal coverage `level` = 1 - alpha.
double interval_score(double lower, double upper, double actual, double level);

// Per-horizon and pooled metrics. Throws InputError when a record's bound vectors do not match
// the levels, a level is outside (0, 1), a horizon is < 1, or a value is not finite.
AccuracyTable accuracy_table(const ForecastRecords& records);

// The single number a backtest is ranked by: the mean over horizons 1..K (each horizon weighs
// the same, whatever its record count) of one metric. For interval_score, `level_index` picks the
// level; -1 averages over all levels.
enum class AccuracyMeasure { mae, rmse, mase, interval_score };
double backtest_score(const AccuracyTable& table, AccuracyMeasure measure, int level_index = -1);

// Loss series for Diebold-Mariano comparisons.
enum class LossKind { squared, absolute };

// Losses of two record sets at one horizon, paired on origin (origins present in both, ascending).
struct PairedLosses {
  int horizon = 1;
  std::vector<int> origins;
  std::vector<double> loss_a;
  std::vector<double> loss_b;
};
PairedLosses paired_losses(const ForecastRecords& a, const ForecastRecords& b, int horizon,
                           LossKind kind);

}  // namespace lagsieve
