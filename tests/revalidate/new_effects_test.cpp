// The re-validation question "did something happen in the new period?": a level shift planted in
// the new rows is found (type and row within one), clean new rows raise no effect in most seeds,
// and a deployed model that holds a detected effect of its own re-validates with it.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <string>

#include "outliers/detect.h"
#include "revalidate/new_effects.h"
#include "revalidate/revalidate.h"
#include "revalidate_test_util.h"

namespace lagsieve {
namespace {

using namespace lagsieve::testing;

constexpr int kNewShiftRow = kTrainingRows + 40;  // 0-based, inside the 100 new rows

RunConfig outlier_config() {
  RunConfig config = small_config();
  config.outliers.enabled = true;
  return config;
}

SeriesData with_shift(SeriesData data, int row, double size) {
  for (int t = row; t < data.rows(); ++t) data.target[t] += size;
  return data;
}

bool shift_near(const NewEffectsCheck& c, int row) {
  for (const auto& e : c.found)
    if (e.type == OutlierType::level_shift && std::abs(e.row - row) <= 1) return true;
  return false;
}

TEST(RevalidateNewEffects, LevelShiftInTheNewRowsFoundInNearlyEverySeed) {
  const RunConfig config = outlier_config();
  int hits = 0, clean_alarms = 0, clean_with_any = 0;
  constexpr int kSeeds = 20;
  for (int k = 0; k < kSeeds; ++k) {
    const SeriesData clean = simulate(truth(8100 + static_cast<std::uint64_t>(k)));
    const FittedModel model = deployed_model(head(clean, kTrainingRows), config);
    // 5 innovation standard deviations (sigma = 1 in the truth).
    const NewEffectsCheck shifted =
        new_effects_check(model, with_shift(clean, kNewShiftRow, 5.0), config.outliers);
    ASSERT_TRUE(shifted.run);
    EXPECT_EQ(shifted.new_rows, kNewRows);
    hits += shift_near(shifted, kNewShiftRow) ? 1 : 0;
    // Clean new rows; a wrong training value (8 sigma at row 150) is not a question of the new
    // period and must not be reported.
    SeriesData spoiled = clean;
    spoiled.target[150] += 8.0;
    const NewEffectsCheck none = new_effects_check(model, spoiled, config.outliers);
    clean_alarms += static_cast<int>(none.found.size());
    clean_with_any += none.found.empty() ? 0 : 1;
    for (const auto& e : shifted.found) EXPECT_GE(e.row, kTrainingRows) << "a training row tested";
  }
  std::printf(
      "new-period level shift 5 sigma: found %d of %d; clean new rows: %d effects in %d of "
      "%d seeds\n",
      hits, kSeeds, clean_alarms, clean_with_any, kSeeds);
  EXPECT_GE(hits, 18);
  EXPECT_LE(clean_with_any, 2);
}

TEST(RevalidateNewEffects, NotAskedWithoutTheSectionOrDetectedEffects) {
  const RunConfig config = small_config();
  const SeriesData data = simulate(truth(8200));
  const FittedModel model = deployed_model(head(data, kTrainingRows), config);
  const NewEffectsCheck c =
      new_effects_check(model, with_shift(data, kNewShiftRow, 8.0), config.outliers);
  EXPECT_FALSE(c.run);
  EXPECT_TRUE(c.found.empty());
}

// A model deployed with a level shift of its own (found in training), then a second shift in
// the new rows: the re-validation loads the first as an event input, reports only the second,
// and the verdict is refit for it.
TEST(RevalidateNewEffects, DeployedModelWithEffectsReportsTheNewOneAndRefits) {
  RunConfig config = outlier_config();
  config.backtest.shortlist = 2;
  const SeriesData clean = simulate(truth(8301));
  const SeriesData data = with_shift(with_shift(clean, 120, 6.0), kNewShiftRow, 6.0);
  const SeriesData training = head(data, kTrainingRows);
  ModelSpec spec;
  spec.inputs = {{"x", {2, 0, 1}}};
  spec.noise = {1, 0, 0, 0, 1};
  spec.constant = true;
  const OutlierFit detected = fit_with_outliers(training, spec, outlier_options(config.outliers));
  ASSERT_EQ(detected.effects.size(), 1u);
  ASSERT_EQ(detected.effects[0].type, OutlierType::level_shift);
  const FittedModel model =
      make_fitted_model(detected.fit, config, detected.data, detected.effects);

  const RevalidationResult r = revalidate(model, data, config);
  ASSERT_TRUE(r.new_effects.run);
  ASSERT_TRUE(shift_near(r.new_effects, kNewShiftRow));
  EXPECT_EQ(r.new_effects.found.size(), 1u);  // the training shift is the model's, not new
  EXPECT_NE(r.verdict, Verdict::keep);
  bool reason = false;
  for (const auto& s : r.reasons)
    reason = reason || s.find("new effect in the new period: level shift at " +
                              std::to_string(kNewShiftRow + 1)) != std::string::npos;
  EXPECT_TRUE(reason) << "no reason names the new level shift";
  const auto j = to_json(r);
  ASSERT_TRUE(j.contains("new_effects"));
  EXPECT_EQ(j["new_effects"]["effects"][0]["type"], "level_shift");
  EXPECT_EQ(j["new_effects"]["effects"][0]["row"], kNewShiftRow + 1);
  EXPECT_NE(summary_text(r).find("New effects in the new rows"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
