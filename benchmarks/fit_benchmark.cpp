// Per-fit time of the exact-ML engine on the reference size of the speed target: n = 500, two
// inputs with b, s = 1, r = 1 each, ARMA(2,1) noise and a constant, simulated with a fixed seed.
//
//   fit_benchmark [benchmark flags]     run the timings
//   fit_benchmark --dump PATH           write the simulated data as CSV (time,y,x1,x2) and exit,
//                                       so the comparison script fits exactly the same numbers
#include <benchmark/benchmark.h>

#include <cstdio>
#include <cstring>
#include <fstream>
#include <string>
#include <utility>
#include <vector>

#include "model/fit.h"
#include "model/likelihood.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

constexpr std::uint64_t kSeed = 20240601;
constexpr int kLength = 500;

SimulationSpec benchmark_model() {
  SimulationSpec sim;
  sim.n = kLength;
  sim.seed = kSeed;
  sim.constant = 0.2;
  sim.noise = {2, 1, 0, 0, 1};
  sim.phi = {0.5, -0.3};
  sim.theta = {0.4};
  SimulatedInput x1;
  x1.name = "x1";
  x1.order = {1, 1, 1};
  x1.params.omega = {1.5, 0.7};
  x1.params.delta = {0.5};
  SimulatedInput x2;
  x2.name = "x2";
  x2.order = {2, 1, 1};
  x2.params.omega = {-1.0, 0.5};
  x2.params.delta = {0.7};
  x2.ar = 0.3;
  sim.inputs = {x1, x2};
  return sim;
}

ModelSpec benchmark_spec() {
  ModelSpec spec;
  spec.inputs = {{"x1", {1, 1, 1}}, {"x2", {2, 1, 1}}};
  spec.noise = {2, 1, 0, 0, 1};
  spec.constant = true;
  return spec;
}

const LikelihoodProblem& benchmark_problem() {
  static const LikelihoodProblem problem = make_problem(simulate(benchmark_model()), benchmark_spec());
  return problem;
}

void report_fit(benchmark::State& state, const FitResult& fit) {
  // Rates are value * iterations / time; inverted they give time per unit of the value.
  const auto kPer = benchmark::Counter::kIsIterationInvariantRate | benchmark::Counter::kInvert;
  state.counters["evaluations"] = fit.evaluations;  // optimiser evaluations (no Hessian)
  state.counters["ms_per_fit"] = benchmark::Counter(1e-3, kPer);
  // Fit time spread over the optimiser's evaluations (includes the Hessian where it is on).
  state.counters["ms_per_evaluation"] = benchmark::Counter(1e-3 * fit.evaluations, kPer);
  state.counters["loglik"] = fit.loglik;
  state.counters["ok"] = fit.status == FitStatus::ok ? 1 : 0;
}

// The whole fit as the CLI runs it: optimiser, standard errors, diagnostics.
void BM_Fit(benchmark::State& state) {
  const auto& problem = benchmark_problem();
  FitResult fit;
  for (auto _ : state) {
    fit = fit_model(problem);
    benchmark::DoNotOptimize(std::as_const(fit).loglik);
  }
  report_fit(state, fit);
}
BENCHMARK(BM_Fit)->Unit(benchmark::kMillisecond);

// The optimiser alone (what the search runs for every candidate before ranking).
void BM_FitWithoutStandardErrors(benchmark::State& state) {
  const auto& problem = benchmark_problem();
  FitOptions options;
  options.standard_errors = false;
  options.diagnostics = false;
  FitResult fit;
  for (auto _ : state) {
    fit = fit_model(problem, options);
    benchmark::DoNotOptimize(std::as_const(fit).loglik);
  }
  report_fit(state, fit);
}
BENCHMARK(BM_FitWithoutStandardErrors)->Unit(benchmark::kMillisecond);

// One profile log-likelihood evaluation (filter + GLS) at the true nonlinear parameters.
void BM_ProfileLoglik(benchmark::State& state) {
  const auto& problem = benchmark_problem();
  const std::vector<double> nonlinear{0.5, 0.7, 0.5, -0.3, 0.4};  // deltas, phi, theta
  LikelihoodWorkspace ws;
  for (auto _ : state) {
    const auto value = profile_loglik(problem, nonlinear, ws);
    benchmark::DoNotOptimize(std::as_const(value).loglik);
  }
  state.counters["us_per_evaluation"] = benchmark::Counter(
      1e-6, benchmark::Counter::kIsIterationInvariantRate | benchmark::Counter::kInvert);
}
BENCHMARK(BM_ProfileLoglik)->Unit(benchmark::kMicrosecond);

int dump(const char* path) {
  const auto data = simulate(benchmark_model());
  std::ofstream out(path);
  if (!out) {
    std::fprintf(stderr, "fit_benchmark: cannot write %s\n", path);
    return 1;
  }
  out << "time,y";
  for (const auto& name : data.input_names) out << ',' << name;
  out << '\n';
  char buf[64];
  for (int t = 0; t < data.rows(); ++t) {
    out << data.time[t];
    std::snprintf(buf, sizeof buf, ",%.17g", data.target[t]);
    out << buf;
    for (const auto& u : data.inputs) {
      std::snprintf(buf, sizeof buf, ",%.17g", u[t]);
      out << buf;
    }
    out << '\n';
  }
  return out ? 0 : 1;
}

}  // namespace
}  // namespace lagsieve

int main(int argc, char** argv) {
  for (int i = 1; i < argc; ++i)
    if (std::strcmp(argv[i], "--dump") == 0) {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "fit_benchmark: --dump needs a file path\n");
        return 2;
      }
      return lagsieve::dump(argv[i + 1]);
    }
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
