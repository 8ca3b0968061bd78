#include "model/past.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>

#include "data/transform.h"
#include "io/csv.h"
#include "model/arma_filter.h"
#include "model/likelihood.h"
#include "model/polynomial.h"

namespace lagsieve {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string scale_name(const TargetTransform& t) {
  switch (t.kind) {
    case TransformKind::none:
      return "target";
    case TransformKind::log:
      return "log(target)";
    case TransformKind::boxcox:
      return fmt::format("Box-Cox(target, lambda {})", t.lambda);
  }
  return "target";
}

nlohmann::json numbers(const std::vector<double>& v) {
  auto out = nlohmann::json::array();
  for (double x : v) out.push_back(std::isfinite(x) ? nlohmann::json(x) : nlohmann::json(nullptr));
  return out;
}

// Shortest text that reads back as the same double, so the columns add up as they did here.
std::string exact_number(double v) { return std::isfinite(v) ? fmt::format("{}", v) : ""; }

}  // namespace

PastFit explain_past(const SeriesData& data, const ModelSpec& spec, const ModelParams& params,
                     int start) {
  const LikelihoodProblem problem = make_problem(data, spec, start);
  const int n = problem.n_rows();
  const int lost = spec.differencing.lost();

  // Raw one-step errors of the noise: standardised innovations times sqrt(F_t).
  const auto noise = model_noise(problem, params);
  RowMatrix column(n, 1);
  for (int t = 0; t < n; ++t)
    column(t, 0) = problem.is_missing(start + t) ? 0.0 : noise[static_cast<size_t>(start + t)];
  std::span<const unsigned char> missing;
  if (!problem.missing.empty())
    missing = std::span<const unsigned char>(problem.missing).subspan(static_cast<size_t>(start));
  ArmaFilterWorkspace ws;
  std::vector<double> scaled, f;
  arma_filter(expand_ar(params.phi, params.seasonal_phi, spec.noise.period),
              expand_ma(params.theta, params.seasonal_theta, spec.noise.period), column, ws,
              &scaled, &f, missing);

  const auto level = apply_transform(data.target, spec.transform, data.target_name.c_str());
  std::vector<std::vector<double>> responses;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& raw = data.inputs[static_cast<size_t>(data.input_index(spec.inputs[i].name))];
    responses.push_back(transfer_response(raw, spec.inputs[i].order, params.inputs[i]));
    // An estimated filter start (fit.filter_start: estimated) adds the homogeneous solution of
    // delta(B) from the sample start on, on the differenced scale: integrate it to the target's.
    const auto& state = params.inputs[i].state;
    if (state.empty()) continue;
    const int rows = data.rows() - (start + lost);
    if (rows <= 0) continue;
    // Zero before the sample start: undifference from a zero head.
    const auto g =
        undifference(std::vector<double>(static_cast<size_t>(lost), 0.0),
                     homogeneous_solution(params.inputs[i].delta, state, rows), spec.differencing);
    for (int t = 0; t < rows; ++t)
      responses.back()[static_cast<size_t>(start + lost + t)] += g[static_cast<size_t>(lost + t)];
  }

  PastFit past;
  past.scale = scale_name(spec.transform);
  past.sigma = std::sqrt(params.sigma2);
  for (const auto& term : spec.inputs) past.inputs.push_back({term.name, {}});
  for (int t = 0; t < n; ++t) {
    const int row = start + t + lost;
    const bool observed = !problem.is_missing(start + t);
    const double error =
        observed ? scaled[static_cast<size_t>(t)] * std::sqrt(f[static_cast<size_t>(t)]) : kNaN;
    const double actual = level[static_cast<size_t>(row)];
    const double fitted = observed ? actual - error : kNaN;
    past.rows.push_back(row);
    past.time.push_back(data.time.empty() ? std::string() : data.time[static_cast<size_t>(row)]);
    past.actual.push_back(actual);
    past.fitted.push_back(fitted);
    past.residual.push_back(observed ? actual - fitted : kNaN);
    past.residual_sd.push_back(observed ? std::sqrt(params.sigma2 * f[static_cast<size_t>(t)])
                                        : kNaN);
    double explained = 0.0;
    for (size_t i = 0; i < responses.size(); ++i) {
      const double x = responses[i][static_cast<size_t>(row)];
      past.inputs[i].values.push_back(x);
      explained += x;
    }
    past.noise.push_back(fitted - explained);
  }
  return past;
}

nlohmann::json past_to_json(const PastFit& past) {
  nlohmann::json j;
  j["scale"] = past.scale;
  j["note"] =
      "fitted = one-step prediction from the rows before; residual = actual - fitted; each input's "
      "contribution is its filtered value omega(B) B^b / delta(B) x on the scale above; noise = "
      "fitted minus the contributions (constant and predicted noise)";
  j["time"] = past.time;
  auto rows = nlohmann::json::array();
  for (int r : past.rows) rows.push_back(r + 1);
  j["row"] = rows;
  j["actual"] = numbers(past.actual);
  j["fitted"] = numbers(past.fitted);
  j["residual"] = numbers(past.residual);
  j["residual_sd"] = numbers(past.residual_sd);
  j["contributions"] = nlohmann::json::array();
  for (const auto& c : past.inputs)
    j["contributions"].push_back({{"input", c.input}, {"values", numbers(c.values)}});
  j["noise"] = numbers(past.noise);
  j["sigma"] = past.sigma;
  return j;
}

std::string past_csv(const PastFit& past) {
  const bool stamped = !past.time.empty() && !past.time.front().empty();
  std::string out = stamped ? "time" : "row";
  out += ",actual,fitted,residual";
  for (const auto& c : past.inputs) out += "," + csv_field(c.input);
  out += ",noise\n";
  for (size_t t = 0; t < past.rows.size(); ++t) {
    out += stamped ? csv_field(past.time[t]) : std::to_string(past.rows[t] + 1);
    out += "," + exact_number(past.actual[t]) + "," + exact_number(past.fitted[t]) + "," +
           exact_number(past.residual[t]);
    for (const auto& c : past.inputs) out += "," + exact_number(c.values[t]);
    out += "," + exact_number(past.noise[t]) + "\n";
  }
  return out;
}

}  // namespace lagsieve
