#pragma once
// Reads the YAML run configuration into a validated RunConfig (core/config.h). Every problem is an
// InputError of the form "<config file>:<line>: <key path>: <what is wrong and what to do>".
#include <filesystem>
#include <string_view>
#include <vector>

#include "core/config.h"
#include "core/error.h"

namespace lagsieve {

// Upper limits on orders; beyond them candidate models are not identifiable in practice and a
// typo (delay: 400 instead of 4) would silently blow up the grid.
inline constexpr int kMaxDelay = 500;
inline constexpr int kMaxNumerator = 24;
inline constexpr int kMaxDenominator = 4;
inline constexpr int kMaxArma = 24;         // ar, ma
inline constexpr int kMaxSeasonalArma = 4;  // seasonal_ar, seasonal_ma
inline constexpr int kMaxDifferencing = 2;  // regular and seasonal
// Worker threads (search.threads and --threads alike): 0 = all cores. Far beyond any core count,
// and below where the thread pool's own limits fail.
inline constexpr int kMaxThreads = 1024;
// Forecast and backtest horizons (forecast --horizon, forecast.horizon, backtest.horizon): far
// beyond any use, and small enough that a typo cannot exhaust memory.
inline constexpr int kMaxHorizon = 10000;

// Reads and validates the file; paths inside resolve relative to its folder.
// With `problems`: every section is read even after one fails, and each section's first problem
// is appended there instead of thrown (`validate --json`); the sections that failed keep their
// defaults. Problems that stop the reading (no such file, YAML syntax) are still thrown.
RunConfig load_config(const std::filesystem::path& config_file,
                      std::vector<InputError>* problems = nullptr);

// Parses YAML text as if it were the content of `config_file` (used in messages and to resolve
// relative paths; the file itself is not read).
RunConfig parse_config(std::string_view yaml_text, const std::filesystem::path& config_file,
                       std::vector<InputError>* problems = nullptr);

// Number of candidate models the config spans before any narrowing: the product over inputs of
// (|b| x |s| x |r| (+1 when optional)) times |p| x |q| x |P| x |Q| times 2 when the constant is
// `auto`. Saturates at INT64_MAX instead of overflowing.
long long candidate_grid_size(const RunConfig& config);

// total * k for counts >= 0, saturating at INT64_MAX (grid sizes of wide configs overflow).
long long saturating_product(long long total, long long k);

}  // namespace lagsieve
