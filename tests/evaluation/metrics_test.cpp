// Accuracy metrics on small cases worked by hand from the published definitions:
// MASE from Hyndman & Koehler (2006, IJF 22, section 3: q_t = e_t / ((1/(n-1)) sum |Y_i - Y_{i-1}|)),
// interval score from Gneiting & Raftery (2007, JASA 102, eq. 43). The arithmetic is in the
// comments so each expected number can be checked with pencil and paper.
#include "evaluation/metrics.h"

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "core/error.h"

namespace lagsieve {
namespace {

constexpr double kTol = 1e-14;

TEST(MaseScale, OneStepAndSeasonalNaive) {
  // y = 10 12 11 15 14
  // one-step: |12-10| + |11-12| + |15-11| + |14-15| = 2 + 1 + 4 + 1 = 8 over 4 -> 2
  // period 2: |11-10| + |15-12| + |14-11| = 1 + 3 + 3 = 7 over 3
  const std::vector<double> y{10, 12, 11, 15, 14};
  EXPECT_NEAR(mase_scale(y), 2.0, kTol);
  EXPECT_NEAR(mase_scale(y, 2), 7.0 / 3.0, kTol);
  EXPECT_EQ(mase_scale(std::vector<double>{3, 3, 3}), 0.0);
  EXPECT_THROW(mase_scale(y, 5), InputError);
  EXPECT_THROW(mase_scale(y, 0), InputError);
}

TEST(IntervalScore, ThreeCasesOfEquation43) {
  // 80% interval: alpha = 0.2, 2/alpha = 10.
  EXPECT_NEAR(interval_score(13, 17, 16, 0.8), 4.0, kTol);               // inside: width 4
  EXPECT_NEAR(interval_score(12, 18, 11, 0.8), 6.0 + 10.0 * 1.0, kTol);  // below by 1: 16
  EXPECT_NEAR(interval_score(13, 19, 20, 0.8), 6.0 + 10.0 * 1.0, kTol);  // above by 1: 16
  EXPECT_NEAR(interval_score(13, 19, 19, 0.8), 6.0, kTol);               // on the bound: width
  // 50% interval: alpha = 0.5, 2/alpha = 4; above by 0.5 -> 1 + 4 * 0.5 = 3.
  EXPECT_NEAR(interval_score(14.5, 15.5, 16, 0.5), 3.0, kTol);
}

// Four forecasts, two origins x two horizons, levels 80% (2/alpha = 10) and 50% (2/alpha = 4).
//  rec  origin h  forecast actual scale  80% [l,u]  IS80            50% [l,u]     IS50
//  R1   4      1  15       16     2      [13,17]    4 (in)          [14.5,15.5]   1+4*0.5 = 3 (out)
//  R2   4      2  15       11     2      [12,18]    6+10*1 = 16     [14,16]       2+4*3 = 14
//  R3   5      1  16       15.5   2.5    [14,18]    4 (in)          [15,17]       2 (in)
//  R4   5      2  16       20     2.5    [13,19]    6+10*1 = 16     [15,17]       2+4*3 = 14
ForecastRecords example() {
  ForecastRecords s;
  s.levels = {0.8, 0.5};
  s.records = {
      {4, 1, 15.0, 16.0, {13.0, 14.5}, {17.0, 15.5}, 2.0},
      {4, 2, 15.0, 11.0, {12.0, 14.0}, {18.0, 16.0}, 2.0},
      {5, 1, 16.0, 15.5, {14.0, 15.0}, {18.0, 17.0}, 2.5},
      {5, 2, 16.0, 20.0, {13.0, 15.0}, {19.0, 17.0}, 2.5},
  };
  return s;
}

TEST(AccuracyTable, PerHorizonAndOverall) {
  const AccuracyTable t = accuracy_table(example());
  ASSERT_EQ(t.by_horizon.size(), 2u);
  const AccuracyRow& h1 = t.by_horizon[0];
  const AccuracyRow& h2 = t.by_horizon[1];
  // h = 1: errors +1, -0.5. MAE 0.75; RMSE sqrt((1 + 0.25)/2); MASE (1/2 + 0.5/2.5)/2 = 0.35;
  // coverage 80%: 2/2; 50%: 1/2; IS80 (4+4)/2 = 4; IS50 (3+2)/2 = 2.5.
  EXPECT_EQ(h1.horizon, 1);
  EXPECT_EQ(h1.count, 2);
  EXPECT_NEAR(h1.mae, 0.75, kTol);
  EXPECT_NEAR(h1.rmse, std::sqrt(0.625), kTol);
  EXPECT_NEAR(h1.mase, 0.35, kTol);
  EXPECT_NEAR(h1.coverage[0], 1.0, kTol);
  EXPECT_NEAR(h1.coverage[1], 0.5, kTol);
  EXPECT_NEAR(h1.interval_score[0], 4.0, kTol);
  EXPECT_NEAR(h1.interval_score[1], 2.5, kTol);
  // h = 2: errors -4, +4. MAE 4; RMSE 4; MASE (4/2 + 4/2.5)/2 = 1.8; both outside both intervals;
  // IS80 (16+16)/2 = 16; IS50 (14+14)/2 = 14.
  EXPECT_NEAR(h2.mae, 4.0, kTol);
  EXPECT_NEAR(h2.rmse, 4.0, kTol);
  EXPECT_NEAR(h2.mase, 1.8, kTol);
  EXPECT_NEAR(h2.coverage[0], 0.0, kTol);
  EXPECT_NEAR(h2.coverage[1], 0.0, kTol);
  EXPECT_NEAR(h2.interval_score[0], 16.0, kTol);
  EXPECT_NEAR(h2.interval_score[1], 14.0, kTol);
  // Pooled: MAE (1+0.5+4+4)/4 = 2.375; RMSE sqrt((1+0.25+16+16)/4) = sqrt(8.3125);
  // MASE (0.5+0.2+2+1.6)/4 = 1.075; coverage 2/4 and 1/4; IS80 (4+16+4+16)/4 = 10;
  // IS50 (3+14+2+14)/4 = 8.25.
  EXPECT_EQ(t.overall.horizon, 0);
  EXPECT_EQ(t.overall.count, 4);
  EXPECT_NEAR(t.overall.mae, 2.375, kTol);
  EXPECT_NEAR(t.overall.rmse, std::sqrt(8.3125), kTol);
  EXPECT_NEAR(t.overall.mase, 1.075, kTol);
  EXPECT_NEAR(t.overall.coverage[0], 0.5, kTol);
  EXPECT_NEAR(t.overall.coverage[1], 0.25, kTol);
  EXPECT_NEAR(t.overall.interval_score[0], 10.0, kTol);
  EXPECT_NEAR(t.overall.interval_score[1], 8.25, kTol);
}

TEST(AccuracyTable, BacktestScoreAveragesHorizons) {
  ForecastRecords s = example();
  // An extra h = 1 record must not outweigh h = 2: the score averages per-horizon values.
  // R5: origin 6, h 1, forecast 10, actual 10, scale 1 -> scaled error 0.
  // h1 MASE becomes (0.5 + 0.2 + 0)/3 = 0.7/3; score = (0.7/3 + 1.8)/2.
  s.records.push_back({6, 1, 10.0, 10.0, {9.0, 9.5}, {11.0, 10.5}, 1.0});
  const AccuracyTable t = accuracy_table(s);
  EXPECT_NEAR(backtest_score(t, AccuracyMeasure::mase), (0.7 / 3.0 + 1.8) / 2.0, kTol);
  const AccuracyTable base = accuracy_table(example());
  EXPECT_NEAR(backtest_score(base, AccuracyMeasure::mase), (0.35 + 1.8) / 2.0, kTol);
  EXPECT_NEAR(backtest_score(base, AccuracyMeasure::mae), (0.75 + 4.0) / 2.0, kTol);
  EXPECT_NEAR(backtest_score(base, AccuracyMeasure::rmse), (std::sqrt(0.625) + 4.0) / 2.0, kTol);
  // Interval score of level 0 (80%): (4 + 16)/2 = 10; averaged over levels:
  // h1 (4 + 2.5)/2 = 3.25, h2 (16 + 14)/2 = 15, mean 9.125.
  EXPECT_NEAR(backtest_score(base, AccuracyMeasure::interval_score, 0), 10.0, kTol);
  EXPECT_NEAR(backtest_score(base, AccuracyMeasure::interval_score), 9.125, kTol);
  EXPECT_THROW(backtest_score(base, AccuracyMeasure::interval_score, 2), InputError);
}

TEST(AccuracyTable, ZeroScaleGivesNaNMase) {
  ForecastRecords s = example();
  s.records[2].scale = 0.0;  // R3 at h = 1
  const AccuracyTable t = accuracy_table(s);
  EXPECT_TRUE(std::isnan(t.by_horizon[0].mase));
  EXPECT_NEAR(t.by_horizon[1].mase, 1.8, kTol);
  EXPECT_TRUE(std::isnan(t.overall.mase));
  EXPECT_NEAR(t.by_horizon[0].mae, 0.75, kTol);
}

TEST(AccuracyTable, RejectsMalformedRecords) {
  ForecastRecords s = example();
  s.records[1].upper.pop_back();
  EXPECT_THROW(accuracy_table(s), InputError);
  s = example();
  s.levels[1] = 1.0;
  EXPECT_THROW(accuracy_table(s), InputError);
  s = example();
  s.records[0].horizon = 0;
  EXPECT_THROW(accuracy_table(s), InputError);
  s = example();
  s.records[0].actual = std::nan("");
  EXPECT_THROW(accuracy_table(s), InputError);
}

TEST(PairedLosses, PairsOnCommonOrigins) {
  ForecastRecords a = example();
  ForecastRecords b = example();
  b.records[0].forecast = 14.0;  // origin 4, h 1: error 2 instead of 1
  b.records.push_back({7, 1, 0.0, 1.0, {-1.0, -0.5}, {1.0, 0.5}, 1.0});  // origin only in b
  const PairedLosses sq = paired_losses(a, b, 1, LossKind::squared);
  ASSERT_EQ(sq.origins, (std::vector<int>{4, 5}));
  EXPECT_EQ(sq.loss_a, (std::vector<double>{1.0, 0.25}));
  EXPECT_EQ(sq.loss_b, (std::vector<double>{4.0, 0.25}));
  const PairedLosses ab = paired_losses(a, b, 2, LossKind::absolute);
  EXPECT_EQ(ab.loss_a, (std::vector<double>{4.0, 4.0}));
  a.records.push_back(a.records[0]);
  EXPECT_THROW(paired_losses(a, b, 1, LossKind::squared), InputError);
}

}  // namespace
}  // namespace lagsieve
