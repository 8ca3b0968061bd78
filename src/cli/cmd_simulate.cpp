// `lagsieve simulate SPEC --out FILE`: draws a data set from a transfer-function model of known
// structure (io/simulation_spec.h) and writes it as CSV. Besides the bundled demo data, it answers
// "can a sample this long reveal this delay and shape?": simulate the model you expect, then run
// a search on the result and see whether the truth comes out on top.
#include <fmt/format.h>

#include <cmath>
#include <memory>
#include <string>

#include "cli/commands.h"
#include "cli/common.h"
#include "core/error.h"
#include "core/names.h"
#include "io/atomic_file.h"
#include "io/simulation_spec.h"
#include "model/simulate.h"

namespace lagsieve::cli {
namespace {

struct SimulateArgs {
  std::string spec;
  std::string out;
  unsigned long long seed = 0;
  int rows = 0;
  CLI::Option* seed_option = nullptr;
  CLI::Option* rows_option = nullptr;
  bool quiet = false;
};

std::string polynomial(const std::vector<double>& c, const char* sign_word) {
  std::string s;
  for (size_t i = 0; i < c.size(); ++i) s += fmt::format("{}{:g}", i == 0 ? "" : ", ", c[i]);
  return fmt::format("{} [{}]", sign_word, s);
}

int run_simulate(const SimulateArgs& args) {
  SimulationFile file = load_simulation_spec(args.spec);
  SimulationSpec& spec = file.spec;
  if (args.seed_option->count() > 0) spec.seed = args.seed;
  if (args.rows_option->count() > 0) {
    if (args.rows < 1) throw InputError(fmt::format("--rows must be positive, got {}", args.rows));
    spec.n = args.rows;
  }
  const SeriesData data = simulate(spec);
  write_file_atomic(args.out, simulated_csv(file, data));
  if (args.quiet) return kExitOk;

  fmt::print("wrote      {} ({} rows, seed {})\n", args.out, data.rows(), spec.seed);
  if (!spec.start_date.empty())
    fmt::print("span       {} .. {}\n", data.time.front(), data.time.back());
  fmt::print("target     {} = {:g} + inputs + noise", spec.target, spec.constant);
  if (spec.integrate.lost() > 0)
    fmt::print(", integrated d={} D={} period={}", spec.integrate.regular, spec.integrate.seasonal,
               spec.integrate.period);
  fmt::print("\n");
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& in = spec.inputs[i];
    double num = 0.0, den = 1.0;
    for (double w : in.params.omega) num += w;
    for (double d : in.params.delta) den -= d;
    const bool relevant = num != 0.0 || in.params.omega.size() > 1;
    std::string what = in.is_event
                           ? fmt::format("{} event at row {} ({})", to_string(in.shape), in.at_row,
                                         data.time[static_cast<size_t>(in.at_row)])
                           : "column";
    fmt::print("input      {}: {}; b={} s={} r={}, {}{}, gain {:g}{}\n", in.name, what,
               in.order.delay, in.order.numerator, in.order.denominator,
               polynomial(in.params.omega, "omega"),
               in.params.delta.empty() ? "" : ", " + polynomial(in.params.delta, "delta"),
               num / den, relevant ? "" : " (irrelevant: zero gain)");
  }
  std::string noise = polynomial(spec.phi, "phi") + ", " + polynomial(spec.theta, "theta");
  if (!spec.seasonal_phi.empty() || !spec.seasonal_theta.empty())
    noise += fmt::format(", {}, {}, period {}", polynomial(spec.seasonal_phi, "Phi"),
                         polynomial(spec.seasonal_theta, "Theta"), spec.noise.period);
  fmt::print("noise      {}, sigma {:g}\n", noise, spec.sigma);
  bool events = false;
  for (const auto& in : spec.inputs) events = events || in.is_event;
  if (events)
    fmt::print(
        "note       event columns are not written; a run config regenerates them from "
        "`event:` entries\n");
  return kExitOk;
}

}  // namespace

void register_simulate(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "simulate",
      "Draw a data set from a transfer-function model of known structure and write it as CSV");
  cmd->footer(
      "The spec (YAML) names the target, the rows, the noise ARMA and each input's delay, omega "
      "and delta (events: step, pulse or ramp at a row or date). Besides demo data, use it to "
      "check whether your sample size can reveal a given delay or shape: simulate the model you "
      "expect with your number of rows (--rows) and a few seeds (--seed), run a search on each "
      "file, and see whether the true structure comes out on top.");
  auto args = std::make_shared<SimulateArgs>();
  cmd->add_option("SPEC", args->spec, "Simulation spec (YAML)")->required();
  cmd->add_option("--out", args->out, "CSV file to write (written atomically)")->required();
  args->seed_option =
      cmd->add_option("--seed", args->seed, "Random seed (overrides the spec's `seed`)");
  args->rows_option =
      cmd->add_option("--rows", args->rows, "Number of rows (overrides the spec's `n`)");
  cmd->add_flag("--quiet", args->quiet, "Print nothing on success");
  cmd->callback([args] { finish(run_command([&] { return run_simulate(*args); })); });
}

}  // namespace lagsieve::cli
