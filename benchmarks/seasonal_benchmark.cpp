// Cost of seasonal noise: one fit and one likelihood evaluation of a seasonal candidate (n = 240,
// two inputs, monthly period 12) and the candidates per CPU second of a seasonal grid, beside the
// same numbers for non-seasonal noise on the same data. A plain program, not a test.
//
//   seasonal_benchmark [--dump DIR] [--repeat R] [--json PATH]
//
// --dump DIR writes the simulated data of each case as DIR/<case>.csv (time,y,x1,x2) so that
// benchmarks/compare_seasonal.py can fit exactly the same numbers with R's arima.
#include <fmt/format.h>
#include <time.h>

#include <algorithm>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

constexpr int kRows = 240;
constexpr int kPeriod = 12;

double thread_cpu_seconds() {
  timespec ts{};
  ::clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return static_cast<double>(ts.tv_sec) + 1e-9 * static_cast<double>(ts.tv_nsec);
}

// The inputs of every case: x1 -> (1.5 + 0.7 B) B, x2 -> (-1 + 0.5 B) B^2, both AR(1) drivers.
// r = 0 so that R's arima fits the same model (lags as regressors) by exact ML.
std::vector<SimulatedInput> case_inputs() {
  SimulatedInput x1;
  x1.name = "x1";
  x1.order = {1, 1, 0};
  x1.params.omega = {1.5, 0.7};
  SimulatedInput x2;
  x2.name = "x2";
  x2.order = {2, 1, 0};
  x2.params.omega = {-1.0, 0.5};
  x2.ar = 0.3;
  return {x1, x2};
}

struct Case {
  std::string name;
  NoiseOrder noise;
  std::vector<double> phi, theta, seasonal_phi, seasonal_theta;
};

std::vector<Case> cases() {
  return {
      {"ma1_sma1", {0, 1, 0, 1, kPeriod}, {}, {0.4}, {}, {0.6}},
      {"ar1_sar1", {1, 0, 1, 0, kPeriod}, {0.5}, {}, {0.6}, {}},
      {"arma21", {2, 1, 0, 0, 1}, {0.5, -0.3}, {0.4}, {}, {}},
  };
}

SeriesData case_data(const Case& c) {
  SimulationSpec sim;
  sim.n = kRows;
  sim.seed = 20261203;
  sim.constant = 0.2;
  sim.noise = c.noise;
  sim.phi = c.phi;
  sim.theta = c.theta;
  sim.seasonal_phi = c.seasonal_phi;
  sim.seasonal_theta = c.seasonal_theta;
  sim.inputs = case_inputs();
  return simulate(sim);
}

ModelSpec case_spec(const Case& c) {
  ModelSpec spec;
  spec.inputs = {{"x1", {1, 1, 0}}, {"x2", {2, 1, 0}}};
  spec.noise = c.noise;
  spec.constant = true;
  return spec;
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v.size() % 2 ? v[v.size() / 2] : 0.5 * (v[v.size() / 2 - 1] + v[v.size() / 2]);
}

// Median thread-CPU seconds of `f` over `repeat` runs, each of `inner` calls.
template <typename F>
double time_median(int repeat, int inner, F&& f) {
  std::vector<double> times;
  for (int r = 0; r < repeat; ++r) {
    const double c0 = thread_cpu_seconds();
    for (int i = 0; i < inner; ++i) f();
    times.push_back((thread_cpu_seconds() - c0) / inner);
  }
  return median(times);
}

// The search's options for a candidate fit (no standard errors, no residual-input check).
FitOptions search_options() {
  FitOptions options;
  options.standard_errors = false;
  options.residual_input_check = false;
  return options;
}

// A grid over the inputs' orders (b 0..2 of x1 and 1..3 of x2, s 0..1, r 0..1) and noise with
// (p, q) in {0, 1}^2 and, for the seasonal grid, (P, Q) in {0, 1}^2 minus (0, 0).
std::vector<ModelSpec> grid(bool seasonal) {
  std::vector<ModelSpec> specs;
  for (int b1 = 0; b1 <= 2; ++b1)
    for (int s1 = 0; s1 <= 1; ++s1)
      for (int r1 = 0; r1 <= 1; ++r1)
        for (int b2 = 1; b2 <= 3; ++b2)
          for (int r2 = 0; r2 <= 1; ++r2)
            for (int p = 0; p <= 1; ++p)
              for (int q = 0; q <= 1; ++q)
                for (int sp = 0; sp <= (seasonal ? 1 : 0); ++sp)
                  for (int sq = 0; sq <= (seasonal ? 1 : 0); ++sq) {
                    if (seasonal && sp + sq == 0) continue;
                    ModelSpec spec;
                    spec.inputs = {{"x1", {b1, s1, r1}}, {"x2", {b2, 1, r2}}};
                    spec.noise = {p, q, sp, sq, seasonal ? kPeriod : 1};
                    spec.constant = true;
                    specs.push_back(spec);
                  }
  return specs;
}

struct GridTiming {
  int candidates = 0, failed = 0;
  long evaluations = 0, starts = 0;
  double cpu = 0.0;
};

GridTiming time_grid(const SeriesData& data, const std::vector<ModelSpec>& specs) {
  GridTiming g;
  const auto options = search_options();
  const double c0 = thread_cpu_seconds();
  for (const auto& spec : specs) {
    const auto fit = fit_model(make_problem(data, spec), options);
    ++g.candidates;
    g.evaluations += fit.evaluations;
    g.starts += fit.starts;
    if (!fit.usable()) ++g.failed;
  }
  g.cpu = thread_cpu_seconds() - c0;
  return g;
}

void write_csv(const SeriesData& data, const std::string& path) {
  std::ofstream out(path);
  out << "time,y";
  for (const auto& name : data.input_names) out << ',' << name;
  out << '\n';
  for (int t = 0; t < data.rows(); ++t) {
    out << fmt::format("{},{:.17g}", data.time[t], data.target[t]);
    for (const auto& u : data.inputs) out << fmt::format(",{:.17g}", u[t]);
    out << '\n';
  }
}

int run(int argc, char** argv) {
  std::string dump_dir, json_path;
  int repeat = 7;
  for (int i = 1; i < argc; ++i) {
    const std::string arg = argv[i];
    if ((arg == "--dump" || arg == "--json" || arg == "--repeat") && i + 1 >= argc) {
      std::fprintf(stderr, "seasonal_benchmark: %s needs a value\n", arg.c_str());
      return 2;
    }
    if (arg == "--dump") {
      dump_dir = argv[++i];
    } else if (arg == "--json") {
      json_path = argv[++i];
    } else if (arg == "--repeat") {
      repeat = std::max(1, std::atoi(argv[++i]));
    } else {
      std::fprintf(stderr, "seasonal_benchmark: unknown option %s\n", arg.c_str());
      return 2;
    }
  }
  nlohmann::json j;
  fmt::print("n = {}, two inputs (x1 b1 s1, x2 b2 s1, r = 0), constant; thread CPU medians of {}\n",
             kRows, repeat);
  fmt::print("{:10s} {:>4s} {:>9s} {:>10s} {:>8s} {:>11s} {:>7s} {:>12s} {:>6s} {:>6s}\n", "case",
             "m", "fit ms", "search ms", "eval us", "riccati us", "ratio", "loglik", "evals",
             "starts");
  for (const auto& c : cases()) {
    const auto data = case_data(c);
    if (!dump_dir.empty()) write_csv(data, dump_dir + "/" + c.name + ".csv");
    const auto problem = make_problem(data, case_spec(c));
    FitResult fit;
    const double fit_s = time_median(repeat, 3, [&] { fit = fit_model(problem); });
    FitResult quick;
    const auto options = search_options();
    const double search_s = time_median(repeat, 3, [&] { quick = fit_model(problem, options); });
    // One profile evaluation at the estimate (filter + GLS).
    const auto nonlinear = pack_nonlinear(problem.spec, fit.params);
    LikelihoodWorkspace ws;
    const double eval_s =
        time_median(repeat, 200, [&] { (void)profile_loglik(problem, nonlinear, ws); });
    // The same evaluation with the Riccati recursion on the full state covariance (the gains
    // before the Chandrasekhar-type recursion), side by side.
    LikelihoodWorkspace ws_riccati;
    ws_riccati.filter.recursion = GainRecursion::riccati;
    const double riccati_s =
        time_median(repeat, 200, [&] { (void)profile_loglik(problem, nonlinear, ws_riccati); });
    const int m = std::max(c.noise.p + c.noise.period * c.noise.seasonal_p,
                           c.noise.q + c.noise.period * c.noise.seasonal_q + 1);
    fmt::print("{:10s} {:4d} {:9.3f} {:10.3f} {:8.2f} {:11.2f} {:6.1f}x {:12.4f} {:6d} {:6d}\n",
               c.name, m, 1e3 * fit_s, 1e3 * search_s, 1e6 * eval_s, 1e6 * riccati_s,
               riccati_s / eval_s, fit.loglik, fit.evaluations, fit.starts);
    j["cases"][c.name] = {
        {"fit_ms", 1e3 * fit_s},   {"search_fit_ms", 1e3 * search_s},
        {"eval_us", 1e6 * eval_s}, {"riccati_eval_us", 1e6 * riccati_s},
        {"loglik", fit.loglik},    {"evaluations", fit.evaluations},
        {"starts", fit.starts},    {"status", std::string(to_string(fit.status))}};
  }
  // Candidates per CPU second of a grid on the seasonal data (seasonal and non-seasonal noise).
  const auto seasonal_data = case_data(cases()[0]);
  for (const bool seasonal : {false, true}) {
    const auto specs = grid(seasonal);
    const auto g = time_grid(seasonal_data, specs);
    const char* label = seasonal ? "seasonal" : "non_seasonal";
    fmt::print(
        "grid {:12s}: {:5d} candidates, {:6.3f} CPU s, {:7.0f} candidates per CPU second "
        "({} failed; {:.0f} evaluations and {:.2f} starts per candidate)\n",
        label, g.candidates, g.cpu, g.candidates / g.cpu, g.failed,
        double(g.evaluations) / g.candidates, double(g.starts) / g.candidates);
    j["grid"][label] = {{"candidates", g.candidates},
                        {"cpu_seconds", g.cpu},
                        {"per_cpu_second", g.candidates / g.cpu},
                        {"failed", g.failed},
                        {"evaluations_per_candidate", double(g.evaluations) / g.candidates}};
  }
  if (!json_path.empty()) std::ofstream(json_path) << j.dump(2) << '\n';
  return 0;
}

}  // namespace
}  // namespace lagsieve

int main(int argc, char** argv) { return lagsieve::run(argc, argv); }
