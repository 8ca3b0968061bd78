// Fitted values, residuals and input contributions (model/past.h) against R's one-step
// predictions (tests/reference/past_fit) and against their own identities.
#include <gtest/gtest.h>

#include <fmt/format.h>

#include <cmath>

#include "fixture.h"
#include "io/csv.h"
#include "model/past.h"

namespace lagsieve {
namespace {

using testing::csv_column;
using testing::load_fixture;
using testing::to_vector;

double scaled_gap(double a, double b) { return std::abs(a - b) / std::max(1.0, std::abs(b)); }

// sales on lead (b = 3), d = 1, ARMA(1,1), no constant, at R's coefficients.
struct Case {
  SeriesData data;
  ModelSpec spec;
  ModelParams params;
  int start = 0;
};

Case bjsales_case(const nlohmann::json& fx) {
  Case c;
  c.data.target_name = "sales";
  c.data.target = csv_column("data/bjsales.csv", "sales");
  c.data.input_names = {"lead"};
  c.data.inputs = {csv_column("data/bjsales.csv", "lead")};
  c.spec.inputs = {{"lead", {3, 0, 0}}};
  c.spec.noise = {1, 1, 0, 0, 1};
  c.spec.constant = false;
  c.spec.differencing = {1, 0, 1};
  const auto coef = to_vector(fx["coef"]);  // ar1, ma1, lead
  c.params = zero_params(c.spec);
  c.params.phi = {coef[0]};
  c.params.theta = {coef[1]};
  c.params.inputs[0].omega = {coef[2]};
  c.params.sigma2 = fx["sigma2"];
  c.start = 3;
  return c;
}

Case seatbelts_case(const nlohmann::json& fx) {
  Case c;
  const std::string file = "calendar/seatbelts_monthly.csv";
  c.data.target_name = "drivers";
  c.data.target = csv_column(file, "drivers");
  c.data.input_names = {"PetrolPrice", "law"};
  c.data.inputs = {csv_column(file, "PetrolPrice"), csv_column(file, "law")};
  c.spec.inputs = {{"PetrolPrice", {0, 0, 0}}, {"law", {0, 0, 0}}};
  c.spec.noise = {1, 1, 0, 0, 1};
  const auto coef = to_vector(fx["coef"]);  // ar1, ma1, intercept, PetrolPrice, law
  c.params = zero_params(c.spec);
  c.params.phi = {coef[0]};
  c.params.theta = {coef[1]};
  c.params.constant = coef[2];
  c.params.inputs[0].omega = {coef[3]};
  c.params.inputs[1].omega = {coef[4]};
  c.params.sigma2 = fx["sigma2"];
  return c;
}

void expect_matches_r(const Case& c, const nlohmann::json& fx) {
  const PastFit past = explain_past(c.data, c.spec, c.params, c.start);
  const auto rows = fx["rows"].get<std::vector<int>>();
  const auto fitted = to_vector(fx["fitted"]);
  ASSERT_EQ(past.rows.size(), rows.size());
  for (size_t t = 0; t < rows.size(); ++t) {
    EXPECT_EQ(past.rows[t] + 1, rows[t]);
    EXPECT_LE(scaled_gap(past.fitted[t], fitted[t]), 1e-9) << "row " << rows[t];
  }
}

void expect_identities(const PastFit& past) {
  for (size_t t = 0; t < past.rows.size(); ++t) {
    double sum = past.noise[t];
    for (const auto& c : past.inputs) sum += c.values[t];
    EXPECT_LE(scaled_gap(sum, past.fitted[t]), 1e-10) << "row " << past.rows[t];
    EXPECT_EQ(past.actual[t] - past.fitted[t], past.residual[t]) << "row " << past.rows[t];
  }
}

TEST(PastFit, BjsalesFittedValuesMatchROneStepPredictions) {
  const auto fx = load_fixture("past_fit/past_fit_r.json")["bjsales"];
  const Case c = bjsales_case(fx);
  expect_matches_r(c, fx);
  const PastFit past = explain_past(c.data, c.spec, c.params, c.start);
  expect_identities(past);
  // The lead's contribution on the level scale is omega * lead[t - 3], undifferenced.
  for (size_t t = 0; t < past.rows.size(); ++t)
    EXPECT_NEAR(past.inputs[0].values[t],
                c.params.inputs[0].omega[0] * c.data.inputs[0][past.rows[t] - 3], 1e-12);
  // In the steady state the residual sd is sigma (F_t = 1 once the filter has converged).
  EXPECT_NEAR(past.residual_sd.back(), past.sigma, 1e-9 * past.sigma);
  EXPECT_GT(past.residual_sd.front(), past.sigma);
}

TEST(PastFit, SeatbeltsFittedValuesMatchROneStepPredictions) {
  const auto fx = load_fixture("past_fit/past_fit_r.json")["seatbelts"];
  const Case c = seatbelts_case(fx);
  expect_matches_r(c, fx);
  const PastFit past = explain_past(c.data, c.spec, c.params, c.start);
  expect_identities(past);
  // The law step's contribution is zero before February 1983 and omega after.
  EXPECT_EQ(past.inputs[1].values.front(), 0.0);
  EXPECT_DOUBLE_EQ(past.inputs[1].values.back(), c.params.inputs[1].omega[0]);
  // Standardised residuals v_t / sqrt(F_t) equal R's residuals.
  const auto std_res = to_vector(fx["std_residuals"]);
  for (size_t t = 0; t < past.rows.size(); ++t)
    EXPECT_NEAR(past.residual[t] / past.residual_sd[t] * past.sigma, std_res[t],
                1e-9 * std::max(1.0, std::abs(std_res[t])));
}

TEST(PastFit, MissingTargetRowsHaveNoFittedValue) {
  const auto fx = load_fixture("past_fit/past_fit_r.json")["seatbelts"];
  Case c = seatbelts_case(fx);
  c.data.target[100] = std::nan("");
  const PastFit past = explain_past(c.data, c.spec, c.params, c.start);
  EXPECT_TRUE(std::isnan(past.fitted[100]));
  EXPECT_TRUE(std::isnan(past.residual[100]));
  EXPECT_TRUE(std::isfinite(past.fitted[101]));
  EXPECT_EQ(past_to_json(past)["fitted"][100], nullptr);
}

TEST(PastFit, CsvReadsBackAndAddsUp) {
  const auto fx = load_fixture("past_fit/past_fit_r.json")["seatbelts"];
  Case c = seatbelts_case(fx);
  for (int t = 0; t < c.data.rows(); ++t) c.data.time.push_back(fmt::format("row{}", t));
  const PastFit past = explain_past(c.data, c.spec, c.params, c.start);
  const CsvTable table = parse_csv(past_csv(past), "past.csv");
  ASSERT_EQ(table.header, (std::vector<std::string>{"time", "actual", "fitted", "residual",
                                                    "PetrolPrice", "law", "noise"}));
  ASSERT_EQ(table.rows.size(), past.rows.size());
  for (size_t t = 0; t < table.rows.size(); ++t) {
    const auto& row = table.rows[t];
    EXPECT_EQ(row[0], c.data.time[t]);
    const double fitted = std::stod(row[2]);
    EXPECT_EQ(fitted, past.fitted[t]);  // exact round trip
    EXPECT_LE(scaled_gap(std::stod(row[4]) + std::stod(row[5]) + std::stod(row[6]), fitted), 1e-10);
    EXPECT_EQ(std::stod(row[1]) - fitted, std::stod(row[3]));
  }
}

}  // namespace
}  // namespace lagsieve
