// Re-validation that fits the data's cadence: a few new rows give a verdict (with a note that the
// evidence is thin), a rolling extract that starts inside the training rows is lined up with the
// training rows the model file holds and gives the same result as the whole file, a revised value
// is named by row, stamp, column and both values, values missing at training (a ragged edge) or
// filled by interpolation may arrive later without being called revisions, and model files
// without training rows fall back to the fingerprint rule.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "core/error.h"
#include "forecast/model_file.h"
#include "io/config.h"
#include "revalidate/overlap.h"
#include "revalidate/revalidate.h"
#include "revalidate_test_util.h"

namespace lagsieve {
namespace {

using namespace lagsieve::testing;

struct Deployed {
  RunConfig config = small_config();
  SeriesData data;
  FittedModel model;
  explicit Deployed(std::uint64_t seed = 4242) {
    data = simulate(truth(seed));
    data.source_file = "new.csv";
    model = deployed_model(head(data, kTrainingRows), config);
  }
};

std::string message_of(const FittedModel& model, const SeriesData& data, const RunConfig& config,
                       const RevalidateOptions& options = {}) {
  try {
    revalidate(model, data, config, options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(RevalidateCadence, ThreeNewRowsGiveAVerdictWithAThinEvidenceNote) {
  const Deployed s;
  const SeriesData three = head(s.data, kTrainingRows + 3);
  const RevalidationResult r = revalidate(s.model, three, s.config);
  EXPECT_EQ(r.history.new_rows, 3);
  EXPECT_EQ(r.history.new_observed, 3);
  EXPECT_EQ(r.residuals.n, 3);
  EXPECT_TRUE(r.evidence.thin);
  // t(0.95, 2) = 2.919986 (R: qt(0.95, 2)); 1 + 2.919986 * 0.7555 / sqrt(3) = 2.2737.
  EXPECT_NEAR(r.evidence.detectable_ratio, 1.0 + 2.919986 * 0.7555 / std::sqrt(3.0), 1e-5);
  ASSERT_FALSE(r.reasons.empty());
  const std::string& note = r.reasons.back();
  EXPECT_EQ(
      note.rfind("note: the evidence is thin: 3 new one-step errors; not tested for lack of rows: "
                 "accuracy against training time at horizons 1 to 3",
                 0),
      0u)
      << note;
  EXPECT_NE(note.find("about 2.3 times those at training"), std::string::npos) << note;
  // The challenger comparison: no horizon has h + 3 pairs with 3 rows.
  EXPECT_TRUE(r.challengers.by_horizon.empty());
  EXPECT_EQ(r.challengers.untested.size(), 3u);
  const auto j = to_json(r);
  EXPECT_EQ(j["evidence"]["thin"], true);
  EXPECT_EQ(j["new_period"]["rows"].size(), 3u);
  EXPECT_EQ(j["new_period"]["rows"][0], kTrainingRows + 1);
  const std::string text = summary_text(r);
  EXPECT_EQ(text.find("nan"), std::string::npos) << text;
  EXPECT_NE(text.find("not tested"), std::string::npos) << text;
  EXPECT_NE(text.find("Diebold-Mariano tests cover 0 of 3 horizons"), std::string::npos) << text;
}

TEST(RevalidateCadence, TheMinimumOfNewRowsIsAnOption) {
  const Deployed s;
  EXPECT_EQ(
      message_of(s.model, head(s.data, kTrainingRows), s.config),
      "new.csv: 300 rows of 'y' (1 to 300), but the model was trained on 300 rows, 1 to 300; "
      "re-validation needs at least 1 new observed target value after them and found 0. Append "
      "the observations that arrived since training to the data file and run again");
  RevalidateOptions o;
  o.min_new_rows = 4;
  EXPECT_NE(
      message_of(s.model, head(s.data, kTrainingRows + 3), s.config, o)
          .find("needs at least 4 new observed target values after them and found 3. Append the "
                "observations that arrived since training to the data file and run again (or lower "
                "revalidate.min_new_rows / --min-new-rows)"),
      std::string::npos);
  o.min_new_rows = 0;
  EXPECT_NE(message_of(s.model, s.data, s.config, o).find("must be at least 1"), std::string::npos);
}

TEST(RevalidateCadence, TheMinimumIsReadFromTheConfig) {
  const std::string base = "data: {file: d.csv}\ntarget: {column: y}\n";
  EXPECT_EQ(parse_config(base, "c.yaml").revalidate.min_new_rows, 1);
  EXPECT_EQ(
      parse_config(base + "revalidate: {min_new_rows: 3}\n", "c.yaml").revalidate.min_new_rows, 3);
  for (const std::string bad : {"revalidate: {min_new_rows: 0}\n", "revalidate: {min_rows: 2}\n"}) {
    try {
      parse_config(base + bad, "c.yaml");
      ADD_FAILURE() << bad;
    } catch (const InputError& e) {
      EXPECT_NE(std::string(e.what()).find("c.yaml:3"), std::string::npos) << e.what();
      EXPECT_NE(std::string(e.what()).find("revalidate"), std::string::npos) << e.what();
    }
  }
}

TEST(RevalidateCadence, ARollingExtractGivesTheSameResultAsTheWholeFile) {
  const Deployed s;
  const RevalidationResult whole = revalidate(s.model, s.data, s.config);
  const SeriesData extract = slice_rows(s.data, 150, s.data.rows());  // starts at training row 151
  const RevalidationResult rolling = revalidate(s.model, extract, s.config);
  EXPECT_EQ(rolling.history.first_training_row, 151);
  EXPECT_EQ(rolling.history.prepended, 150);
  EXPECT_EQ(rolling.history.overlap_rows, 150);
  EXPECT_EQ(rolling.history.file_rows, 250);
  EXPECT_EQ(rolling.history.rows, kTrainingRows + kNewRows);
  EXPECT_FALSE(rolling.history.revised);
  EXPECT_EQ(rolling.history.found_fingerprint, s.model.training.fingerprint);
  EXPECT_EQ(to_string(rolling.verdict), to_string(whole.verdict));
  EXPECT_EQ(rolling.performance.score, whole.performance.score);
  ASSERT_EQ(rolling.drift.parameters.size(), whole.drift.parameters.size());
  for (size_t i = 0; i < whole.drift.parameters.size(); ++i)
    EXPECT_EQ(rolling.drift.parameters[i].refit, whole.drift.parameters[i].refit);
  // A file that starts before the training start: the earlier rows are left out.
  const FittedModel later = deployed_model(slice_rows(s.data, 20, kTrainingRows), s.config);
  const RevalidationResult earlier = revalidate(later, s.data, s.config);
  EXPECT_EQ(earlier.history.dropped_leading, 20);
  EXPECT_EQ(earlier.history.prepended, 0);
  EXPECT_EQ(earlier.history.new_rows, kNewRows);
}

TEST(RevalidateCadence, ARevisedValueIsNamedByRowStampColumnAndValues) {
  const Deployed s;
  SeriesData extract = slice_rows(s.data, 150, s.data.rows());
  const double old_value = extract.target[50];  // training row 201
  extract.target[50] = 12.5;
  extract.inputs[0][60] += 1.0;  // a second revision, counted
  EXPECT_EQ(
      message_of(s.model, extract, s.config),
      fmt::format("new.csv: a training value was revised: row 51 of new.csv (training row 201, "
                  "201): 'y' was {} when the model was trained, 12.5 now (2 revised values in "
                  "all). The model was fitted on the old value; check the file, or pass "
                  "--allow-revised-history to re-validate on the revised data",
                  old_value));
  RevalidateOptions allow;
  allow.allow_revised_history = true;
  const RevalidationResult r = revalidate(s.model, extract, s.config, allow);
  EXPECT_TRUE(r.history.revised);
  EXPECT_EQ(r.history.revision_count, 2);
  ASSERT_EQ(r.history.revisions.size(), 2u);
  EXPECT_NE(r.history.revisions[1].find("row 61 of new.csv (training row 211, 211): 'x'"),
            std::string::npos);

  // A row removed inside the training period shifts the stamps: refused, always.
  SeriesData gap = s.data;
  gap.time.erase(gap.time.begin() + 100);
  gap.target.erase(gap.target.begin() + 100);
  for (auto& x : gap.inputs) x.erase(x.begin() + 100);
  EXPECT_NE(message_of(s.model, gap, s.config, allow)
                .find("row 101 is stamped '102' where training row 101 was '101': a row was added "
                      "or removed"),
            std::string::npos);
  // No overlap at all.
  EXPECT_NE(message_of(s.model, slice_rows(s.data, kTrainingRows, s.data.rows()), s.config)
                .find("do not overlap the model's training rows (1 to 300)"),
            std::string::npos);
}

TEST(RevalidateCadence, OlderModelFilesWithoutTrainingRowsFallBackToTheFingerprint) {
  Deployed s;
  // Written and read back without training.data, as a model file of an earlier version.
  auto doc = to_json(s.model);
  ASSERT_TRUE(doc["training"].contains("data"));
  doc["training"].erase("data");
  const FittedModel old = fitted_model_from_json(doc, "old.json");
  EXPECT_TRUE(old.training.data.empty());
  const RevalidationResult r = revalidate(old, s.data, s.config);
  EXPECT_FALSE(r.history.checked_by_value);
  EXPECT_EQ(r.history.found_fingerprint, s.model.training.fingerprint);
  const std::string message = message_of(old, slice_rows(s.data, 150, s.data.rows()), s.config);
  EXPECT_NE(message.find("predates stored training rows"), std::string::npos) << message;
}

TEST(RevalidateCadence, TheModelFileKeepsTheTrainingRowsAtFullPrecision) {
  Deployed s;
  s.model.training.data.filled[1].assign(kTrainingRows, 0);
  s.model.training.data.filled[1][7] = 1;
  const FittedModel back = fitted_model_from_json(to_json(s.model), "m.json");
  ASSERT_EQ(back.training.data.columns, (std::vector<std::string>{"y", "x"}));
  ASSERT_EQ(back.training.data.rows(), kTrainingRows);
  EXPECT_EQ(back.training.data.values[0], s.model.training.data.values[0]);  // exactly
  EXPECT_EQ(back.training.data.values[1], s.model.training.data.values[1]);
  EXPECT_TRUE(back.training.data.was_filled(1, 7));
  EXPECT_FALSE(back.training.data.was_filled(1, 8));
  EXPECT_FALSE(back.training.data.was_filled(0, 7));
  auto bad = to_json(s.model);
  bad["training"]["data"]["columns"][0]["values"].erase(0);
  try {
    fitted_model_from_json(bad, "m.json");
    ADD_FAILURE() << "a short column was accepted";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "m.json: model file field 'training.data.columns[0].values' has 299 values for the "
              "300 training rows");
  }
}

// Issue of the ragged edge: the last two target values were not in when the model was trained;
// filled in later, they are late values, scored as new observations (from row 299 on).
TEST(RevalidateCadence, ARaggedEdgeFilledInLaterIsUsedNotRevised) {
  Deployed s;
  SeriesData training = head(s.data, kTrainingRows);
  training.target[kTrainingRows - 2] = std::nan("");
  training.target[kTrainingRows - 1] = std::nan("");
  const FittedModel model = deployed_model(training, s.config);
  EXPECT_EQ(model.training.missing_target, 2);
  const RevalidationResult r = revalidate(model, slice_rows(s.data, 100, s.data.rows()), s.config);
  EXPECT_FALSE(r.history.revised);
  EXPECT_EQ(r.history.late_values, 2);
  EXPECT_EQ(r.history.ragged_edge, 2);
  EXPECT_EQ(r.history.first_scored_row, kTrainingRows - 1);
  EXPECT_EQ(r.history.new_observed, kNewRows + 2);
  EXPECT_EQ(r.performance.first_origin, kTrainingRows - 2);
  EXPECT_EQ(r.residuals.n, kNewRows + 2);
  ASSERT_FALSE(r.new_period.rows.empty());
  EXPECT_EQ(r.new_period.rows.front(), kTrainingRows - 1);
  EXPECT_EQ(r.new_period.actual.front(), s.data.target[kTrainingRows - 2]);  // the late value, used
  bool said = false;
  for (const auto& reason : r.reasons)
    said =
        said || reason.find("2 target values missing at training (the ragged edge) are in now") !=
                    std::string::npos;
  EXPECT_TRUE(said);
  // Without the ragged edge the same file scores from row 301.
  const RevalidationResult plain = revalidate(s.model, s.data, s.config);
  EXPECT_EQ(plain.history.first_scored_row, kTrainingRows + 1);
}

// An input value missing at training was filled by interpolation; the file now holds the
// observed value, which differs: not a revision. The same difference without the fill mark is one.
TEST(RevalidateCadence, InterpolatedInputValuesObservedLaterAreNotRevisions) {
  Deployed s;
  SeriesData training = head(s.data, kTrainingRows);
  training.inputs[0][120] = 0.5 * (training.inputs[0][119] + training.inputs[0][121]);
  training.input_filled.assign(1, std::vector<unsigned char>(kTrainingRows, 0));
  training.input_filled[0][120] = 1;
  const FittedModel model = deployed_model(training, s.config);
  ASSERT_TRUE(model.training.data.was_filled(1, 120));
  const RevalidationResult r = revalidate(model, s.data, s.config);
  EXPECT_FALSE(r.history.revised);
  EXPECT_EQ(r.history.refilled, 1);

  SeriesData unmarked = training;
  unmarked.input_filled.clear();
  const FittedModel model2 = deployed_model(unmarked, s.config);
  EXPECT_NE(message_of(model2, s.data, s.config)
                .find("row 121 of new.csv (training row 121, 121): 'x' was "),
            std::string::npos);
}

}  // namespace
}  // namespace lagsieve
