#pragma once
// A small synthetic run folder for the report tests: every run file written by hand with known
// numbers (the model file through the real writer), so each chart can be checked against them.
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <string>
#include <vector>

#include "forecast/fitted_model.h"
#include "forecast/model_file.h"

namespace lagsieve::test {

namespace fs = std::filesystem;
using nlohmann::json;

inline void write_text(const fs::path& file, const std::string& text) {
  fs::create_directories(file.parent_path());
  std::ofstream out(file, std::ios::binary);
  out << text;
}

// A fresh empty folder under the system temp dir.
inline fs::path fresh_dir(const std::string& name) {
  std::random_device rd;
  const fs::path dir =
      fs::temp_directory_path() / ("lagsieve-report-" + name + "-" + std::to_string(rd()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

// The chosen model: demand on temp with b = 1, s = 0, r = 1, omega_0 = 2, delta_1 = 0.5, so its impulse
// response is v_0 = 0, v_k = 2 * 0.5^(k - 1) for k >= 1.
inline FittedModel chosen_model(const std::string& series) {
  FittedModel m;
  m.spec.inputs = {InputTerm{"temp", InputOrder{1, 0, 1}}};
  m.spec.noise.p = 1;
  m.spec.constant = true;
  m.params.constant = 0.5;
  m.params.sigma2 = 1.5;
  m.params.phi = {0.3};
  m.params.inputs = {InputParams{{2.0}, {0.5}}};
  m.param_names = {"constant", "temp.omega0", "temp.delta1", "phi1"};
  m.covariance = Eigen::MatrixXd::Identity(4, 4) * 0.01;
  InputUse use;
  use.name = "temp";
  use.future = FutureMode::forecast;
  m.inputs = {use};
  InputModel im;
  im.input = "temp";
  im.p = 1;
  im.phi = {0.6};
  im.sigma2 = 1.0;
  im.chosen_by_aic = true;
  m.input_models = {im};
  m.loglik = -140.5;
  m.aic = 289.0;
  m.aicc = 289.4;
  m.bic = 301.2;
  m.n_obs = 96;
  m.n_params = 5;
  m.fit_status = "ok";
  m.training.source_file = "data/heat.csv";
  m.training.target_column = series;
  m.training.rows = 100;
  m.training.first_time = "2024-01-01";
  m.training.last_time = "2024-04-09";
  m.training.frequency = "daily";
  m.training.fingerprint = "abc123";
  m.training.config_file = "configs/heat.yaml";
  m.training.config_text =
      "target: " + series + "\ninputs:\n  - name: temp   # <b>&amp;</b> stays text\n";
  return m;
}

inline json ranking_json(const std::vector<std::string>& series) {
  json rows = json::array();
  for (const auto& s : series) {
    rows.push_back({{"series", s},
                    {"key", "temp b1 s0 r1 + ARMA(1,0)"},
                    {"rank", 1},
                    {"status", "ok"},
                    {"message", ""},
                    {"loglik", -140.5},
                    {"aic", 289.0},
                    {"aicc", 289.4},
                    {"bic", 301.2},
                    {"n_obs", 96},
                    {"n_params", 5},
                    {"ljung_box_p", 0.58},
                    {"seconds", 0.01},
                    {"backtest_score", 0.81},
                    {"backtest_rank", 1}});
    rows.push_back({{"series", s},
                    {"key", "temp b1 s1 r0 + ARMA(1,0)"},
                    {"rank", 2},
                    {"status", "boundary"},
                    {"message", "delta near 1"},
                    {"loglik", -141.0},
                    {"aic", 290.0},
                    {"aicc", 290.4},
                    {"bic", 302.45},
                    {"n_obs", 96},
                    {"n_params", 5},
                    {"ljung_box_p", 0.0004},
                    {"seconds", 0.01},
                    {"backtest_score", 0.86},
                    {"backtest_rank", 2}});
    rows.push_back({{"series", s},
                    {"key", "temp b2 s2 r2 + ARMA(2,2)"},
                    {"rank", 3},
                    {"status", "numerical_failure"},
                    {"message", "singular <matrix>"},
                    {"loglik", nullptr},
                    {"aic", nullptr},
                    {"aicc", nullptr},
                    {"bic", nullptr},
                    {"n_obs", 96},
                    {"n_params", 10},
                    {"ljung_box_p", nullptr},
                    {"seconds", 0.02}});
  }
  return {{"criterion", "bic"}, {"rows", rows}};
}

inline json screen_json(const std::string& series) {
  json temp = {{"name", "temp"},
               {"event", false},
               {"prewhitened", true},
               {"prewhitening", {{"order", 2}}},
               {"n", 100},
               {"max_lag", 3},
               {"lags", {-3, -2, -1, 0, 1, 2, 3}},
               {"cross_correlation", {0.05, -0.1, 0.02, 0.08, 0.62, 0.31, 0.14}},
               {"band", 0.2},
               {"family_band", 0.28},
               {"feedback_band", 0.27},
               {"impulse", {0.1, 2.1, 0.9, 0.55}},
               {"impulse_se", {0.2, 0.2, 0.25, 0.25}},
               {"impulse_fitted", {0.0, 2.0, 1.0, 0.5}},
               {"relevant", true},
               {"suggested_delay", 1},
               {"suggested_numerator", 0},
               {"suggested_denominator", 1},
               {"notes", {"delay 1 from lag 1"}}};
  json price = {{"name", "price"},
                {"event", false},
                {"prewhitened", true},
                {"prewhitening", {{"order", 0}}},
                {"n", 100},
                {"max_lag", 3},
                {"lags", {-3, -2, -1, 0, 1, 2, 3}},
                {"cross_correlation", {0.01, 0.03, -0.04, 0.12, -0.06, 0.02, nullptr}},
                {"band", 0.2},
                {"family_band", 0.28},
                {"feedback_band", 0.27},
                {"impulse", {0.3, -0.1, 0.05, nullptr}},
                {"impulse_se", {0.4, 0.4, 0.4, 0.4}},
                {"impulse_fitted", {0.0, 0.0, 0.0, 0.0}},
                {"relevant", false},
                {"suggested_delay", 0},
                {"suggested_numerator", 0},
                {"suggested_denominator", 0},
                {"notes", json::array()}};
  return {{"target", series},
          {"rows", 100},
          {"n_differenced", 99},
          {"inputs", {temp, price}},
          {"noise", {{"p", 1}, {"q", 0}, {"reason", "only the PACF cuts off"}}},
          {"warnings",
           {{{"kind", "correlated_inputs"},
             {"inputs", {"temp", "price"}},
             {"message", "temp and price move together (corr 0.83)"}}}}};
}

// fit.json "past": nine days ending where the forecast history ends (2024-04-09); one missing
// target value; temp's contribution changes sign so the stacking is tested both ways.
inline json past_json() {
  return {{"scale", "target"},
          {"time",
           {"2024-04-01", "2024-04-02", "2024-04-03", "2024-04-04", "2024-04-05", "2024-04-06",
            "2024-04-07", "2024-04-08", "2024-04-09"}},
          {"row", {92, 93, 94, 95, 96, 97, 98, 99, 100}},
          {"actual", {9.5, 10.0, nullptr, 9.25, 9.0, 9.5, 8.75, 10.25, 9.8}},
          {"fitted", {9.25, 9.5, nullptr, 9.0, 9.5, 9.0, 9.5, 9.75, 10.0}},
          {"residual", {0.25, 0.5, nullptr, 0.25, -0.5, 0.5, -0.75, 0.5, -0.2}},
          {"residual_sd", {1.5, 1.25, nullptr, 1.25, 1.25, 1.25, 1.25, 1.25, 1.25}},
          {"contributions",
           {{{"input", "temp"}, {"values", {1.0, 0.5, 0.25, -0.5, -1.0, 0.5, 1.5, 1.0, 0.0}}}}},
          {"noise", {8.25, 9.0, nullptr, 9.5, 10.5, 8.5, 8.0, 8.75, 10.0}},
          {"sigma", 1.25}};
}

inline json fit_json(const std::string& series) {
  return {
      {"label", "temp b1 s0 r1 + ARMA(1,0)"},
      {"series", series},
      {"status", "ok"},
      {"message", ""},
      {"loglik", -140.5},
      {"sigma2", 1.5},
      {"aic", 289.0},
      {"aicc", 289.4},
      {"bic", 301.2},
      {"n_obs", 96},
      {"n_params", 5},
      {"params",
       {{{"name", "temp.omega0"}, {"value", 2.0}, {"std_error", 0.1}},
        {{"name", "temp.delta1"}, {"value", 0.5}, {"std_error", 0.05}},
        {{"name", "phi1"}, {"value", 0.3}, {"std_error", nullptr}}}},
      {"diagnostics",
       {{"ljung_box",
         {{{"lag", 12}, {"df", 11}, {"statistic", 8.5}, {"p_value", 0.668}},
          {{"lag", 24}, {"df", 23}, {"statistic", 20.25}, {"p_value", 0.6261}}}},
        {"gains", {{{"input", "temp"}, {"gain", 4.0}, {"std_error", 0.3}}}},
        {"roots",
         {{{"polynomial", "delta temp"}, {"min_modulus", 2.0}, {"roots", {{2.0, 0.0}}}},
          {{"polynomial", "phi"}, {"min_modulus", 3.333}, {"roots", {{3.333, 0.0}}}}}},
        {"warnings", {"omega of temp is large"}},
        {"residual_acf",
         {{"lags", {1, 2, 3, 4, 5}}, {"values", {0.05, -0.21, 0.1, 0.0, -0.03}}, {"band", 0.2}}},
        {"residual_input_ccf",
         {{{"input", "temp"},
           {"lags", {-3, -2, -1, 0, 1, 2, 3}},
           {"values", {0.02, -0.05, 0.01, 0.04, 0.03, 0.31, -0.06}},
           {"band", 0.2},
           {"statistic", 11.52},
           {"df", 2},
           {"p_value", 0.00315},
           {"ar_order", 1},
           {"n", 95},
           {"largest_lag", 2}}}}}},
      {"past", past_json()}};
}

inline json forecast_json(const std::string& series) {
  json fc = {{"time", {"2024-04-10", "2024-04-11", "2024-04-12"}},
             {"median", {10.0, 11.0, 12.0}},
             {"mean", {10.1, 11.1, 12.1}},
             {"levels", {0.8, 0.95}},
             {"input_treatment", {"forecast"}}};
  fc["lower"] = {{"0.8", {8.0, 8.5, 9.0}}, {"0.95", {7.0, 7.0, 7.0}}};
  fc["upper"] = {{"0.8", {12.0, 13.5, 15.0}}, {"0.95", {13.0, 15.0, 17.0}}};
  fc["lower_inputs_known"] = {{"0.8", {8.5, 9.25, 10.0}}, {"0.95", {7.5, 8.0, 8.5}}};
  fc["upper_inputs_known"] = {{"0.8", {11.5, 12.75, 14.0}}, {"0.95", {12.5, 14.0, 15.5}}};
  return {{"series", series},
          {"horizon", 3},
          {"forecast", fc},
          {"history",
           {{"time", {"2024-04-05", "2024-04-06", "2024-04-07", "2024-04-08", "2024-04-09"}},
            {"values", {9.0, 9.5, 8.75, 10.25, 9.8}}}}};
}

// accuracy.csv: the chosen model, the runner-up and a no-input benchmark, production and oracle.
inline std::string accuracy_csv() {
  return "model,mode,horizon,count,mae,rmse,mase,coverage_80,coverage_95,interval_score_80,"
         "interval_score_95\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",production,0,40,1.25,1.5,0.81,0.775,0.925,6.5,8.25\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",production,1,20,1.0,1.25,0.7,0.8,0.95,6.0,8.0\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",production,2,20,1.5,1.75,0.92,0.75,0.9,7.0,8.5\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",oracle,0,40,1.125,1.375,0.73,0.8,0.95,6.0,8.0\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",oracle,1,20,0.875,1.0,0.6,0.8,0.95,5.5,7.5\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",oracle,2,20,1.375,1.5,0.86,0.8,0.95,6.5,8.5\n"
         "\"temp b1 s1 r0 + ARMA(1,0)\",production,0,40,1.375,1.625,0.86,0.7,0.9,7.0,9.0\n"
         "\"temp b1 s1 r0 + ARMA(1,0)\",production,1,20,1.125,1.25,0.75,0.7,0.9,6.5,8.5\n"
         "\"temp b1 s1 r0 + ARMA(1,0)\",production,2,20,1.625,2.0,0.97,0.7,0.9,7.5,9.5\n"
         "benchmark: no inputs,production,0,40,2.0,2.5,1.25,0.8,0.95,9.0,12.0\n"
         "benchmark: no inputs,production,1,20,1.75,2.0,1.1,0.8,0.95,8.0,11.0\n"
         "benchmark: no inputs,production,2,20,2.25,3.0,1.4,0.8,0.95,10.0,13.0\n";
}

// backtest.csv: two origins, horizons 1 and 2, the chosen model in both modes and the runner-up.
inline std::string backtest_csv() {
  std::string out =
      "model,mode,origin,origin_time,horizon,time,forecast,actual,lower_80,upper_80,lower_95,upper_"
      "95\n";
  out += "\"temp b1 s0 r1 + ARMA(1,0)\",production,80,2024-03-20,1,2024-03-21,9.5,9.75,8,11,7,12\n";
  out +=
      "\"temp b1 s0 r1 + "
      "ARMA(1,0)\",production,80,2024-03-20,2,2024-03-22,9.25,10.5,7.5,11,6.5,12\n";
  out += "\"temp b1 s0 r1 + ARMA(1,0)\",oracle,80,2024-03-20,1,2024-03-21,9.6,9.75,8.2,11,7.2,12\n";
  out +=
      "\"temp b1 s1 r0 + "
      "ARMA(1,0)\",production,80,2024-03-20,1,2024-03-21,9.0,9.75,7.5,10.5,6.5,11.5\n";
  out +=
      "\"temp b1 s0 r1 + "
      "ARMA(1,0)\",production,81,2024-03-21,1,2024-03-22,10.125,10.5,8.625,11.625,7.625,12.625\n";
  out +=
      "\"temp b1 s0 r1 + "
      "ARMA(1,0)\",production,81,2024-03-21,2,2024-03-23,10.0,8.0,8.5,11.5,7.5,12.5\n";
  out +=
      "\"temp b1 s0 r1 + "
      "ARMA(1,0)\",production,82,2024-03-22,1,2024-03-23,8.5,8.0,7.0,10.0,6.0,11.0\n";
  return out;
}

inline std::string comparisons_csv() {
  return "chosen,challenger,horizon,loss,n,mean_difference,statistic,p_value,status\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",\"temp b1 s1 r0 + "
         "ARMA(1,0)\",0,squared,40,-0.125,-1.25,0.218,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",benchmark: no inputs,0,squared,40,-0.75,-3.5,0.0012,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",\"temp b1 s1 r0 + "
         "ARMA(1,0)\",1,squared,20,0.5,2.5,0.02,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",\"temp b1 s1 r0 + "
         "ARMA(1,0)\",2,squared,20,-0.25,-0.5,0.6,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",\"temp b1 s1 r0 + "
         "ARMA(1,0)\",5,squared,4,,,,not_tested\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",benchmark: no inputs,1,squared,20,-0.5,-3.0,0.007,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",benchmark: no "
         "inputs,2,squared,20,-0.75,-4.0,0.0009,variance_fallback\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",benchmark: no inputs,3,squared,20,-0.1,-0.5,0.6,ok\n"
         "\"temp b1 s0 r1 + ARMA(1,0)\",benchmark: no inputs,4,squared,20,-0.9,-3.0,0.01,ok\n";
}

inline std::string input_value_csv() {
  return "input,score_with,score_without,difference,statistic,p_value\n"
         "temp,0.81,1.25,0.44,3.25,0.0024\n";
}

// A complete single-series run folder (search + backtest).
inline void write_full_run(const fs::path& dir, const std::string& series = "demand") {
  save_model(dir / "model.json", chosen_model(series));
  write_text(dir / "ranking.json", ranking_json({series}).dump(2));
  write_text(dir / "screen.json", screen_json(series).dump(1));
  write_text(dir / "fit.json", fit_json(series).dump(1));
  write_text(dir / "forecast.json", forecast_json(series).dump(1));
  write_text(dir / "accuracy.csv", accuracy_csv());
  write_text(dir / "backtest.csv", backtest_csv());
  write_text(dir / "comparisons.csv", comparisons_csv());
  write_text(dir / "input_value.csv", input_value_csv());
}

}  // namespace lagsieve::test
