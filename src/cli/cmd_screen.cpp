// `lagsieve screen CONFIG`: the identification screen (prewhitened cross-correlations, impulse
// responses, suggested b, r, s per input and p, q for the noise) for every target of a config.
// The rules behind the suggestions are documented in screen/screen.h.
#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli/commands.h"
#include "cli/common.h"
#include "cli/print.h"
#include "core/names.h"
#include "screen/screen.h"

namespace lagsieve::cli {
namespace {

struct ScreenArgs {
  std::string config;
  std::string series;
  bool json = false;
  bool negative = false;
  int lags = ScreenOptions{}.max_lag;
  int ar_max = ScreenOptions{}.ar_max_order;
  int ar = -1;
};

// Magnitude of a correlation as a run of eighth-blocks, one cell per 0.1 of |r| (so |r| = 1 fills
// ten cells), after its sign: a compact size column beside the number, no axis inside. The sign
// is the same ASCII '+' / '-' as in the number beside it (one glyph, one meaning).
std::string magnitude_cells(double r) {
  static const char* const kEighths[] = {"",       "\u258f", "\u258e", "\u258d",
                                         "\u258c", "\u258b", "\u258a", "\u2589"};
  const int eighths = static_cast<int>(std::lround(std::min(std::abs(r), 1.0) * 80.0));
  std::string out = r < 0 ? "-" : "+";
  for (int i = 0; i < eighths / 8; ++i) out += "\u2588";
  out += kEighths[eighths % 8];
  const int cells = eighths / 8 + (eighths % 8 ? 1 : 0);
  out += std::string(static_cast<size_t>(10 - cells), ' ');
  return out;
}

// The band column: one word per meaning.
const char* band_marker(double r, double band, double family) {
  if (std::abs(r) > family) return "family";
  if (std::abs(r) > band) return "lag";
  return "";
}

std::string join_numbers(const std::vector<double>& v) {
  std::string out;
  for (double x : v) {
    if (!out.empty()) out += ", ";
    out += fmt::format("{:.4g}", x);
  }
  return out;
}

void print_input(const InputScreen& s, bool negative) {
  const std::string how =
      describe_treatment({s.is_event, s.indicator.shape}, s.prewhitened, s.prewhitening.order);
  fmt::print("\n{}  [{}; n = {}]\n", s.name, how, s.n);
  const bool has_bars = !(s.cross_correlation.empty() || s.band == 0.0);
  if (s.indicator.shape != IndicatorShape::none && has_bars)
    fmt::print("  note: {}\n", s.notes.front());  // the others are in the bars below
  if (s.relevant)
    fmt::print("  suggestion: b = {}, s = {}, r = {}   omega = ({}){}\n", s.suggested_delay,
               s.suggested_numerator, s.suggested_denominator, join_numbers(s.suggested_omega),
               s.suggested_delta.empty()
                   ? ""
                   : fmt::format(", delta = ({})", join_numbers(s.suggested_delta)));
  else
    fmt::print("  suggestion: leave it out (no significant cross-correlation at lags 0..{})\n",
               s.max_lag);
  if (s.cross_correlation.empty() || s.band == 0.0) {
    for (const auto& note : s.notes) fmt::print("  note: {}\n", note);
    return;
  }
  fmt::print("  {:>5} {:>8}  {:<11} {:<7} {:>11} {:>10} {:>11}\n", "lag", "r(k)", "bar", "beyond",
             "v_k", "se", "shape v_k");
  const int from = negative ? -s.max_lag : 0;
  for (int k = from; k <= s.max_lag; ++k) {
    const double r = s.correlation_at(k);
    std::string tail;
    if (k >= 0)  // %g keeps the size of small weights visible (4e-05, not 0.0000)
      tail = fmt::format("{:>11.4g} {:>10.3g} {:>11.4g}", s.impulse[k], s.impulse_se[k],
                         s.impulse_fitted[k]);
    fmt::print("  {:>5} {:>+8.3f}  {} {:<7} {}\n", k, r, magnitude_cells(r),
               band_marker(r, s.band, s.family_band), tail);
  }
  fmt::print(
      "  bar: the sign of r(k), then one cell per 0.1 of |r(k)|\n"
      "  beyond: \"lag\" = outside the per-lag band \u00b1{:.3f}, \"family\" = outside the "
      "family-wise band over lags 0..{} \u00b1{:.3f} as well\n",
      s.band, s.max_lag, s.family_band);
  if (!negative) {
    int worst = -1;
    for (int k = -s.max_lag; k <= -1; ++k)
      if (std::abs(s.correlation_at(k)) > std::abs(s.correlation_at(worst))) worst = k;
    const bool deterministic = s.is_event || s.indicator.shape != IndicatorShape::none;
    fmt::print("  negative lags: largest |r| {:.3f} at lag {}{}\n",
               std::abs(s.correlation_at(worst)), worst,
               deterministic ? " (not a sign of feedback: a deterministic input cannot respond)"
               : s.feedback_lags.empty() ? " (within the feedback band)"
                                         : " (beyond the feedback band: see warnings)");
  }
}

void print_screen(const ScreenResult& r, bool negative) {
  fmt::print(
      "screen of {}: {} rows, {} after differencing (d={}, D={}, period {}), transform {}; "
      "lags 0..{}\n",
      r.target_name, r.rows, r.n, r.differencing.regular, r.differencing.seasonal,
      r.differencing.period, to_string(r.transform.kind), r.max_lag_used);
  for (const auto& s : r.inputs) print_input(s, negative);
  fmt::print("\nnoise: suggested p = {}, q = {}  ({}; residual n = {})\n", r.noise.p, r.noise.q,
             r.noise.reason, r.noise.n);
  if (!r.noise.acf.empty()) {
    std::string acf, pacf;
    for (size_t k = 1; k < r.noise.acf.size(); ++k) acf += fmt::format(" {:6.2f}", r.noise.acf[k]);
    for (double v : r.noise.pacf) pacf += fmt::format(" {:6.2f}", v);
    fmt::print("  ACF  lags 1..{}:{}\n  PACF lags 1..{}:{}\n  band \u00b1{:.3f}\n",
               r.noise.pacf.size(), acf, r.noise.pacf.size(), pacf, r.noise.band);
  }
  if (r.warnings.empty()) {
    fmt::print("\nwarnings: none\n");
  } else {
    fmt::print("\nwarnings:\n");
    for (size_t i = 0; i < r.warnings.size(); ++i)
      fmt::print("  [{}] {}: {}\n", i + 1, to_string(r.warnings[i].kind), r.warnings[i].message);
  }
}

int run_screen(const ScreenArgs& args) {
  const LoadedRun run = load_run_one(args.config, args.series);
  ScreenOptions opt;
  opt.max_lag = args.lags;
  opt.ar_max_order = args.ar_max;
  if (args.ar >= 0) opt.ar_order = args.ar;
  std::vector<const SeriesData*> targets;
  if (!args.series.empty())
    targets.push_back(&pick_series(run, args.series));
  else
    for (const auto& s : run.series) targets.push_back(&s);

  nlohmann::json all = nlohmann::json::array();
  for (size_t i = 0; i < targets.size(); ++i) {
    const ScreenResult res = screen_series(*targets[i], run.config, opt);
    if (args.json) {
      all.push_back(to_json(res));
    } else {
      if (i > 0) fmt::print("\n{}\n\n", std::string(72, '='));
      print_screen(res, args.negative);
    }
  }
  if (args.json) fmt::print("{}\n", (all.size() == 1 ? all[0] : all).dump(2));
  return kExitOk;
}

}  // namespace

void register_screen(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "screen",
      "Identification screen: cross-correlations (data columns prewhitened) and impulse "
      "responses per input, with suggested delay and orders, noise orders and warnings");
  auto args = std::make_shared<ScreenArgs>();
  cmd->add_option("CONFIG", args->config, "Run configuration (YAML)")->required();
  cmd->add_option("--series", args->series, "Screen only this target column (default: all)");
  cmd->add_option("--lags", args->lags, "Largest lag L (capped at n/4)")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--ar-max", args->ar_max, "Largest prewhitening AR order tried by AIC")
      ->capture_default_str()
      ->check(CLI::NonNegativeNumber);
  cmd->add_option("--ar", args->ar, "Fixed prewhitening AR order instead of AIC")
      ->check(CLI::NonNegativeNumber);
  cmd->add_flag("--negative", args->negative, "Show the negative lags in the table too");
  cmd->add_flag("--json", args->json,
                "Print everything as JSON (one object per target; an array for several)");
  cmd->callback([args] { finish(run_command([&] { return run_screen(*args); })); });
}

}  // namespace lagsieve::cli
