#include "cli/print.h"

#include <fmt/format.h>

#include <cmath>

#include "core/error.h"
#include "data/load.h"
#include "model/spec_from_config.h"
#include "outliers/json.h"

namespace lagsieve::cli {

const SeriesData& pick_series(const LoadedRun& run, const std::string& name) {
  if (name.empty()) return run.series.front();
  std::string names;
  for (const auto& s : run.series) {
    if (s.target_name == name) return s;
    names += (names.empty() ? "" : ", ") + s.target_name;
  }
  throw InputError(
      fmt::format("--series {}: not a target of this config (targets: {})", name, names));
}

namespace {

std::string num(double v, int digits = 4) {
  if (!std::isfinite(v)) return "—";
  return fmt::format("{:.{}g}", v, digits);
}

}  // namespace

void print_fit(const FitResult& fit, const SeriesData& data) {
  fmt::print("{} · {}\n", data.target_name, model_label(fit.spec));
  const bool differenced = fit.spec.differencing.regular > 0 || fit.spec.differencing.seasonal > 0;
  fmt::print("{} rows; {} {}observations inside the likelihood (from row {})\n", data.rows(),
             fit.n_obs, differenced ? "differenced " : "", fit.start + 1);
  for (const auto& line : describe_missing(data)) fmt::print("missing: {}\n", line);
  fmt::print("status: {} — {}\n\n", to_string(fit.status), fit.message);
  fmt::print("  {:<28} {:>12} {:>11} {:>8}\n", "parameter", "estimate", "std. error", "ratio");
  for (const auto& e : fit.estimates)
    fmt::print("  {:<28} {:>12} {:>11} {:>8}\n", e.name, num(e.value, 6), num(e.std_error, 3),
               std::isfinite(e.std_error) && e.std_error > 0
                   ? fmt::format("{:.1f}", e.value / e.std_error)
                   : "—");
  fmt::print("  {:<28} {:>12}\n\n", "sigma^2 (innovations)", num(fit.sigma2, 6));
  // The criteria as a small table of their own, each with the formula it comes from.
  fmt::print("how well it fits (n = {} observations, k = {} parameters, sigma^2 counted):\n",
             fit.n_obs, fit.n_params);
  const auto criterion = [](const char* name, double value, const char* formula) {
    fmt::print("  {:<16} {:>14}   {}\n", name,
               std::isfinite(value) ? fmt::format("{:.3f}", value) : "\u2014", formula);
  };
  criterion("log-likelihood", fit.loglik, "l, exact Gaussian");
  criterion("AIC", fit.aic, "-2 l + 2 k");
  criterion("AICc", fit.aicc, "AIC + 2 k (k + 1) / (n - k - 1)");
  criterion("BIC", fit.bic, "-2 l + k ln n");
  if (const auto note = filter_start_note(fit.spec); !note.empty()) fmt::print("{}\n", note);
  if (!fit.diagnostics.gains.empty()) {
    fmt::print("\nlong-run gain of each input (response to a lasting unit change):\n");
    for (const auto& g : fit.diagnostics.gains)
      fmt::print("  {:<20} {:>10} ± {}\n", g.input, num(g.gain, 5), num(g.std_error, 3));
  }
  if (!fit.diagnostics.ljung_box.empty()) {
    fmt::print("\nresidual whiteness (Ljung-Box; small p = autocorrelation left):\n");
    for (const auto& lb : fit.diagnostics.ljung_box)
      fmt::print("  up to lag {:>3}: Q = {:>8}  df {:>3}  p = {}\n", lb.lag, num(lb.statistic, 5),
                 lb.df, num(lb.p_value, 3));
  }
  if (!fit.diagnostics.residual_input.empty()) {
    fmt::print(
        "\nresiduals against each input (small p = a lag the transfer function misses; events "
        "and indicator columns are not prewhitened, as in the screen):\n");
    for (const auto& c : fit.diagnostics.residual_input)
      fmt::print(
          "  {:<20} S = {:>8}  df {:>3}  p = {:<9}  largest at lag {} (r = {}, band ±{})  [{}]\n",
          c.input, num(c.statistic, 5), c.df, num(c.p_value, 3), c.largest_lag,
          num(c.values[static_cast<size_t>(c.largest_lag + c.max_lag)], 3), num(c.band, 3),
          describe_treatment(c.kind, c.prewhitened, c.ar_order));
  }
  if (!fit.diagnostics.roots.empty()) {
    fmt::print("\nsmallest root modulus (must exceed 1; near 1 = near a unit root):\n");
    for (const auto& r : fit.diagnostics.roots)
      fmt::print("  {:<20} {}\n", r.polynomial, num(r.min_modulus, 4));
  }
  for (const auto& w : fit.diagnostics.warnings) fmt::print("\nwarning: {}\n", w.message);
}

void print_outliers(const OutlierFit& detected) {
  fmt::print("\ndetected effects (critical |t| {:.2f}; {} detection rounds):\n", detected.critical,
             detected.rounds);
  if (detected.effects.empty()) fmt::print("  none\n");
  bool ambiguous = false;
  for (const auto& e : detected.effects) {
    fmt::print("  {}\n", describe_effect(e));
    ambiguous = ambiguous || !e.ambiguous_with.empty();
  }
  for (const auto& e : detected.dropped)
    fmt::print("  dropped (below the critical value in the joint fit): {}\n", e.name);
  if (ambiguous) fmt::print("  ambiguous: {}\n", kAmbiguityRule);
}

}  // namespace lagsieve::cli
