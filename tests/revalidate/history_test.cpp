// Re-validation refuses data that do not extend the training rows, and training rows that differ
// from the model's (a revised history), unless allowed. Messages are asserted exactly where they
// are the user's only guide.
#include <gtest/gtest.h>

#include <string>

#include "core/error.h"
#include "revalidate/revalidate.h"
#include "revalidate_test_util.h"

namespace lagsieve {
namespace {

using namespace lagsieve::testing;

struct Deployed {
  RunConfig config = small_config();
  SeriesData data;
  FittedModel model;
  Deployed() {
    data = simulate(truth(4242));
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

TEST(RevalidateHistory, RefusesDataThatDoNotExtendTheTrainingRows) {
  const Deployed s;
  EXPECT_NE(message_of(s.model, head(s.data, kTrainingRows), s.config)
                .find("needs at least 1 new observed target value after them and found 0"),
            std::string::npos);
  EXPECT_NE(message_of(s.model, head(s.data, 200), s.config).find("200 rows of 'y' (1 to 200)"),
            std::string::npos);
}

TEST(RevalidateHistory, RefusesARevisedTargetValueUnlessAllowed) {
  const Deployed s;
  SeriesData revised = s.data;
  revised.target[123] += 0.01;
  const std::string message = message_of(s.model, revised, s.config);
  EXPECT_EQ(message.rfind("new.csv: a training value was revised: row 124 of new.csv (training row "
                          "124, 124): 'y' was ",
                          0),
            0u)
      << message;
  EXPECT_NE(message.find("pass --allow-revised-history to re-validate on the revised data"),
            std::string::npos);

  RevalidateOptions allow;
  allow.allow_revised_history = true;
  const RevalidationResult r = revalidate(s.model, revised, s.config, allow);
  EXPECT_TRUE(r.history.revised);
  EXPECT_NE(r.history.found_fingerprint, r.history.expected_fingerprint);
  EXPECT_NE(r.reasons.back().find("allowed by --allow-revised-history"), std::string::npos);
}

TEST(RevalidateHistory, RefusesARevisedInputValueAndShiftedStamps) {
  const Deployed s;
  SeriesData revised = s.data;
  revised.inputs[0][5] *= 1.5;
  EXPECT_NE(
      message_of(s.model, revised, s.config).find("row 6 of new.csv (training row 6, 6): 'x' was "),
      std::string::npos);

  // Same values, but stamped one period later: the values no longer line up with the stamps.
  SeriesData shifted = s.data;
  for (auto& t : shifted.time) t = std::to_string(std::stoi(t) + 1);
  EXPECT_NE(
      message_of(s.model, shifted, s.config).find("row 1 of new.csv (training row 2, 2): 'y' was "),
      std::string::npos);
}

TEST(RevalidateHistory, UnrevisedHistoryPassesAndMatchesTheFingerprint) {
  const Deployed s;
  const RevalidationResult r = revalidate(s.model, s.data, s.config);
  EXPECT_FALSE(r.history.revised);
  EXPECT_EQ(r.history.found_fingerprint, s.model.training.fingerprint);
  EXPECT_EQ(r.history.new_rows, kNewRows);
  EXPECT_EQ(r.history.new_first_time, "301");
  EXPECT_EQ(r.performance.first_origin, kTrainingRows);
  EXPECT_EQ(r.performance.origins, kNewRows);
  EXPECT_EQ(r.performance.baseline_source, "recomputed on the training rows");
  EXPECT_EQ(r.residuals.n, kNewRows);
  ASSERT_TRUE(r.refit_model.has_value());
  EXPECT_EQ(r.refit_model->training.rows, kTrainingRows + kNewRows);
  const auto j = to_json(r);
  EXPECT_EQ(j["verdict"], std::string(to_string(r.verdict)));
  EXPECT_EQ(j["performance"]["by_horizon"].size(), 3u);
}

TEST(RevalidateHistory, OptionsAreValidated) {
  const Deployed s;
  RevalidateOptions o;
  o.alpha = 1.5;
  EXPECT_EQ(message_of(s.model, s.data, s.config, o),
            "revalidate: alpha 1.5 must lie strictly between 0 and 1");
  o.alpha = 0.05;
  o.drift_threshold = 0.0;
  EXPECT_NE(message_of(s.model, s.data, s.config, o).find("drift threshold 0"), std::string::npos);
}

}  // namespace
}  // namespace lagsieve
